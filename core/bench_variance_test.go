package core

import (
	"fmt"
	"testing"
)

// varLadder is the ladder of track lengths (positions, or displacements for the bounds) of the variance
// benchmarks.
var varLadder = []int{10, 100, 1000}

// benchModel is an invented acquisition: D = 1 µm²/s, 20 ms frames, half-frame blur (R = 1/12) and
// x = s2/(DΔt) = 1.
const benchD, benchDt, benchR, benchS2 = 1e-12, 0.02, 1.0 / 12, 2e-14

var benchSink float64

func BenchmarkVarMSDFit(b *testing.B) {
	for _, n := range varLadder {
		for _, lags := range []int{max(2, n/10), n - 1} {
			b.Run(fmt.Sprintf("Npos=%d/lags=%d", n, lags), func(b *testing.B) {
				for b.Loop() {
					benchSink += VarMSDFit(benchD, benchDt, benchR, benchS2, n, lags, 2)
				}
			})
		}
	}
}

func BenchmarkOptimalLags(b *testing.B) {
	for _, n := range varLadder {
		b.Run(fmt.Sprintf("Npos=%d", n), func(b *testing.B) {
			for b.Loop() {
				benchSink += float64(OptimalLags(benchD, benchDt, benchR, benchS2, n, 2))
			}
		})
	}
}

func BenchmarkCRBExact(b *testing.B) {
	for _, n := range varLadder {
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) {
			for b.Loop() {
				benchSink += CRBExact(benchD, benchDt, benchR, benchS2, n, 2)
			}
		})
	}
}

func BenchmarkVarCVEExact(b *testing.B) {
	for _, n := range varLadder {
		b.Run(fmt.Sprintf("N=%d", n), func(b *testing.B) {
			for b.Loop() {
				benchSink += VarCVEExact(benchD, benchDt, benchR, benchS2, n, 2)
			}
		})
	}
}
