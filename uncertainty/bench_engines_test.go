package uncertainty

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"
)

// engineLadder is the ladder of tracks × positions per track of the engine benchmarks.
var engineLadder = []struct{ tracks, frames int }{{10, 100}, {100, 100}, {100, 1000}}

// benchScenario is the demo scenario (invented) at the given size, with its planner target off.
func benchScenario(tracks, frames int) Scenario {
	s := Demo()
	s.Tracks, s.Frames, s.TargetRelU = tracks, frames, 0
	return s
}

// BenchmarkEngine runs each engine's Monte Carlo model on one chunk of trials and reports the time per
// simulated frame (one trial simulates tracks × frames frames) and per trial. The exact engine's
// one-off computation of the law is BenchmarkExactLaw.
func BenchmarkEngine(b *testing.B) {
	for _, eng := range []string{EngineDirect, EngineSpectral, EngineExact} {
		for _, size := range engineLadder {
			b.Run(fmt.Sprintf("engine=%s/tracks=%d/frames=%d", eng, size.tracks, size.frames), func(b *testing.B) {
				s := benchScenario(size.tracks, size.frames)
				m, _, err := TrialModel(TrialSpec{Scenario: s, Engine: eng})
				if err != nil {
					b.Fatal(err)
				}
				trials := 1000
				if eng == EngineDirect {
					trials = max(1, 20_000/(size.tracks*size.frames))
				}
				y := make([]float64, trials)
				r := rand.New(rand.NewChaCha8([32]byte{5}))
				for b.Loop() {
					m(r, y)
				}
				perTrial := float64(b.Elapsed().Nanoseconds()) / float64(b.N) / float64(trials)
				b.ReportMetric(perTrial/float64(size.tracks*size.frames), "ns/frame")
				b.ReportMetric(perTrial, "ns/trial")
			})
		}
	}
}

// BenchmarkExactLaw measures the one-off computation of the exact law over the same ladder.
func BenchmarkExactLaw(b *testing.B) {
	for _, size := range engineLadder {
		b.Run(fmt.Sprintf("tracks=%d/frames=%d", size.tracks, size.frames), func(b *testing.B) {
			spec := TrialSpec{Scenario: benchScenario(size.tracks, size.frames)}
			for b.Loop() {
				if _, err := NewExactLaw(spec); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkPlanDemo runs the demo scenario's full plan (adaptive Monte Carlo, GUM validation and the
// planner's confirmations), with the default engine and with the exact one, on one goroutine (as one
// browser worker would) and on all processors; and the plan at 100 tracks × 1000 frames.
func BenchmarkPlanDemo(b *testing.B) {
	cases := []struct {
		name   string
		s      Scenario
		engine string
	}{
		{"demo/engine=default", Demo(), ""},
		{"demo/engine=exact", Demo(), EngineExact},
		{"100x1000/engine=default", func() Scenario { s := Demo(); s.Frames = 1000; return s }(), ""},
		{"100x1000/engine=exact", func() Scenario { s := Demo(); s.Frames = 1000; return s }(), EngineExact},
	}
	for _, c := range cases {
		for _, workers := range []int{1, 0} {
			b.Run(fmt.Sprintf("%s/workers=%d", c.name, workers), func(b *testing.B) {
				for b.Loop() {
					if _, err := Plan(context.Background(), c.s, PlanOptions{Engine: c.engine, Workers: workers}); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
