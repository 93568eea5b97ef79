//go:build js && wasm

package main

import (
	"syscall/js"

	"sizebudget/figures"
	"sizebudget/uncertainty"
)

// planCharts draws the charts of a plan (package figures, the same documents as the command line's
// -svg files): the histogram of the simulated radius estimates with the coverage interval, the curve
// of relative expanded uncertainty against frames per track (log axis) with the target and the
// recommendation, and the budget shares as bars. A chart that cannot be drawn is left out with a
// warning on the console.
func planCharts(p *uncertainty.PlanResult) map[string]string {
	out := map[string]string{}
	add(out, "histogram")(figures.PlanHistogram(p))
	if len(p.Curve) > 0 {
		add(out, "curve")(figures.PlanCurve(p))
	}
	if len(p.Budget) > 0 {
		add(out, "budget")(figures.BudgetBars(p.Budget))
	}
	return out
}

// analysisCharts draws the charts of an analysis of recorded tracks: "radii", the histogram of the
// per-track radii with the monodisperse reference (the same document as sizebudget analyze -svg), and
// "budget", the budget shares as bars.
func analysisCharts(a *uncertainty.Analysis) map[string]string {
	out := map[string]string{}
	add(out, "radii")(figures.Radii(a))
	if a.Plan != nil && len(a.Plan.Budget) > 0 {
		add(out, "budget")(figures.BudgetBars(a.Plan.Budget))
	}
	return out
}

// add returns a function that puts the chart drawn under name into out, or warns on the console
// when it could not be drawn.
func add(out map[string]string, name string) func(svg string, err error) {
	return func(svg string, err error) {
		if err != nil {
			js.Global().Get("console").Call("warn", "sizebudget: chart "+name+": "+err.Error())
			return
		}
		out[name] = svg
	}
}
