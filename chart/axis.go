package chart

import (
	"errors"
	"math"
	"strconv"
	"strings"
)

// scale maps data values on [lo, hi] to viewBox positions [p0, p1], linearly or linearly in log10.
type scale struct {
	lo, hi, p0, p1 float64
	log            bool
}

func (s scale) at(v float64) float64 {
	a, b := s.lo, s.hi
	if s.log {
		v, a, b = math.Log10(v), math.Log10(a), math.Log10(b)
	}
	return s.p0 + (v-a)/(b-a)*(s.p1-s.p0)
}

// tick is a labelled axis position.
type tick struct {
	value float64
	label string
}

// decimal returns k·10^e correctly rounded (exact powers of ten up to 10^22 keep 0.2·3 at 0.6).
func decimal(k int64, e int) float64 {
	if e >= 0 {
		return float64(k) * math.Pow10(e)
	}
	return float64(k) / math.Pow10(-e)
}

// niceStep returns the smallest step m·10^e with m ∈ {1, 2, 5} that is at least span/intervals:
//
//	step = min{ m·10^e ≥ span/intervals : m ∈ {1, 2, 5} }
//
// References:
//   - Heckbert P.S. (1990) Nice numbers for graph labels, Graphics Gems, 61–63.
func niceStep(span float64, intervals int) (m, e int) {
	raw := span / float64(intervals)
	e = int(math.Floor(math.Log10(raw)))
	norm := raw / math.Pow10(e)
	for _, m := range []int{1, 2, 5} {
		if float64(m) >= norm*(1-1e-9) {
			return m, e
		}
	}
	return 1, e + 1
}

// linearTicks returns at most maxN (≥ 2) ticks at multiples of a 1-2-5 step inside [lo, hi].
func linearTicks(lo, hi float64, maxN int) []tick {
	_, _, t := linearAxis(lo, hi, maxN, false)
	return t
}

// linearAxis picks a 1-2-5 step for at most maxN ticks on [lo, hi]. With expand it widens the
// domain to whole steps (then up to maxN+1 ticks); it returns the domain and its ticks.
func linearAxis(lo, hi float64, maxN int, expand bool) (dlo, dhi float64, ticks []tick) {
	m, e := niceStep(hi-lo, maxN-1)
	step := decimal(int64(m), e)
	k0 := int64(math.Ceil(lo/step - 1e-9))
	k1 := int64(math.Floor(hi/step + 1e-9))
	dlo, dhi = lo, hi
	if expand {
		k0, k1 = int64(math.Floor(lo/step+1e-9)), int64(math.Ceil(hi/step-1e-9))
		dlo, dhi = decimal(k0*int64(m), e), decimal(k1*int64(m), e)
	}
	// Exponent labels for very large or small numbers; otherwise as many decimals as the step needs.
	big := math.Max(math.Abs(decimal(k0*int64(m), e)), math.Abs(decimal(k1*int64(m), e)))
	expo := big >= 1e6 || (big > 0 && big < 1e-3)
	prec := max(0, -e)
	if expo {
		prec = max(0, int(math.Floor(math.Log10(big)+1e-9))-e)
	}
	for k := k0; k <= k1; k++ {
		v := decimal(k*int64(m), e)
		var s string
		switch {
		case v == 0:
			s = "0"
		case expo:
			s = tidyExp(strconv.FormatFloat(v, 'e', prec, 64))
		default:
			s = strconv.FormatFloat(v, 'f', prec, 64)
		}
		ticks = append(ticks, tick{v, s})
	}
	return dlo, dhi, ticks
}

// tidyExp shortens Go's exponent form: "1.5e-07" → "1.5e-7", "2e+06" → "2e6".
func tidyExp(s string) string {
	i := strings.IndexByte(s, 'e')
	if i < 0 {
		return s
	}
	mant, exp := s[:i], s[i+1:]
	sign := ""
	if exp[0] == '-' {
		sign = "-"
	}
	digits := strings.TrimLeft(exp[1:], "0")
	if digits == "" {
		digits = "0"
	}
	return mant + "e" + sign + digits
}

// logTicks returns ticks for a log10 axis on [lo, hi], 0 < lo < hi: the 1, 2, 5 multiples of each
// decade when the span is under two decades and they fit in maxN; otherwise the decades, every
// s-th one (aligned to multiples of s decades) so that about maxN remain; the 1-2-5 ticks thinned
// in the same way when fewer than two decades are in range; linear ticks when even those are fewer
// than two.
func logTicks(lo, hi float64, maxN int) []tick {
	a, b := math.Log10(lo), math.Log10(hi)
	in := func(v float64) bool { return v >= lo*(1-1e-12) && v <= hi*(1+1e-12) }
	var t125, decades []tick
	for k := int(math.Floor(a)); k <= int(math.Ceil(b)); k++ {
		for _, m := range []int64{1, 2, 5} {
			if v := decimal(m, k); in(v) {
				t := tick{v, logLabel(v)}
				t125 = append(t125, t)
				if m == 1 {
					decades = append(decades, t)
				}
			}
		}
	}
	if b-a < 2 && len(t125) >= 2 && len(t125) <= maxN {
		return t125
	}
	if len(decades) >= 2 {
		s := (len(decades) + maxN - 1) / maxN
		var out []tick
		for _, t := range decades {
			if k := int(math.Round(math.Log10(t.value))); k%s == 0 {
				out = append(out, t)
			}
		}
		if len(out) >= 2 {
			return out
		}
		return decades
	}
	if len(t125) >= 2 {
		s := (len(t125) + maxN - 1) / maxN
		var out []tick
		for i := 0; i < len(t125); i += s {
			out = append(out, t125[i])
		}
		return out
	}
	return linearTicks(lo, hi, maxN)
}

// logLabel prints a 1-2-5 log tick in plain decimals between 0.001 and 999999, else as "2e-9".
func logLabel(v float64) string {
	if v >= 1e-3 && v < 1e6 {
		return strconv.FormatFloat(v, 'f', -1, 64)
	}
	return tidyExp(strconv.FormatFloat(v, 'e', -1, 64))
}

// axisSpec describes one axis of a frame: its data range, whether it is log10, whether a linear
// range is widened to whole tick steps, and its label.
type axisSpec struct {
	lo, hi float64
	log    bool
	expand bool
	label  string
}

// frame is the plot area of a histogram or curve chart and its axes, in viewBox units.
type frame struct {
	x0, y0, x1, y1 float64 // left, top, right, bottom of the plot area
	x, y           scale
	xt, yt         []tick
	xlabel, ylabel string
	legendY        float64 // top of the first legend row
	fs             float64
}

// newFrame lays out a width×height chart: a title line (if titled), the plot area, tick labels, axis
// labels and legendRows legend rows below; it picks ticks that do not overlap.
func newFrame(width, height int, titled bool, xs, ys axisSpec, legendRows int) (*frame, error) {
	fs := fontSize(width)
	f := &frame{fs: fs, xlabel: xs.label, ylabel: ys.label, y0: 0.8 * fs}
	if titled {
		f.y0 = 2.6 * fs
	}
	below := 1.9 * fs
	if xs.label != "" {
		below = 3.3 * fs
	}
	f.y1 = float64(height) - below - (float64(legendRows)*legendRow+0.3)*fs
	if f.y1-f.y0 < 4*fs {
		return nil, errors.New("chart: height " + strconv.Itoa(height) + " leaves no room for the plot and its " +
			strconv.Itoa(legendRows) + " legend rows")
	}
	f.legendY = f.y1 + below

	xs.lo, xs.hi = widen(xs.lo, xs.hi, xs.log)
	ys.lo, ys.hi = widen(ys.lo, ys.hi, false)
	if !finite(xs.hi-xs.lo) || !finite(ys.hi-ys.lo) {
		return nil, errors.New("chart: data range too wide to draw")
	}
	nY := min(max(int((f.y1-f.y0)/(2.5*fs))+1, 2), 8)
	ylo, yhi, yt := linearAxis(ys.lo, ys.hi, nY, ys.expand)
	f.yt = yt
	f.y = scale{lo: ylo, hi: yhi, p0: f.y1, p1: f.y0}

	f.x0 = fs
	for _, t := range yt {
		f.x0 = math.Max(f.x0, textWidth(t.label, fs)+fs)
	}
	if ys.label != "" {
		f.x0 += 1.5 * fs
	}
	right := fs
	for pass := 0; pass < 2; pass++ {
		f.x1 = float64(width) - right
		for nX := min(max(int((f.x1-f.x0)/(3*fs))+1, 2), 10); ; nX-- {
			f.pickX(xs, nX)
			if nX == 2 || !f.crowded() {
				break
			}
		}
		// Let the last label overhang the plot area, but not the image.
		last := f.xt[len(f.xt)-1]
		need := textWidth(last.label, fs)/2 + 0.3*fs - (f.x1 - f.x.at(last.value))
		if need <= right {
			break
		}
		right = need
	}
	return f, nil
}

// widen gives a zero-width range some room so that it can be drawn.
func widen(lo, hi float64, log bool) (float64, float64) {
	switch {
	case lo < hi:
		return lo, hi
	case log:
		return lo / 2, hi * 2
	case lo == 0:
		return -0.5, 0.5
	}
	d := math.Abs(lo) / 10
	return lo - d, hi + d
}

func (f *frame) pickX(xs axisSpec, n int) {
	lo, hi := xs.lo, xs.hi
	if xs.log {
		f.xt = logTicks(lo, hi, n)
	} else {
		lo, hi, f.xt = linearAxis(lo, hi, n, xs.expand)
	}
	f.x = scale{lo: lo, hi: hi, p0: f.x0, p1: f.x1, log: xs.log}
}

// crowded reports whether two neighbouring x tick labels would touch.
func (f *frame) crowded() bool {
	for i := 1; i < len(f.xt); i++ {
		a, b := f.xt[i-1], f.xt[i]
		need := (textWidth(a.label, f.fs)+textWidth(b.label, f.fs))/2 + 0.6*f.fs
		if f.x.at(b.value)-f.x.at(a.value) < need {
			return true
		}
	}
	return false
}

// grid draws light grid lines at the ticks.
func (f *frame) grid(w *writer) {
	w.open("g", "class", "grid", "stroke", colourGrid, "stroke-width", "1")
	for _, t := range f.xt {
		x := f.x.at(t.value)
		w.line(x, f.y0, x, f.y1)
	}
	for _, t := range f.yt {
		y := f.y.at(t.value)
		w.line(f.x0, y, f.x1, y)
	}
	w.close("g")
}

// axes draws the axis lines, tick marks, tick labels and axis labels.
func (f *frame) axes(w *writer) {
	fs := f.fs
	w.open("g", "class", "axes")
	w.line(f.x0, f.y1, f.x1, f.y1, "stroke", colourAxis)
	w.line(f.x0, f.y0, f.x0, f.y1, "stroke", colourAxis)
	for _, t := range f.xt {
		x := f.x.at(t.value)
		w.line(x, f.y1, x, f.y1+0.3*fs, "stroke", colourAxis)
		w.text(x, f.y1+1.35*fs, t.label, "text-anchor", "middle")
	}
	for _, t := range f.yt {
		y := f.y.at(t.value)
		w.line(f.x0-0.3*fs, y, f.x0, y, "stroke", colourAxis)
		w.text(f.x0-0.5*fs, y+0.35*fs, t.label, "text-anchor", "end")
	}
	if f.xlabel != "" {
		w.text((f.x0+f.x1)/2, f.y1+2.85*fs, f.xlabel, "text-anchor", "middle")
	}
	if f.ylabel != "" {
		w.text(0, 0, f.ylabel, "text-anchor", "middle",
			"transform", "translate("+num(1.1*fs)+" "+num((f.y0+f.y1)/2)+") rotate(-90)")
	}
	w.close("g")
}

// markLines draws vertical (vertical true) or horizontal reference lines across the plot area,
// styled by markStyles from index first, and returns the legend entries of the labelled ones.
func (f *frame) markLines(w *writer, marks []Mark, vertical bool, first int) []legendEntry {
	if len(marks) == 0 {
		return nil
	}
	class := "hlines"
	if vertical {
		class = "vlines"
	}
	var entries []legendEntry
	w.open("g", "class", class, "stroke-width", "2", "fill", "none")
	for i, m := range marks {
		st := markStyles[(first+i)%len(markStyles)]
		if vertical {
			x := f.x.at(m.Value)
			w.line(x, f.y0, x, f.y1, "stroke", st.colour, "stroke-dasharray", st.dash)
		} else {
			y := f.y.at(m.Value)
			w.line(f.x0, y, f.x1, y, "stroke", st.colour, "stroke-dasharray", st.dash)
		}
		if m.Label != "" {
			entries = append(entries, legendEntry{label: m.Label, colour: st.colour, dash: st.dash})
		}
	}
	w.close("g")
	return entries
}
