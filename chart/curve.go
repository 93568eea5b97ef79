package chart

import (
	"errors"
	"math"
	"strconv"
)

// Series is one named line of a Curve chart. An empty Name draws the line without a legend entry.
type Series struct {
	Name   string
	Points []Point
}

// Curve is an x–y line chart of one or more series with optional horizontal lines (e.g. a target)
// and vertical lines (e.g. a recommended setting). Values are in the caller's units, named in the
// axis labels.
type Curve struct {
	Title  string
	XLabel string // x axis label, with its unit
	YLabel string // y axis label, with its unit
	Desc   string // description for screen readers; generated from the data when empty
	LogX   bool   // log10 x axis; then every x and VLines value must be > 0

	Series []Series
	HLines []Mark // horizontal lines at y = Value
	VLines []Mark // vertical lines at x = Value
}

// maxMarkers is the largest series that also gets a dot at each point.
const maxMarkers = 30

// SVG draws the chart as a standalone SVG document with a viewBox of width×height units (width in
// [240, 4000], height in [160, 4000]). Both ranges cover all points and lines; a linear range is
// widened to whole tick steps, a log range is not. Series are drawn in the order given, in the
// order of the palette; series of at most 30 points also get a dot at each point. It returns an
// error for bad data: no series, a series without points, NaN or infinite values, or a value ≤ 0 on
// a log axis.
func (c Curve) SVG(width, height int) (string, error) {
	if err := checkSize(width, height); err != nil {
		return "", err
	}
	if err := c.check(); err != nil {
		return "", err
	}
	xlo, xhi := math.Inf(1), math.Inf(-1)
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for _, s := range c.Series {
		for _, p := range s.Points {
			xlo, xhi = math.Min(xlo, p.X), math.Max(xhi, p.X)
			ylo, yhi = math.Min(ylo, p.Y), math.Max(yhi, p.Y)
		}
	}
	for _, m := range c.VLines {
		xlo, xhi = math.Min(xlo, m.Value), math.Max(xhi, m.Value)
	}
	for _, m := range c.HLines {
		ylo, yhi = math.Min(ylo, m.Value), math.Max(yhi, m.Value)
	}
	rows := countLabels(c.HLines) + countLabels(c.VLines)
	for _, s := range c.Series {
		if s.Name != "" {
			rows++
		}
	}
	f, err := newFrame(width, height, c.Title != "",
		axisSpec{lo: xlo, hi: xhi, log: c.LogX, expand: !c.LogX, label: c.XLabel},
		axisSpec{lo: ylo, hi: yhi, expand: true, label: c.YLabel}, rows)
	if err != nil {
		return "", err
	}

	w := newWriter(width, height, c.Title, "Curve chart", c.describe())
	f.grid(w)
	var legend []legendEntry
	for i, s := range c.Series {
		colour := seriesColours[i%len(seriesColours)]
		w.open("g", "class", "series", "stroke", colour, "fill", colour)
		xs, ys := make([]float64, len(s.Points)), make([]float64, len(s.Points))
		for j, p := range s.Points {
			xs[j], ys[j] = f.x.at(p.X), f.y.at(p.Y)
		}
		w.polyline(xs, ys, "stroke-width", "2")
		if len(s.Points) <= maxMarkers {
			for j := range xs {
				w.empty("circle", "cx", num(xs[j]), "cy", num(ys[j]), "r", "3")
			}
		}
		w.close("g")
		if s.Name != "" {
			legend = append(legend, legendEntry{label: s.Name, colour: colour})
		}
	}
	legend = append(legend, f.markLines(w, c.HLines, false, 0)...)
	legend = append(legend, f.markLines(w, c.VLines, true, len(c.HLines))...)
	f.axes(w)
	w.legend(f.x0, f.legendY, legend)
	return w.String(), nil
}

func (c Curve) check() error {
	if len(c.Series) == 0 {
		return errors.New("chart: curve has no series")
	}
	for i, s := range c.Series {
		name := "curve series " + strconv.Itoa(i) + " " + strconv.Quote(s.Name)
		if len(s.Points) == 0 {
			return errors.New("chart: " + name + " has no points")
		}
		for j, p := range s.Points {
			if !finite(p.X) || !finite(p.Y) {
				return errors.New("chart: " + name + " point " + strconv.Itoa(j) + " is not finite")
			}
			if c.LogX && !(p.X > 0) {
				return errors.New("chart: " + name + " point " + strconv.Itoa(j) + " has x ≤ 0 on a log axis")
			}
		}
	}
	for _, m := range c.HLines {
		if !finite(m.Value) {
			return errors.New("chart: curve line " + strconv.Quote(m.Label) + " is not finite")
		}
	}
	for _, m := range c.VLines {
		if !finite(m.Value) {
			return errors.New("chart: curve line " + strconv.Quote(m.Label) + " is not finite")
		}
		if c.LogX && !(m.Value > 0) {
			return errors.New("chart: curve line " + strconv.Quote(m.Label) + " is ≤ 0 on a log axis")
		}
	}
	return nil
}

func (c Curve) describe() string {
	if c.Desc != "" {
		return c.Desc
	}
	s := "Line chart of " + strconv.Itoa(len(c.Series)) + " series"
	if c.XLabel != "" || c.YLabel != "" {
		s += ", " + c.YLabel + " against " + c.XLabel
	}
	if c.LogX {
		s += " on a logarithmic x axis"
	}
	s += "."
	for i, sr := range c.Series {
		p, name := sr.Points, sr.Name
		if name == "" {
			name = "Series " + strconv.Itoa(i+1)
		}
		s += " " + name + ": " + strconv.Itoa(len(p)) + " points from (" + short(p[0].X) + ", " +
			short(p[0].Y) + ") to (" + short(p[len(p)-1].X) + ", " + short(p[len(p)-1].Y) + ")."
	}
	return s + describeMarks("Horizontal line", c.HLines) + describeMarks("Vertical line", c.VLines)
}
