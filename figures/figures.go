package figures

import (
	"errors"
	"fmt"
	"strconv"

	"sizebudget/chart"
	"sizebudget/uncertainty"
)

// Width and Height are the proportions of every chart in SVG units; the documents scale to their box
// (package chart keeps text at least 12 px when drawn 360 px wide).
const (
	Width  = 720
	Height = 480
)

func g(x float64, digits int) string { return strconv.FormatFloat(x, 'g', digits, 64) }

// PlanHistogram draws the histogram of a plan's Monte Carlo radius values, with the probabilistically
// symmetric coverage interval shaded and the nominal radius and the GUM interval marked.
func PlanHistogram(p *uncertainty.PlanResult) (string, error) {
	h := chart.Histogram{
		Title:  fmt.Sprintf("Monte Carlo distribution of the radius (%d trials)", p.MonteCarlo.Trials),
		XLabel: "hydrodynamic radius (nm)",
		YLabel: "trials",
		Edges:  p.Histogram.EdgesNM,
		Counts: p.Histogram.Counts,
		Bands: []chart.Band{{Lo: p.IntervalNM[0], Hi: p.IntervalNM[1],
			Label: fmt.Sprintf("%s %% coverage interval %s–%s nm (Monte Carlo)", g(100*p.Coverage, 6), g(p.IntervalNM[0], 4), g(p.IntervalNM[1], 4))}},
		Marks: []chart.Mark{
			{Value: p.RadiusNM, Label: "nominal radius " + g(p.RadiusNM, 4) + " nm"},
			{Value: p.GUM.IntervalNM[0], Label: "GUM interval"},
			{Value: p.GUM.IntervalNM[1]},
		},
	}
	return h.SVG(Width, Height)
}

// PlanCurve draws the analytic relative expanded uncertainty against frames per track (log axis),
// with the target and the planned and recommended numbers of frames.
func PlanCurve(p *uncertainty.PlanResult) (string, error) {
	if len(p.Curve) == 0 {
		return "", errors.New("no frames curve: the planner did not run (the scenario gives recorded track lengths)")
	}
	pts := make([]chart.Point, len(p.Curve))
	for i, c := range p.Curve {
		pts[i] = chart.Point{X: float64(c.Frames), Y: 100 * c.RelExpanded}
	}
	c := chart.Curve{
		Title:  fmt.Sprintf("Relative expanded uncertainty with %d tracks", p.Scenario.Tracks),
		XLabel: "positions per track (log scale)",
		YLabel: "U/r (%)",
		LogX:   true,
		Series: []chart.Series{{Name: "U/r (GUM model)", Points: pts}},
		VLines: []chart.Mark{{Value: float64(p.Scenario.Frames), Label: fmt.Sprintf("set: %d frames", p.Scenario.Frames)}},
	}
	if p.TargetRelU > 0 {
		c.HLines = []chart.Mark{{Value: 100 * p.TargetRelU, Label: "target " + g(100*p.TargetRelU, 3) + " %"}}
	}
	if n := p.RecommendedMinFrames; n != nil {
		c.VLines = append(c.VLines, chart.Mark{Value: float64(*n), Label: fmt.Sprintf("recommended: %d frames", *n)})
	}
	return c.SVG(Width, Height)
}

// BudgetBars draws the shares of the variance of an uncertainty budget as bars.
func BudgetBars(budget []uncertainty.Source) (string, error) {
	b := chart.Bars{Title: "Share of the variance", Unit: "%", Format: "%.1f"}
	for _, s := range budget {
		b.Labels = append(b.Labels, s.Source)
		b.Values = append(b.Values, 100*s.Share)
	}
	return b.SVG(Width)
}

// Radii draws the histogram of an analysis' per-track radii with the monodisperse reference overlaid
// (at the bin centres), the pooled radius marked and its coverage interval shaded.
func Radii(a *uncertainty.Analysis) (string, error) {
	rd := a.Radii
	if len(rd.Monodisperse) != len(rd.Counts) || len(rd.EdgesNM) != len(rd.Counts)+1 {
		return "", errors.New("figures: radius distribution with inconsistent bins")
	}
	over := make([]chart.Point, len(rd.Monodisperse))
	for i, m := range rd.Monodisperse {
		over[i] = chart.Point{X: (rd.EdgesNM[i] + rd.EdgesNM[i+1]) / 2, Y: m}
	}
	title := fmt.Sprintf("Radii of %d single tracks", a.TracksUsed)
	if outside := rd.Below + rd.Above + rd.NonPositive; outside > 0 {
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
		Marks:        []chart.Mark{{Value: a.RadiusNM, Label: "pooled radius " + g(a.RadiusNM, 4) + " nm"}},
		Bands:        []chart.Band{{Lo: a.IntervalNM[0], Hi: a.IntervalNM[1], Label: g(100*a.Coverage, 6) + " % coverage interval of the radius"}},
	}
	return h.SVG(Width, Height)
}
