package chart

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Bars is a horizontal bar chart of non-negative values, one labelled bar per row, longest bar
// scaled to the width available; each bar is followed by its value printed with Format and Unit
// (e.g. the shares of an uncertainty budget in %).
type Bars struct {
	Title  string
	Desc   string // description for screen readers; generated from the data when empty
	Labels []string
	Values []float64 // ≥ 0, one per label
	Unit   string    // printed after each value, e.g. "%"; may be empty
	Format string    // fmt verb for one float64, e.g. "%.1f"; "%.3g" when empty
}

// SVG draws the chart as a standalone SVG document with a viewBox width units wide (in [240, 4000])
// and as tall as the rows need. Labels longer than half the width are shortened with "…" on the
// chart; each bar carries its full label and value in a <title> element. It returns an error for
// bad data: no bars, mismatched lengths, NaN, infinite or negative values, too many bars.
func (b Bars) SVG(width int) (string, error) {
	n := len(b.Values)
	if n == 0 {
		return "", errors.New("chart: bar chart has no bars")
	}
	if len(b.Labels) != n {
		return "", errors.New("chart: bar chart has " + strconv.Itoa(len(b.Labels)) + " labels for " +
			strconv.Itoa(n) + " values")
	}
	vmax := 0.0
	for i, v := range b.Values {
		if !finite(v) || v < 0 {
			return "", errors.New("chart: bar " + strconv.Quote(b.Labels[i]) + " value is not finite and ≥ 0")
		}
		vmax = math.Max(vmax, v)
	}
	fs := fontSize(width)
	top := 0.5 * fs
	if b.Title != "" {
		top = 2.4 * fs
	}
	const row, bar = 2.0, 1.3 // row pitch and bar height, in font sizes
	height := int(math.Ceil(top + (float64(n)*row+0.5)*fs))
	if err := checkSize(width, max(height, minHeight)); err != nil {
		return "", err
	}
	height = max(height, minHeight)

	format := b.Format
	if format == "" {
		format = "%.3g"
	}
	values := make([]string, n)
	labelW, valueW := 0.0, 0.0
	for i, v := range b.Values {
		values[i] = fmt.Sprintf(format, v)
		if strings.Contains(values[i], "%!") {
			return "", errors.New("chart: bar chart Format " + strconv.Quote(format) + " is not a verb for one float64")
		}
		if b.Unit != "" {
			values[i] += " " + b.Unit
		}
		labelW = math.Max(labelW, textWidth(b.Labels[i], fs))
		valueW = math.Max(valueW, textWidth(values[i], fs))
	}
	labelW = math.Min(labelW, 0.5*float64(width))
	x0 := labelW + fs                               // left end of the bars
	length := float64(width) - x0 - valueW - 0.9*fs // longest bar
	if length < 2*fs {
		return "", errors.New("chart: width " + strconv.Itoa(width) + " leaves no room for the bars")
	}

	w := newWriter(width, height, b.Title, "Bar chart", b.describe(values))
	w.open("g", "class", "bars", "fill", colourBar)
	for i, v := range b.Values {
		y := top + float64(i)*row*fs
		l := 0.0
		if vmax > 0 {
			l = v / vmax * length
		}
		w.open("rect", "x", num(x0), "y", num(y+(row-bar)/2*fs), "width", num(l), "height", num(bar*fs))
		w.element("title", b.Labels[i]+": "+values[i])
		w.close("rect")
	}
	w.close("g")
	w.open("g", "class", "labels")
	for i := range b.Values {
		y := top + (float64(i)*row+row/2+0.35)*fs
		w.text(x0-0.5*fs, y, truncate(b.Labels[i], labelW, fs), "text-anchor", "end")
		l := 0.0
		if vmax > 0 {
			l = b.Values[i] / vmax * length
		}
		w.text(x0+l+0.4*fs, y, values[i])
	}
	w.close("g")
	w.line(x0, top, x0, top+float64(n)*row*fs, "stroke", colourAxis)
	return w.String(), nil
}

// truncate shortens s with "…" to fit in width at font size fs.
func truncate(s string, width, fs float64) string {
	if textWidth(s, fs) <= width {
		return s
	}
	r := []rune(s)
	keep := max(int(width/(charWidth*fs))-1, 1)
	return string(r[:min(keep, len(r))]) + "…"
}

func (b Bars) describe(values []string) string {
	if b.Desc != "" {
		return b.Desc
	}
	s := "Bar chart of " + strconv.Itoa(len(values)) + " values."
	for i, v := range values {
		s += " " + b.Labels[i] + ": " + v + "."
	}
	return s
}
