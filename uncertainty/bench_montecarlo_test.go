package uncertainty

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"
)

// trivialModel costs one uniform draw per trial, so the benchmarks measure the engine: seeding,
// scheduling, the finiteness check, sorting and the summary.
func trivialModel(r *rand.Rand, y []float64) {
	for i := range y {
		y[i] = r.Float64()
	}
}

// BenchmarkPropagate runs fixed-size propagations of the trivial model over a ladder of sizes, with one
// and two workers, and reports the cost per trial. Compare runs with benchstat.
func BenchmarkPropagate(b *testing.B) {
	for _, trials := range []int{10_000, 100_000, 1_000_000} {
		for _, workers := range []int{1, 2} {
			b.Run(fmt.Sprintf("trials=%d/workers=%d", trials, workers), func(b *testing.B) {
				opt := Options{Trials: trials, Workers: workers, Seed: 1}
				for b.Loop() {
					if _, err := Propagate(context.Background(), trivialModel, opt); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(trials), "ns/trial")
			})
		}
	}
}

// BenchmarkRunStep drives the same propagation chunk by chunk, as a browser worker would.
func BenchmarkRunStep(b *testing.B) {
	const trials = 100_000
	for b.Loop() {
		run, err := NewRun(trivialModel, Options{Trials: trials, Seed: 1})
		if err != nil {
			b.Fatal(err)
		}
		for !run.Step(DefaultChunk) {
		}
		if _, err := run.Result(); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/trials, "ns/trial")
}
