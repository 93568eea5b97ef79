package core

import (
	"math/rand/v2"
	"testing"
)

// rngSink keeps the benchmarked draws alive.
var rngSink float64

// benchSources are the generators compared: the standard library's ChaCha8 and PCG and Xoshiro, each
// as a rand.Source behind a *rand.Rand (what the Monte Carlo models receive).
var benchSources = []struct {
	name string
	src  func() rand.Source
}{
	{"chacha8", func() rand.Source { return rand.NewChaCha8([32]byte{1}) }},
	{"pcg", func() rand.Source { return rand.NewPCG(1, 2) }},
	{"xoshiro", func() rand.Source { return NewXoshiro(1) }},
}

// BenchmarkRandomBits measures one 64-bit draw, through the rand.Source interface.
func BenchmarkRandomBits(b *testing.B) {
	for _, s := range benchSources {
		b.Run("source="+s.name, func(b *testing.B) {
			src := s.src()
			var acc uint64
			for b.Loop() {
				acc += src.Uint64()
			}
			rngSink = float64(acc)
		})
	}
}

// BenchmarkNormal measures one standard normal variate: rand.Rand.NormFloat64 on each source, and
// Xoshiro's own ziggurat without the interface.
func BenchmarkNormal(b *testing.B) {
	for _, s := range benchSources {
		b.Run("sampler=rand/source="+s.name, func(b *testing.B) {
			r := rand.New(s.src())
			acc := 0.0
			for b.Loop() {
				acc += r.NormFloat64()
			}
			rngSink = acc
		})
	}
	b.Run("sampler=xoshiro.Norm", func(b *testing.B) {
		x := NewXoshiro(1)
		acc := 0.0
		for b.Loop() {
			acc += x.Norm()
		}
		rngSink = acc
	})
}

// BenchmarkExponential measures one standard exponential variate.
func BenchmarkExponential(b *testing.B) {
	for _, s := range benchSources {
		b.Run("sampler=rand/source="+s.name, func(b *testing.B) {
			r := rand.New(s.src())
			acc := 0.0
			for b.Loop() {
				acc += r.ExpFloat64()
			}
			rngSink = acc
		})
	}
	b.Run("sampler=xoshiro.Exp", func(b *testing.B) {
		x := NewXoshiro(1)
		acc := 0.0
		for b.Loop() {
			acc += x.Exp()
		}
		rngSink = acc
	})
}

// BenchmarkGammaVariate measures one gamma variate of shape 100 (the spectral engine's shape dM/2 for
// 100 tracks in 2-D): core.Gamma on each source, and Xoshiro.Gamma.
func BenchmarkGammaVariate(b *testing.B) {
	for _, s := range benchSources {
		b.Run("sampler=core.Gamma/source="+s.name, func(b *testing.B) {
			r := rand.New(s.src())
			acc := 0.0
			for b.Loop() {
				acc += Gamma(r, 100)
			}
			rngSink = acc
		})
	}
	b.Run("sampler=xoshiro.Gamma", func(b *testing.B) {
		x := NewXoshiro(1)
		acc := 0.0
		for b.Loop() {
			acc += x.Gamma(100)
		}
		rngSink = acc
	})
}

// BenchmarkNormalFill measures a block of 1000 standard normal variates per op (reported per
// variate): FillNorm, a loop of Norm, and a loop of rand.Rand.NormFloat64 on ChaCha8.
func BenchmarkNormalFill(b *testing.B) {
	buf := make([]float64, 1000)
	perVariate := func(b *testing.B) {
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(buf)), "ns/variate")
	}
	b.Run("sampler=xoshiro.FillNorm", func(b *testing.B) {
		x := NewXoshiro(1)
		for b.Loop() {
			x.FillNorm(buf)
		}
		perVariate(b)
	})
	b.Run("sampler=xoshiro.Norm", func(b *testing.B) {
		x := NewXoshiro(1)
		for b.Loop() {
			for i := range buf {
				buf[i] = x.Norm()
			}
		}
		perVariate(b)
	})
	b.Run("sampler=rand/source=chacha8", func(b *testing.B) {
		r := rand.New(rand.NewChaCha8([32]byte{1}))
		for b.Loop() {
			for i := range buf {
				buf[i] = r.NormFloat64()
			}
		}
		perVariate(b)
	})
}
