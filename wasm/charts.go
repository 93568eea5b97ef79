//go:build js && wasm

package main

import (
	"fmt"
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
		b := chart.Bars{Title: "Share of the variance", Unit: "%", Format: "%.1f"}
		for _, s := range p.Budget {
			b.Labels = append(b.Labels, s.Source)
			b.Values = append(b.Values, 100*s.Share)
		}
		svg, err := b.SVG(chartWidth)
		add("budget", svg, err)
	}
	return out
}
