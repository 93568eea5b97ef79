package core

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestSpectralLawMoments(t *testing.T) {
	// Without drift the law's mean is D (both estimators are unbiased) and its variance the exact
	// finite-N variance over M tracks (VarCVEExact, VarKnownNoiseExact): analytic identities, 1e-12.
	for _, c := range spectralCases {
		if c.drift != nil {
			continue
		}
		R := c.tE / (6 * c.dt)
		s2 := c.sigma * c.sigma
		law := c.sampler().Law(c.D, nil)
		want := VarCVEExact(c.D, c.dt, R, s2, c.N, c.dims) / float64(c.M)
		if c.knownNoise {
			want = VarKnownNoiseExact(c.D, c.dt, R, s2, c.N, c.dims) / float64(c.M)
		}
		if m := law.Mean(); math.Abs(m-c.D) > 1e-12*c.D {
			t.Errorf("%s: mean %.15g, want D = %.15g", c.name, m, c.D)
		}
		if v := law.Variance(); math.Abs(v-want) > 1e-12*want {
			t.Errorf("%s: variance %.15g, exact %.15g", c.name, v, want)
		}
	}
	// With drift the mean gains (vΔt)²·1ᵀQ1 per drifting axis, 1.5·v²Δt for the CVE (see
	// TestSpectralDriftBias), spread over the axes.
	c := spectralCases[3]
	want := c.D + 1.5*c.drift[0]*c.drift[0]*c.dt/float64(c.dims)
	if m := c.sampler().Law(c.D, c.drift).Mean(); math.Abs(m-want) > 1e-12*want {
		t.Errorf("drift: mean %.15g, want %.15g", m, want)
	}
}

func TestSpectralLawMatchesSampler(t *testing.T) {
	// One-sample KS of Sample's draws against Law's CDF, with and without drift, at the 0.1 % level.
	n := 4000
	if testing.Short() {
		n = 1000
	}
	for ci, c := range spectralCases {
		sp := c.sampler()
		law := sp.Law(c.D, c.drift)
		r := rand.New(rand.NewPCG(61, uint64(ci)))
		xs := make([]float64, n)
		for i := range xs {
			xs[i] = sp.Sample(r, c.D, c.drift)
		}
		if d, crit := ksOneSample(xs, law.CDF), ksCrit(float64(n)); d > crit {
			t.Errorf("%s: KS = %.4f > %.4f", c.name, d, crit)
		}
	}
}
