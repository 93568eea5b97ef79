package chart

import (
	"errors"
	"math"
	"strconv"
	"strings"
)

// Mark is a labelled reference value: a vertical line on a histogram or curve (an interval end, the
// nominal size, a recommended setting) or a horizontal line on a curve (a target). An empty Label
// draws the line without a legend entry.
type Mark struct {
	Value float64
	Label string
}

// Band is a labelled, shaded x range [Lo, Hi], e.g. a coverage interval.
type Band struct {
	Lo, Hi float64
	Label  string
}

// Point is one (x, y) data point in the caller's units.
type Point struct{ X, Y float64 }

// The colours, defined once. Data colours come from the colour-blind-safe set of Okabe & Ito (2008):
// blue, vermillion, bluish green, reddish purple, orange, sky blue.
var (
	seriesColours = []string{"#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9"}
	// markStyles tell reference lines apart by dash pattern as well as colour.
	markStyles = []struct{ colour, dash string }{
		{"#000000", "6 4"}, {"#D55E00", "2 3"}, {"#CC79A7", "8 3 2 3"}, {"#009E73", "4 2"},
	}
)

const (
	colourText    = "#222222"
	colourAxis    = "#555555"
	colourGrid    = "#dddddd"
	colourBin     = "#56B4E9" // sky blue
	colourBinLine = "#0072B2" // blue
	colourBand    = "#E69F00" // orange
	colourOverlay = "#000000"
	colourBar     = "#0072B2"
	fontFamily    = "sans-serif"
	charWidth     = 0.6 // estimated advance of one character, in font sizes
)

// Size limits of the viewBox, in viewBox units.
const (
	minWidth, maxWidth   = 240, 4000
	minHeight, maxHeight = 160, 4000
)

// fontSize returns the font size for a viewBox w units wide: at least 13, and large enough that the
// text is at least 12 px tall when the image is shown 360 px wide (12·w/360).
func fontSize(w int) float64 {
	return math.Max(13, math.Ceil(12*float64(w)/360))
}

func checkSize(width, height int) error {
	if width < minWidth || width > maxWidth {
		return errors.New("chart: width " + strconv.Itoa(width) + " is outside [" +
			strconv.Itoa(minWidth) + ", " + strconv.Itoa(maxWidth) + "]")
	}
	if height < minHeight || height > maxHeight {
		return errors.New("chart: height " + strconv.Itoa(height) + " is outside [" +
			strconv.Itoa(minHeight) + ", " + strconv.Itoa(maxHeight) + "]")
	}
	return nil
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// num formats a coordinate with at most one decimal, never as "-0".
func num(x float64) string {
	r := math.Round(x*10) / 10
	if r == 0 {
		r = 0
	}
	return strconv.FormatFloat(r, 'f', -1, 64)
}

// short formats a data value with four significant digits, for descriptions.
func short(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// escape returns s safe for XML text and attribute values. Characters XML does not allow (control
// characters, lone surrogates, U+FFFE, U+FFFF, invalid UTF-8) become U+FFFD; tabs and line breaks
// become spaces.
func escape(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch {
		case r == '&':
			b.WriteString("&amp;")
		case r == '<':
			b.WriteString("&lt;")
		case r == '>':
			b.WriteString("&gt;")
		case r == '"':
			b.WriteString("&quot;")
		case r == '\'':
			b.WriteString("&#39;")
		case r == '\t' || r == '\n' || r == '\r':
			b.WriteByte(' ')
		case r < 0x20 || r == 0xFFFE || r == 0xFFFF || (r >= 0xD800 && r <= 0xDFFF):
			b.WriteRune('\uFFFD')
		default:
			b.WriteRune(r) // invalid UTF-8 arrives here as U+FFFD already
		}
	}
	return b.String()
}

// textWidth estimates the width of s in viewBox units at font size fs.
func textWidth(s string, fs float64) float64 {
	return float64(len([]rune(s))) * charWidth * fs
}

// writer builds one SVG document. Attributes are given as name, value pairs; values are escaped.
type writer struct {
	b  strings.Builder
	fs float64 // font size
}

// newWriter opens an SVG document of width×height viewBox units with its description. The title is
// drawn at the top; the accessible name is the title, or the fallback when the title is empty.
func newWriter(width, height int, title, fallback, desc string) *writer {
	w := &writer{fs: fontSize(width)}
	name := title
	if name == "" {
		name = fallback
	}
	ws, hs := strconv.Itoa(width), strconv.Itoa(height)
	w.open("svg", "xmlns", "http://www.w3.org/2000/svg", "viewBox", "0 0 "+ws+" "+hs,
		"width", ws, "height", hs, "role", "img", "aria-label", name,
		"font-family", fontFamily, "font-size", num(w.fs), "fill", colourText)
	w.element("title", name)
	w.element("desc", desc)
	w.empty("rect", "width", ws, "height", hs, "fill", "#ffffff")
	if title != "" {
		w.text(float64(width)/2, 1.5*w.fs, title, "text-anchor", "middle", "font-weight", "bold")
	}
	return w
}

func (w *writer) attrs(kv []string) {
	for i := 0; i+1 < len(kv); i += 2 {
		w.b.WriteString(" " + kv[i] + `="` + escape(kv[i+1]) + `"`)
	}
}

// open writes a start tag.
func (w *writer) open(name string, kv ...string) {
	w.b.WriteString("<" + name)
	w.attrs(kv)
	w.b.WriteString(">\n")
}

// close writes an end tag.
func (w *writer) close(name string) { w.b.WriteString("</" + name + ">\n") }

// empty writes an empty element.
func (w *writer) empty(name string, kv ...string) {
	w.b.WriteString("<" + name)
	w.attrs(kv)
	w.b.WriteString("/>\n")
}

// element writes an element holding escaped text.
func (w *writer) element(name, content string, kv ...string) {
	w.b.WriteString("<" + name)
	w.attrs(kv)
	w.b.WriteString(">" + escape(content) + "</" + name + ">\n")
}

// text writes a text element at (x, y).
func (w *writer) text(x, y float64, s string, kv ...string) {
	w.element("text", s, append([]string{"x", num(x), "y", num(y)}, kv...)...)
}

func (w *writer) line(x1, y1, x2, y2 float64, kv ...string) {
	w.empty("line", append([]string{"x1", num(x1), "y1", num(y1), "x2", num(x2), "y2", num(y2)}, kv...)...)
}

func (w *writer) rect(x, y, width, height float64, kv ...string) {
	w.empty("rect", append([]string{"x", num(x), "y", num(y), "width", num(width), "height", num(height)}, kv...)...)
}

func (w *writer) polyline(xs, ys []float64, kv ...string) {
	var p strings.Builder
	for i := range xs {
		if i > 0 {
			p.WriteByte(' ')
		}
		p.WriteString(num(xs[i]) + "," + num(ys[i]))
	}
	w.empty("polyline", append([]string{"points", p.String(), "fill", "none"}, kv...)...)
}

// String closes the document and returns it.
func (w *writer) String() string {
	w.close("svg")
	return w.b.String()
}

// legendEntry is one row of a legend: a swatch drawn in the entry's style and a label.
type legendEntry struct {
	label        string
	colour, dash string // line swatch; dash "" is solid
	fill         string // if set, a filled square swatch instead of a line
	opacity      string // fill-opacity of the square swatch
}

// legend draws one entry per row from (x, y), the top of the first row; each row is 1.4 font sizes.
func (w *writer) legend(x, y float64, entries []legendEntry) {
	if len(entries) == 0 {
		return
	}
	fs := w.fs
	w.open("g", "class", "legend")
	for i, e := range entries {
		mid := y + (float64(i)+0.5)*legendRow*fs
		if e.fill != "" {
			w.rect(x, mid-0.4*fs, 1.6*fs, 0.8*fs, "fill", e.fill, "fill-opacity", e.opacity, "stroke", e.fill)
		} else {
			kv := []string{"stroke", e.colour, "stroke-width", "2"}
			if e.dash != "" {
				kv = append(kv, "stroke-dasharray", e.dash)
			}
			w.line(x, mid, x+1.6*fs, mid, kv...)
		}
		w.text(x+2.1*fs, mid+0.35*fs, e.label)
	}
	w.close("g")
}

// legendRow is the height of one legend row, in font sizes.
const legendRow = 1.4

func countLabels(marks []Mark) int {
	n := 0
	for _, m := range marks {
		if m.Label != "" {
			n++
		}
	}
	return n
}

func describeMarks(kind string, marks []Mark) string {
	var s string
	for _, m := range marks {
		if m.Label != "" {
			s += " " + kind + " " + m.Label + " at " + short(m.Value) + "."
		} else {
			s += " " + kind + " at " + short(m.Value) + "."
		}
	}
	return s
}
