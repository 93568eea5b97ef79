//go:build js && wasm

package main

import (
	"fmt"
	"strconv"
	"syscall/js"

	"sizebudget/chart"
	"sizebudget/uncertainty"
)

// Chart sizes in SVG units: the documents scale to their box, these fix the proportions and the
// text size relative to the drawing (package chart keeps text ≥ 12 px at 360 px wide).
const (
	chartWidth  = 640
	chartHeight = 340
	curveHeight = 460 // room for up to four legend rows
	// The radius histogram of an analysis has the size of sizebudget analyze -svg, so that the two
	// documents are the same.
	radiiWidth  = 720
	radiiHeight = 480
)

// planCharts draws the charts of a plan: the histogram of the simulated radius estimates with the
// coverage interval, the curve of relative expanded uncertainty against frames per track (log axis)
// with the target and the recommendation, and the budget shares as bars. A chart that cannot be
// drawn is left out with a warning on the console.
func planCharts(p *uncertainty.PlanResult) map[string]string {
	out := map[string]string{}
	add := func(name string, svg string, err error) {
		if err != nil {
			js.Global().Get("console").Call("warn", "sizebudget: chart "+name+": "+err.Error())
			return
		}
		out[name] = svg
	}
	pct := fmt.Sprintf("%g %%", 100*p.Coverage)

	h := chart.Histogram{
		Title:  "Simulated radius estimates",
		XLabel: "radius (nm)",
		YLabel: "trials",
		Edges:  p.Histogram.EdgesNM,
		Counts: p.Histogram.Counts,
		Marks:  []chart.Mark{{Value: p.RadiusNM, Label: fmt.Sprintf("nominal %.4g nm", p.RadiusNM)}},
		Bands: []chart.Band{{Lo: p.IntervalNM[0], Hi: p.IntervalNM[1],
			Label: fmt.Sprintf("%s interval %.4g–%.4g nm", pct, p.IntervalNM[0], p.IntervalNM[1])}},
	}
	svg, err := h.SVG(chartWidth, chartHeight)
	add("histogram", svg, err)

	if len(p.Curve) > 0 {
		pts := make([]chart.Point, len(p.Curve))
		for i, c := range p.Curve {
			pts[i] = chart.Point{X: float64(c.Frames), Y: 100 * c.RelExpanded}
		}
		c := chart.Curve{
			Title:  "Expanded uncertainty against track length",
			XLabel: "frames per track (log scale)",
			YLabel: "U/r (%)",
			LogX:   true,
			Series: []chart.Series{{Name: fmt.Sprintf("U/r at %d tracks (GUM model)", p.Scenario.Tracks), Points: pts}},
		}
		if p.TargetRelU > 0 {
			c.HLines = []chart.Mark{{Value: 100 * p.TargetRelU, Label: fmt.Sprintf("target %.3g %%", 100*p.TargetRelU)}}
		}
		c.VLines = []chart.Mark{{Value: float64(p.Scenario.Frames), Label: fmt.Sprintf("set: %d frames", p.Scenario.Frames)}}
		if p.RecommendedMinFrames != nil {
			c.VLines = append(c.VLines, chart.Mark{Value: float64(*p.RecommendedMinFrames), Label: fmt.Sprintf("recommended: %d frames", *p.RecommendedMinFrames)})
		}
		svg, err := c.SVG(chartWidth, curveHeight)
		add("curve", svg, err)
	}

	if len(p.Budget) > 0 {
		svg, err := budgetBars(p)
		add("budget", svg, err)
	}
	return out
}

// budgetBars draws the budget shares of a plan as bars.
func budgetBars(p *uncertainty.PlanResult) (string, error) {
	b := chart.Bars{Title: "Share of the variance", Unit: "%", Format: "%.1f"}
	for _, s := range p.Budget {
		b.Labels = append(b.Labels, s.Source)
		b.Values = append(b.Values, 100*s.Share)
	}
	return b.SVG(chartWidth)
}

// analysisCharts draws the charts of an analysis of recorded tracks: "radii", the histogram of the
// per-track radii with the monodisperse reference overlaid, the pooled radius marked and its
// coverage interval shaded (the same document as sizebudget analyze -svg), and "budget", the budget
// shares as bars. A chart that cannot be drawn is left out with a warning on the console.
func analysisCharts(a *uncertainty.Analysis) map[string]string {
	out := map[string]string{}
	add := func(name string, svg string, err error) {
		if err != nil {
			js.Global().Get("console").Call("warn", "sizebudget: chart "+name+": "+err.Error())
			return
		}
		out[name] = svg
	}
	g4 := func(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }
	g6 := func(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }
	rd := a.Radii
	over := make([]chart.Point, len(rd.Monodisperse))
	for i, m := range rd.Monodisperse {
		over[i] = chart.Point{X: (rd.EdgesNM[i] + rd.EdgesNM[i+1]) / 2, Y: m}
	}
	outside := rd.Below + rd.Above + rd.NonPositive
	title := fmt.Sprintf("Radii of %d single tracks", a.TracksUsed)
	if outside > 0 {
		title += fmt.Sprintf(" (%d outside the axis)", outside)
	}
	h := chart.Histogram{
		Title:        title,
		XLabel:       "hydrodynamic radius of one track (nm)",
		YLabel:       "tracks",
		Edges:        rd.EdgesNM,
		Counts:       rd.Counts,
		Overlay:      over,
		OverlayLabel: "a monodisperse sample, same track lengths and noise",
		Marks:        []chart.Mark{{Value: a.RadiusNM, Label: "pooled radius " + g4(a.RadiusNM) + " nm"}},
		Bands:        []chart.Band{{Lo: a.IntervalNM[0], Hi: a.IntervalNM[1], Label: g6(100*a.Coverage) + " % coverage interval of the radius"}},
	}
	svg, err := h.SVG(radiiWidth, radiiHeight)
	add("radii", svg, err)
	if a.Plan != nil && len(a.Plan.Budget) > 0 {
		svg, err := budgetBars(a.Plan)
		add("budget", svg, err)
	}
	return out
}
