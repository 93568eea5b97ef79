package uncertainty

import (
	"context"
	"fmt"
	"testing"
)

// BenchmarkPlan runs one Plan of the demo scenario over a ladder of track lengths (30 to 1000
// positions, 100 tracks) on the spectral engine, with a fixed 10 000 trials and with the adaptive
// procedure of JCGM 101 7.9, and reports the cost per Monte Carlo trial and per simulated position
// (trials × positions per track × tracks). The target is 0 so that the figures are those of one
// propagation and the GUM budget (the planner's confirmations would add propagations at other track
// lengths). Compare runs with benchstat.
func BenchmarkPlan(b *testing.B) {
	for _, frames := range []int{30, 100, 300, 1000} {
		for _, trials := range []int{10_000, 0} {
			mode := fmt.Sprint(trials)
			if trials == 0 {
				mode = "adaptive"
			}
			b.Run(fmt.Sprintf("frames=%d/tracks=100/trials=%s", frames, mode), func(b *testing.B) {
				s := Demo()
				s.Frames, s.Tracks, s.Trials, s.TargetRelU = frames, 100, trials, 0
				opt := PlanOptions{Engine: EngineSpectral}
				done := 0
				for b.Loop() {
					res, err := Plan(context.Background(), s, opt)
					if err != nil {
						b.Fatal(err)
					}
					done += res.MonteCarlo.Trials
				}
				ns := float64(b.Elapsed().Nanoseconds())
				b.ReportMetric(ns/float64(done), "ns/trial")
				b.ReportMetric(ns/(float64(done)*float64(frames*s.Tracks)), "ns/frame")
			})
		}
	}
}

// BenchmarkPlanWithPlanner runs one whole Plan of the demo scenario, the planner's search and
// confirmations by simulation included, as sizebudget plan does.
func BenchmarkPlanWithPlanner(b *testing.B) {
	s := Demo()
	for b.Loop() {
		if _, err := Plan(context.Background(), s, PlanOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}
