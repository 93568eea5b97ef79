package chart

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// exampleHistogram is an invented scenario: hydrodynamic radii estimated from 60 simulated tracks of
// a sample whose nominal radius is 100 nm, with a coverage interval and the expected counts.
func exampleHistogram() Histogram {
	h := Histogram{
		Title:        "Radius from 60 tracks (invented example)",
		XLabel:       "hydrodynamic radius (nm)",
		Edges:        []float64{70, 80, 90, 100, 110, 120, 130, 140},
		Counts:       []int{2, 6, 15, 18, 11, 6, 2},
		Marks:        []Mark{{Value: 100, Label: "nominal 100 nm"}, {Value: 84.5}, {Value: 121.5}},
		Bands:        []Band{{Lo: 84.5, Hi: 121.5, Label: "95 % coverage interval"}},
		OverlayLabel: "expected counts",
	}
	for x := 70.0; x <= 140; x += 5 {
		// A Gaussian of mean 101 and standard deviation 13 scaled to 60 tracks in 10 nm bins.
		h.Overlay = append(h.Overlay, Point{x, 60 * 10 / (13 * math.Sqrt(2*math.Pi)) *
			math.Exp(-0.5*math.Pow((x-101)/13, 2))})
	}
	return h
}

func TestHistogramSVG(t *testing.T) {
	h := exampleHistogram()
	doc, err := h.SVG(360, 300)
	if err != nil {
		t.Fatal(err)
	}
	root := checkDocument(t, doc, h.Title)
	golden(t, "histogram.svg", doc)

	bins := root.group("bins")
	if got := bins.count("rect"); got != len(h.Counts) {
		t.Fatalf("%d bin rects, want %d", got, len(h.Counts))
	}
	// Bins touch, share one baseline, and their heights are proportional to the counts (to the
	// 0.1 unit rounding of the coordinates, hence 0.15 after a difference).
	r := bins.all("rect")
	base := r[0].float(t, "y") + r[0].float(t, "height")
	perCount := r[3].float(t, "height") / 18
	for i, b := range r {
		if i > 0 {
			prevEnd := r[i-1].float(t, "x") + r[i-1].float(t, "width")
			if math.Abs(b.float(t, "x")-prevEnd) > 0.15 {
				t.Errorf("bin %d starts at %v, bin %d ends at %v", i, b.float(t, "x"), i-1, prevEnd)
			}
		}
		if y := b.float(t, "y") + b.float(t, "height"); math.Abs(y-base) > 0.15 {
			t.Errorf("bin %d base at %v, want %v", i, y, base)
		}
		if want := float64(h.Counts[i]) * perCount; math.Abs(b.float(t, "height")-want) > 0.15*float64(h.Counts[i]) {
			t.Errorf("bin %d height %v, want %v", i, b.float(t, "height"), want)
		}
	}
	if got := root.group("bands").count("rect"); got != 1 {
		t.Errorf("%d band rects, want 1", got)
	}
	if got := root.group("vlines").count("line"); got != 3 {
		t.Errorf("%d mark lines, want 3", got)
	}
	if got := len(root.all("polyline")); got != 1 {
		t.Errorf("%d overlay polylines, want 1", got)
	}
	// Legend: the band, the overlay and the one labelled mark.
	var legend []string
	for _, n := range root.group("legend").all("text") {
		legend = append(legend, n.text)
	}
	if want := []string{"95 % coverage interval", "expected counts", "nominal 100 nm"}; !slices.Equal(legend, want) {
		t.Errorf("legend %q, want %q", legend, want)
	}
	if d := root.kids[1].text; !strings.Contains(d, "60 values of hydrodynamic radius (nm) in 7 bins from 70 to 140.") {
		t.Errorf("desc %q does not summarise the data", d)
	}
}

func TestHistogramEscapes(t *testing.T) {
	h := Histogram{Title: hostile, XLabel: hostile, Edges: []float64{0, 1}, Counts: []int{3},
		Marks: []Mark{{0.5, hostile}}}
	doc, err := h.SVG(360, 240)
	if err != nil {
		t.Fatal(err)
	}
	root := checkDocument(t, doc, hostileParsed)
	n := 0
	for _, e := range root.all("text") {
		if e.text == hostileParsed {
			n++
		}
	}
	if n != 3 { // title, x label, legend
		t.Errorf("%d texts read back as the label, want 3", n)
	}
}

func TestHistogramZeroCounts(t *testing.T) {
	// All counts zero still draws: the y axis runs to 1.
	h := Histogram{Edges: []float64{0, 1, 2}, Counts: []int{0, 0}}
	doc, err := h.SVG(360, 240)
	if err != nil {
		t.Fatal(err)
	}
	root := checkDocument(t, doc, "Histogram")
	for _, r := range root.group("bins").all("rect") {
		if r.float(t, "height") != 0 {
			t.Errorf("empty bin drawn %v tall", r.float(t, "height"))
		}
	}
}

func TestHistogramErrors(t *testing.T) {
	ok := Histogram{Edges: []float64{0, 1, 2}, Counts: []int{1, 2}}
	nan, inf := math.NaN(), math.Inf(1)
	for name, mod := range map[string]func(*Histogram){
		"no bins":         func(h *Histogram) { h.Edges, h.Counts = []float64{0}, nil },
		"too few edges":   func(h *Histogram) { h.Edges = h.Edges[:2] },
		"too many edges":  func(h *Histogram) { h.Edges = append(h.Edges, 3) },
		"NaN edge":        func(h *Histogram) { h.Edges[1] = nan },
		"Inf edge":        func(h *Histogram) { h.Edges[2] = inf },
		"equal edges":     func(h *Histogram) { h.Edges[1] = 0 },
		"decreasing":      func(h *Histogram) { h.Edges = []float64{2, 1, 0} },
		"negative count":  func(h *Histogram) { h.Counts[0] = -1 },
		"NaN mark":        func(h *Histogram) { h.Marks = []Mark{{nan, "m"}} },
		"Inf band":        func(h *Histogram) { h.Bands = []Band{{0, inf, "b"}} },
		"reversed band":   func(h *Histogram) { h.Bands = []Band{{2, 1, "b"}} },
		"NaN overlay":     func(h *Histogram) { h.Overlay = []Point{{1, nan}} },
		"narrow":          func(h *Histogram) {},
		"too many legend": func(h *Histogram) { h.Marks = slices.Repeat([]Mark{{1, "m"}}, 12) },
		"too wide":        func(h *Histogram) { h.Edges = []float64{-math.MaxFloat64, 0, math.MaxFloat64} },
	} {
		h := ok
		h.Edges, h.Counts = slices.Clone(ok.Edges), slices.Clone(ok.Counts)
		mod(&h)
		width := 360
		if name == "narrow" {
			width = 100
		}
		if _, err := h.SVG(width, 240); err == nil {
			t.Errorf("%s: no error", name)
		} else if !strings.HasPrefix(err.Error(), "chart: ") {
			t.Errorf("%s: error %q lacks the package prefix", name, err)
		}
	}
	if _, err := ok.SVG(360, 240); err != nil {
		t.Errorf("valid histogram: %v", err)
	}
}

func TestBin(t *testing.T) {
	tenths := make([]float64, 11)
	for i := range tenths {
		tenths[i] = float64(i) / 10
	}
	for _, c := range []struct {
		name   string
		values []float64
		n      int
		edges  []float64
		counts []int
	}{
		// Range [0, 4] in two bins [0, 2) and [2, 4]: 2 lies in the second, 4 in the last.
		{"halves", []float64{4, 0, 1, 2, 3}, 2, []float64{0, 2, 4}, []int{2, 3}},
		// Every value on an edge: one per bin, the last bin holds 0.9 and 1.0.
		{"edges", tenths, 10, tenths, []int{1, 1, 1, 1, 1, 1, 1, 1, 1, 2}},
		{"one bin", []float64{-3, 7, 2}, 1, []float64{-3, 7}, []int{3}},
		// Equal values: ± 10 % around the value.
		{"equal", []float64{-5, -5}, 1, []float64{-5.5, -4.5}, []int{2}},
		{"zero", []float64{0}, 2, []float64{-0.5, 0, 0.5}, []int{0, 1}},
		// Span 6 in 3 bins: edges 1, 3, 5, 7.
		{"thirds", []float64{1, 2.999, 3, 4.5, 5, 6.5, 7, 7}, 3, []float64{1, 3, 5, 7}, []int{2, 2, 4}},
	} {
		edges, counts, err := Bin(c.values, c.n)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if !slices.Equal(edges, c.edges) || !slices.Equal(counts, c.counts) {
			t.Errorf("%s: Bin = %v %v, want %v %v", c.name, edges, counts, c.edges, c.counts)
		}
	}
}

func TestBinAgreesWithEdges(t *testing.T) {
	// Each value is counted in the bin whose returned edges hold it, checked by a direct search.
	rng := rand.New(rand.NewPCG(1, 2))
	values := make([]float64, 2000)
	for i := range values {
		values[i] = math.Round(rng.NormFloat64()*1000) / 300 // many values fall on or near edges
	}
	for _, n := range []int{1, 3, 7, 30, 128} {
		edges, counts, err := Bin(values, n)
		if err != nil {
			t.Fatal(err)
		}
		want := make([]int, n)
		for _, v := range values {
			for i := 0; i < n; i++ {
				if v >= edges[i] && (v < edges[i+1] || i == n-1 && v == edges[n]) {
					want[i]++
					break
				}
			}
		}
		if !slices.Equal(counts, want) {
			t.Errorf("n = %d: counts %v, direct search %v", n, counts, want)
		}
		if edges[0] != slices.Min(values) || edges[n] != slices.Max(values) {
			t.Errorf("n = %d: edges span [%v, %v], values [%v, %v]", n, edges[0], edges[n], slices.Min(values), slices.Max(values))
		}
	}
}

func TestBinErrors(t *testing.T) {
	for name, v := range map[string][]float64{
		"empty": nil, "NaN": {1, math.NaN()}, "+Inf": {math.Inf(1)}, "-Inf": {0, math.Inf(-1)},
		"too wide": {-math.MaxFloat64, math.MaxFloat64},
	} {
		if _, _, err := Bin(v, 3); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	defer func() {
		if r := recover(); r != "chart: Bin: n must be at least 1" {
			t.Errorf("Bin(n = 0) recovered %v", r)
		}
	}()
	Bin([]float64{1}, 0)
}
