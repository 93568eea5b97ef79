package core

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// benchLadder is the ladder of points per track of the benchmarks.
var benchLadder = []int{10, 100, 1000, 10000}

// benchRecording is a 2-D recording with half-frame blur and localisation noise (an invented scenario).
var benchRecording = Recording{D: simD, Dims: 2, Interval: simDt, Exposure: simDt / 2, Sigma: 40e-9}

// benchTracks returns enough tracks of the given length for about 10⁴ frames, so that the per-call
// overhead is amortised the same way at every rung.
func benchTracks(points int) []Track {
	src := rand.NewPCG(1, 2)
	trs := make([]Track, max(1, 10000/points))
	for i := range trs {
		trs[i] = Simulate(src, benchRecording, points)
	}
	return trs
}

// reportPerFrame reports the time per recorded frame (one position on every axis).
func reportPerFrame(b *testing.B, framesPerOp int) {
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(framesPerOp), "ns/frame")
}

func BenchmarkSimulate(b *testing.B) {
	for _, points := range benchLadder {
		b.Run(fmt.Sprintf("points=%d", points), func(b *testing.B) {
			src := rand.NewPCG(3, 4)
			for b.Loop() {
				Simulate(src, benchRecording, points)
			}
			reportPerFrame(b, points)
		})
	}
}

func BenchmarkCVE(b *testing.B) {
	for _, points := range benchLadder {
		for _, removeDrift := range []bool{false, true} {
			b.Run(fmt.Sprintf("points=%d/removeDrift=%v", points, removeDrift), func(b *testing.B) {
				trs := benchTracks(points)
				R := benchRecording.Blur()
				for b.Loop() {
					if _, err := CVE(trs, simDt, R, removeDrift); err != nil {
						b.Fatal(err)
					}
				}
				reportPerFrame(b, len(trs)*points)
			})
		}
	}
}

func BenchmarkKnownNoise(b *testing.B) {
	for _, points := range benchLadder {
		for _, removeDrift := range []bool{false, true} {
			b.Run(fmt.Sprintf("points=%d/removeDrift=%v", points, removeDrift), func(b *testing.B) {
				trs := benchTracks(points)
				R, s2 := benchRecording.Blur(), benchRecording.Sigma*benchRecording.Sigma
				for b.Loop() {
					if _, err := KnownNoise(trs, simDt, R, s2, removeDrift); err != nil {
						b.Fatal(err)
					}
				}
				reportPerFrame(b, len(trs)*points)
			})
		}
	}
}
