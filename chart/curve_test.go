package chart

import (
	"math"
	"slices"
	"strings"
	"testing"
)

// exampleCurve is an invented scenario: the relative uncertainty of the radius against the number
// of frames per track, for two made-up localisation precisions, with a target and a recommendation.
func exampleCurve() Curve {
	c := Curve{
		Title:  "Uncertainty against track length (invented example)",
		XLabel: "frames per track",
		YLabel: "relative uncertainty (%)",
		LogX:   true,
		HLines: []Mark{{Value: 5, Label: "target 5 %"}},
		VLines: []Mark{{Value: 200, Label: "recommended 200 frames"}},
	}
	for _, s := range []struct {
		name string
		a    float64
	}{{"precision 20 nm", 60}, {"precision 40 nm", 90}} {
		var p []Point
		for _, n := range []float64{10, 20, 50, 100, 200, 500, 1000} {
			p = append(p, Point{n, s.a / math.Sqrt(n)}) // made-up 1/√n fall-off
		}
		c.Series = append(c.Series, Series{Name: s.name, Points: p})
	}
	return c
}

func TestCurveSVG(t *testing.T) {
	c := exampleCurve()
	doc, err := c.SVG(360, 320)
	if err != nil {
		t.Fatal(err)
	}
	root := checkDocument(t, doc, c.Title)
	golden(t, "curve.svg", doc)

	var series []*node
	for _, g := range root.all("g") {
		if g.attr["class"] == "series" {
			series = append(series, g)
		}
	}
	if len(series) != 2 {
		t.Fatalf("%d series groups, want 2", len(series))
	}
	if series[0].attr["stroke"] == series[1].attr["stroke"] {
		t.Error("the two series share a colour")
	}
	for _, g := range series {
		if got := g.count("circle"); got != 7 {
			t.Errorf("%d point markers, want 7", got)
		}
		pts := strings.Fields(g.all("polyline")[0].attr["points"])
		if len(pts) != 7 {
			t.Fatalf("polyline has %d points, want 7", len(pts))
		}
	}
	if got := root.group("hlines").count("line"); got != 1 {
		t.Errorf("%d horizontal lines, want 1", got)
	}
	if got := root.group("vlines").count("line"); got != 1 {
		t.Errorf("%d vertical lines, want 1", got)
	}
	// On the log axis 10 → 100 and 100 → 1000 are the same distance (exact), to coordinate
	// rounding; the markers are at x = 10, 20, 50, 100, 200, 500, 1000.
	cx := func(i int) float64 { return series[0].all("circle")[i].float(t, "cx") }
	if d1, d2 := cx(3)-cx(0), cx(6)-cx(3); math.Abs(d1-d2) > 0.15 {
		t.Errorf("decades are %v and %v wide", d1, d2)
	}
	var ticks []string
	for _, n := range root.group("axes").all("text") {
		ticks = append(ticks, n.text)
	}
	for _, want := range []string{"10", "100", "1000", c.XLabel, c.YLabel} {
		if !slices.Contains(ticks, want) {
			t.Errorf("axes lack %q: %q", want, ticks)
		}
	}
	var legend []string
	for _, n := range root.group("legend").all("text") {
		legend = append(legend, n.text)
	}
	if want := []string{"precision 20 nm", "precision 40 nm", "target 5 %", "recommended 200 frames"}; !slices.Equal(legend, want) {
		t.Errorf("legend %q, want %q", legend, want)
	}
}

func TestCurveLinearManyPoints(t *testing.T) {
	// More than 30 points: a line without markers; a linear x range widened to whole steps.
	var p []Point
	for i := 0; i <= 40; i++ {
		x := 0.3 + float64(i)*0.2
		p = append(p, Point{x, x * x})
	}
	c := Curve{XLabel: "x", Series: []Series{{Points: p}}}
	doc, err := c.SVG(480, 300)
	if err != nil {
		t.Fatal(err)
	}
	root := checkDocument(t, doc, "Curve chart")
	if n := len(root.all("circle")); n != 0 {
		t.Errorf("%d markers on a 41-point series", n)
	}
	for _, e := range root.all("text") {
		if e.attr["font-weight"] == "bold" {
			t.Errorf("untitled chart draws the title %q", e.text)
		}
	}
	if root.group("legend") != nil {
		t.Error("legend drawn for an unnamed series")
	}
	// Widened ranges end on ticks: the first and last x tick marks sit at the ends of the x axis, the
	// last y tick mark at the top of the y axis.
	lines := root.group("axes").all("line")
	xAxis, yAxis := lines[0], lines[1]
	var xTicks, yTicks []*node
	for _, l := range lines[2:] {
		if l.attr["x1"] == l.attr["x2"] {
			xTicks = append(xTicks, l)
		} else {
			yTicks = append(yTicks, l)
		}
	}
	if xTicks[0].attr["x1"] != xAxis.attr["x1"] || xTicks[len(xTicks)-1].attr["x1"] != xAxis.attr["x2"] {
		t.Errorf("x ticks at %s … %s, x axis from %s to %s", xTicks[0].attr["x1"],
			xTicks[len(xTicks)-1].attr["x1"], xAxis.attr["x1"], xAxis.attr["x2"])
	}
	if yTicks[len(yTicks)-1].attr["y1"] != yAxis.attr["y1"] || yTicks[0].attr["y1"] != yAxis.attr["y2"] {
		t.Errorf("y ticks at %s … %s, y axis from %s to %s", yTicks[0].attr["y1"],
			yTicks[len(yTicks)-1].attr["y1"], yAxis.attr["y2"], yAxis.attr["y1"])
	}
}

func TestCurveEscapes(t *testing.T) {
	c := Curve{Title: hostile, XLabel: hostile, YLabel: hostile,
		Series: []Series{{Name: hostile, Points: []Point{{0, 0}, {1, 1}}}}}
	doc, err := c.SVG(360, 260)
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
	if n != 4 { // title, x label, y label, legend
		t.Errorf("%d texts read back as the label, want 4", n)
	}
}

func TestCurveErrors(t *testing.T) {
	nan := math.NaN()
	good := []Point{{1, 1}, {2, 3}}
	for name, c := range map[string]Curve{
		"no series":      {},
		"no points":      {Series: []Series{{Name: "a"}}},
		"NaN x":          {Series: []Series{{Points: []Point{{nan, 1}}}}},
		"Inf y":          {Series: []Series{{Points: []Point{{1, math.Inf(-1)}}}}},
		"zero x on log":  {LogX: true, Series: []Series{{Points: []Point{{0, 1}, {2, 3}}}}},
		"negative x log": {LogX: true, Series: []Series{{Points: []Point{{-1, 1}}}}},
		"NaN hline":      {Series: []Series{{Points: good}}, HLines: []Mark{{nan, "t"}}},
		"Inf vline":      {Series: []Series{{Points: good}}, VLines: []Mark{{math.Inf(1), "v"}}},
		"vline 0 on log": {LogX: true, Series: []Series{{Points: good}}, VLines: []Mark{{0, "v"}}},
		"too wide":       {Series: []Series{{Points: []Point{{0, -math.MaxFloat64}, {1, math.MaxFloat64}}}}},
	} {
		if _, err := c.SVG(360, 240); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	ok := Curve{Series: []Series{{Points: good}}}
	if _, err := ok.SVG(360, 240); err != nil {
		t.Errorf("valid curve: %v", err)
	}
	if _, err := ok.SVG(360, 100); err == nil {
		t.Error("no error for height 100")
	}
	// A single point (zero-width ranges) still draws.
	one := Curve{LogX: true, Series: []Series{{Points: []Point{{5, 5}}}}}
	if doc, err := one.SVG(360, 240); err != nil {
		t.Errorf("single point: %v", err)
	} else {
		checkDocument(t, doc, "Curve chart")
	}
}
