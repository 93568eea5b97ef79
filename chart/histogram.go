package chart

import (
	"errors"
	"math"
	"strconv"
)

// Histogram is a histogram of counts in bins, with optional vertical marks (e.g. interval ends, the
// nominal value), shaded bands (e.g. a coverage interval) and an overlaid curve (e.g. the expected
// counts per bin). X values are in the caller's unit, named in XLabel.
type Histogram struct {
	Title  string
	XLabel string // x axis label, with its unit
	YLabel string // y axis label; "count" when empty
	Desc   string // description for screen readers; generated from the data when empty

	Edges  []float64 // bin edges, strictly increasing, len(Counts)+1 of them
	Counts []int     // counts per bin, ≥ 0

	Marks        []Mark  // vertical lines
	Bands        []Band  // shaded x ranges
	Overlay      []Point // a curve in count units, drawn over the bins; may be empty
	OverlayLabel string  // legend label of Overlay
}

// SVG draws the histogram as a standalone SVG document with a viewBox of width×height units
// (width in [240, 4000], height in [160, 4000]). The x range covers the bins, marks, bands and
// overlay; the y range starts at 0 and ends at a whole tick step. It returns an error for bad data:
// no bins, mismatched lengths, NaN or infinite values, edges not increasing, negative counts, a band
// with Lo > Hi.
func (h Histogram) SVG(width, height int) (string, error) {
	if err := checkSize(width, height); err != nil {
		return "", err
	}
	if err := h.check(); err != nil {
		return "", err
	}
	n := len(h.Counts)
	xlo, xhi := h.Edges[0], h.Edges[n]
	ylo, yhi := 0.0, 0.0
	for _, c := range h.Counts {
		yhi = math.Max(yhi, float64(c))
	}
	for _, m := range h.Marks {
		xlo, xhi = math.Min(xlo, m.Value), math.Max(xhi, m.Value)
	}
	for _, b := range h.Bands {
		xlo, xhi = math.Min(xlo, b.Lo), math.Max(xhi, b.Hi)
	}
	for _, p := range h.Overlay {
		xlo, xhi = math.Min(xlo, p.X), math.Max(xhi, p.X)
		ylo, yhi = math.Min(ylo, p.Y), math.Max(yhi, p.Y)
	}
	if yhi == ylo {
		yhi = 1
	}
	ylabel := h.YLabel
	if ylabel == "" {
		ylabel = "count"
	}

	var legend []legendEntry
	for _, b := range h.Bands {
		if b.Label != "" {
			legend = append(legend, legendEntry{label: b.Label, fill: colourBand, opacity: "0.3"})
		}
	}
	overlayLegend := len(h.Overlay) > 0 && h.OverlayLabel != ""
	rows := len(legend) + countLabels(h.Marks)
	if overlayLegend {
		rows++
	}
	f, err := newFrame(width, height, h.Title != "",
		axisSpec{lo: xlo, hi: xhi, label: h.XLabel},
		axisSpec{lo: ylo, hi: yhi, expand: true, label: ylabel}, rows)
	if err != nil {
		return "", err
	}

	w := newWriter(width, height, h.Title, "Histogram", h.describe())
	f.grid(w)
	w.open("g", "class", "bins", "fill", colourBin, "stroke", colourBinLine, "stroke-width", "1")
	y0 := f.y.at(0)
	for i, c := range h.Counts {
		xa, xb, yc := f.x.at(h.Edges[i]), f.x.at(h.Edges[i+1]), f.y.at(float64(c))
		w.rect(xa, yc, xb-xa, y0-yc)
	}
	w.close("g")
	if len(h.Bands) > 0 {
		w.open("g", "class", "bands", "fill", colourBand, "fill-opacity", "0.3")
		for _, b := range h.Bands {
			xa, xb := f.x.at(b.Lo), f.x.at(b.Hi)
			w.rect(xa, f.y0, xb-xa, f.y1-f.y0)
		}
		w.close("g")
	}
	if len(h.Overlay) > 0 {
		xs, ys := make([]float64, len(h.Overlay)), make([]float64, len(h.Overlay))
		for i, p := range h.Overlay {
			xs[i], ys[i] = f.x.at(p.X), f.y.at(p.Y)
		}
		w.polyline(xs, ys, "class", "overlay", "stroke", colourOverlay, "stroke-width", "2")
		if overlayLegend {
			legend = append(legend, legendEntry{label: h.OverlayLabel, colour: colourOverlay})
		}
	}
	legend = append(legend, f.markLines(w, h.Marks, true, 0)...)
	f.axes(w)
	w.legend(f.x0, f.legendY, legend)
	return w.String(), nil
}

func (h Histogram) check() error {
	n := len(h.Counts)
	if n == 0 {
		return errors.New("chart: histogram has no bins")
	}
	if len(h.Edges) != n+1 {
		return errors.New("chart: histogram has " + strconv.Itoa(len(h.Edges)) + " edges for " +
			strconv.Itoa(n) + " bins, want " + strconv.Itoa(n+1))
	}
	for i, e := range h.Edges {
		if !finite(e) {
			return errors.New("chart: histogram edge " + strconv.Itoa(i) + " is not finite")
		}
		if i > 0 && !(e > h.Edges[i-1]) {
			return errors.New("chart: histogram edges are not strictly increasing at edge " + strconv.Itoa(i))
		}
	}
	for i, c := range h.Counts {
		if c < 0 {
			return errors.New("chart: histogram count " + strconv.Itoa(i) + " is negative")
		}
	}
	for _, m := range h.Marks {
		if !finite(m.Value) {
			return errors.New("chart: histogram mark " + strconv.Quote(m.Label) + " is not finite")
		}
	}
	for _, b := range h.Bands {
		if !finite(b.Lo) || !finite(b.Hi) || b.Lo > b.Hi {
			return errors.New("chart: histogram band " + strconv.Quote(b.Label) + " is not a finite range Lo ≤ Hi")
		}
	}
	for i, p := range h.Overlay {
		if !finite(p.X) || !finite(p.Y) {
			return errors.New("chart: histogram overlay point " + strconv.Itoa(i) + " is not finite")
		}
	}
	return nil
}

func (h Histogram) describe() string {
	if h.Desc != "" {
		return h.Desc
	}
	total := 0
	for _, c := range h.Counts {
		total += c
	}
	n := len(h.Counts)
	s := "Histogram of " + strconv.Itoa(total) + " values"
	if h.XLabel != "" {
		s += " of " + h.XLabel
	}
	s += " in " + strconv.Itoa(n) + " bins from " + short(h.Edges[0]) + " to " + short(h.Edges[n]) + "."
	for _, b := range h.Bands {
		s += " Shaded " + b.Label + " from " + short(b.Lo) + " to " + short(b.Hi) + "."
	}
	if len(h.Overlay) > 0 {
		s += " Overlaid curve " + h.OverlayLabel + "."
	}
	return s + describeMarks("Line", h.Marks)
}

// Bin counts values in n equal-width bins spanning [min, max] of the values. Bin i holds the values
// v with edges[i] ≤ v < edges[i+1]; the last bin also holds v = edges[n]. If all values are equal
// the bins span value ± 0.5 (± 10 % of it when it is not zero). It returns an error for no values
// or a NaN or infinite value, and panics if n < 1.
func Bin(values []float64, n int) (edges []float64, counts []int, err error) {
	if n < 1 {
		panic("chart: Bin: n must be at least 1")
	}
	if len(values) == 0 {
		return nil, nil, errors.New("chart: Bin: no values")
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for i, v := range values {
		if !finite(v) {
			return nil, nil, errors.New("chart: Bin: value " + strconv.Itoa(i) + " is not finite")
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	lo, hi = widen(lo, hi, false)
	if !finite(hi - lo) {
		return nil, nil, errors.New("chart: Bin: range of values too wide")
	}
	edges = make([]float64, n+1)
	for i := range edges {
		edges[i] = lo + (hi-lo)*float64(i)/float64(n)
	}
	edges[n] = hi
	counts = make([]int, n)
	for _, v := range values {
		i := min(int((v-lo)/(hi-lo)*float64(n)), n-1)
		// Settle rounding at the edges against the edges returned.
		for i > 0 && v < edges[i] {
			i--
		}
		for i < n-1 && v >= edges[i+1] {
			i++
		}
		counts[i]++
	}
	return edges, counts, nil
}
