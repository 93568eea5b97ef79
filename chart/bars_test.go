package chart

import (
	"math"
	"slices"
	"strings"
	"testing"
)

// exampleBars is an invented uncertainty budget: shares of the variance of a radius estimate.
func exampleBars() Bars {
	return Bars{
		Title:  "Uncertainty budget (invented example)",
		Labels: []string{"track length", "localisation precision", "temperature", "viscosity", "frame interval"},
		Values: []float64{52.4, 30.1, 9.8, 7.2, 0.5},
		Unit:   "%",
		Format: "%.1f",
	}
}

func TestBarsSVG(t *testing.T) {
	b := exampleBars()
	doc, err := b.SVG(360)
	if err != nil {
		t.Fatal(err)
	}
	root := checkDocument(t, doc, b.Title)
	golden(t, "bars.svg", doc)

	rects := root.group("bars").all("rect")
	if len(rects) != len(b.Values) {
		t.Fatalf("%d bars, want %d", len(rects), len(b.Values))
	}
	// Widths in proportion to the values (to the 0.1 unit rounding of coordinates); each bar names
	// its label and printed value in a <title>.
	perUnit := rects[0].float(t, "width") / b.Values[0]
	for i, r := range rects {
		if want := b.Values[i] * perUnit; math.Abs(r.float(t, "width")-want) > 0.1 {
			t.Errorf("bar %d width %v, want %v", i, r.float(t, "width"), want)
		}
		if r.float(t, "x") != rects[0].float(t, "x") {
			t.Errorf("bar %d starts at %v", i, r.float(t, "x"))
		}
		if len(r.kids) != 1 || r.kids[0].name.Local != "title" {
			t.Fatalf("bar %d has no <title>", i)
		}
	}
	if got := rects[1].kids[0].text; got != "localisation precision: 30.1 %" {
		t.Errorf("bar title %q", got)
	}
	var texts []string
	for _, n := range root.group("labels").all("text") {
		texts = append(texts, n.text)
	}
	for _, want := range []string{"track length", "52.4 %", "0.5 %", "frame interval"} {
		if !slices.Contains(texts, want) {
			t.Errorf("labels lack %q: %q", want, texts)
		}
	}
	// The longest bar and its value fit in the image.
	end := rects[0].float(t, "x") + rects[0].float(t, "width") + textWidth("52.4 %", fontSize(360))
	if end > 360 {
		t.Errorf("first value ends at %v, beyond 360", end)
	}
}

func TestBarsDefaultsAndTruncation(t *testing.T) {
	long := strings.Repeat("very long label ", 6)
	b := Bars{Labels: []string{long, "b"}, Values: []float64{2.0 / 3, 0}}
	doc, err := b.SVG(360)
	if err != nil {
		t.Fatal(err)
	}
	root := checkDocument(t, doc, "Bar chart")
	var texts []string
	for _, n := range root.group("labels").all("text") {
		texts = append(texts, n.text)
	}
	// "%.3g" is the default format; no unit.
	if !slices.Contains(texts, "0.667") || !slices.Contains(texts, "0") {
		t.Errorf("values not printed with %%.3g: %q", texts)
	}
	if !strings.HasSuffix(texts[0], "…") || len([]rune(texts[0])) >= len(long) {
		t.Errorf("long label not shortened: %q", texts[0])
	}
	if got := root.group("bars").all("title")[0].text; got != long+": 0.667" {
		t.Errorf("full label missing from the bar title: %q", got)
	}
	if w := root.group("bars").all("rect")[1].float(t, "width"); w != 0 {
		t.Errorf("zero value drawn %v wide", w)
	}
}

func TestBarsEscapes(t *testing.T) {
	b := Bars{Title: hostile, Labels: []string{hostile}, Values: []float64{1}, Unit: hostile}
	doc, err := b.SVG(360)
	if err != nil {
		t.Fatal(err)
	}
	root := checkDocument(t, doc, hostileParsed)
	if got := root.group("bars").all("title")[0].text; got != hostileParsed+": 1 "+hostileParsed {
		t.Errorf("bar title read back as %q", got)
	}
}

func TestBarsErrors(t *testing.T) {
	for name, b := range map[string]Bars{
		"no bars":    {},
		"mismatch":   {Labels: []string{"a"}, Values: []float64{1, 2}},
		"NaN":        {Labels: []string{"a"}, Values: []float64{math.NaN()}},
		"Inf":        {Labels: []string{"a"}, Values: []float64{math.Inf(1)}},
		"negative":   {Labels: []string{"a", "b"}, Values: []float64{1, -1}},
		"too many":   {Labels: make([]string, 200), Values: make([]float64, 200)},
		"value wide": {Labels: []string{"a"}, Values: []float64{1}, Unit: strings.Repeat("u", 60)},
		"bad format": {Labels: []string{"a"}, Values: []float64{1}, Format: "%d"},
		"two verbs":  {Labels: []string{"a"}, Values: []float64{1}, Format: "%.1f%.1f"},
	} {
		if _, err := b.SVG(360); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if _, err := exampleBars().SVG(200); err == nil {
		t.Error("no error for width 200")
	}
}

func TestTruncate(t *testing.T) {
	// At font size 10 a character is estimated 6 units wide: 60 units hold 10 characters.
	if got := truncate("0123456789", 60, 10); got != "0123456789" {
		t.Errorf("fitting label changed to %q", got)
	}
	if got := truncate("0123456789A", 60, 10); got != "012345678…" {
		t.Errorf("truncate = %q, want 012345678…", got)
	}
}
