package core

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// ksOneSample returns the Kolmogorov–Smirnov statistic of xs against cdf.
func ksOneSample(xs []float64, cdf func(float64) float64) float64 {
	s := slices.Clone(xs)
	slices.Sort(s)
	n := float64(len(s))
	d := 0.0
	for i, x := range s {
		f := cdf(x)
		d = math.Max(d, math.Max(f-float64(i)/n, float64(i+1)/n-f))
	}
	return d
}

// ksTwoSample returns the two-sample Kolmogorov–Smirnov statistic.
func ksTwoSample(a, b []float64) float64 {
	x, y := slices.Clone(a), slices.Clone(b)
	slices.Sort(x)
	slices.Sort(y)
	i, j, d := 0, 0, 0.0
	for i < len(x) && j < len(y) {
		if x[i] <= y[j] {
			i++
		} else {
			j++
		}
		d = math.Max(d, math.Abs(float64(i)/float64(len(x))-float64(j)/float64(len(y))))
	}
	return d
}

// ksCrit is the asymptotic 0.1 % critical value of the KS statistic for effective size n,
// c(0.001) = 1.949 (Kolmogorov distribution, from memory: √(−ln(0.0005)/2) = 1.9495).
func ksCrit(n float64) float64 { return math.Sqrt(-math.Log(0.0005)/2) / math.Sqrt(n) }

func TestGammaSamplerKS(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	for _, k := range []float64{0.3, 1, 3.7, 50, 2000} {
		xs := make([]float64, 20000)
		for i := range xs {
			xs[i] = Gamma(r, k)
		}
		ref := distuv.Gamma{Alpha: k, Beta: 1} // gonum distuv.Gamma CDF, unit rate
		if d := ksOneSample(xs, ref.CDF); d > ksCrit(float64(len(xs))) {
			t.Errorf("shape %g: KS = %.4f > %.4f", k, d, ksCrit(float64(len(xs))))
		}
	}
}

// spectralCase is one setting of the exact sampler checked against theory and direct simulation.
type spectralCase struct {
	name             string
	D, dt, tE, sigma float64
	N, M, dims       int
	knownNoise       bool
	drift            []float64
}

var spectralCases = []spectralCase{
	{name: "cve noise+blur 2D", D: 4e-12, dt: 0.033, tE: 0.01, sigma: 40e-9, N: 20, M: 5, dims: 2},
	{name: "cve high noise 1D", D: 1e-12, dt: 0.01, tE: 0.01, sigma: 200e-9, N: 30, M: 3, dims: 1},
	{name: "known noise 3D", D: 4e-12, dt: 0.033, tE: 0.02, sigma: 30e-9, N: 10, M: 4, dims: 3, knownNoise: true},
	{name: "cve drift 2D", D: 4e-12, dt: 0.033, tE: 0.01, sigma: 40e-9, N: 15, M: 6, dims: 2, drift: []float64{3e-6, 0}},
	{name: "known noise drift one track", D: 4e-12, dt: 0.033, tE: 0, sigma: 20e-9, N: 25, M: 1, dims: 2, knownNoise: true, drift: []float64{2e-6, -1e-6}},
}

func (c spectralCase) sampler() *Spectral {
	R := c.tE / (6 * c.dt)
	s2 := c.sigma * c.sigma
	form := CVEForm(c.dt, c.N)
	if c.knownNoise {
		form = KnownNoiseForm(c.dt, R, s2, c.N)
	}
	return NewSpectral(form, c.dt, R, s2, c.N, c.M, c.dims)
}

func TestSpectralMomentsAgainstExactVariance(t *testing.T) {
	for _, c := range spectralCases {
		if c.drift != nil {
			continue
		}
		sp := c.sampler()
		R := c.tE / (6 * c.dt)
		s2 := c.sigma * c.sigma
		want := VarCVEExact(c.D, c.dt, R, s2, c.N, c.dims) / float64(c.M)
		if c.knownNoise {
			want = VarKnownNoiseExact(c.D, c.dt, R, s2, c.N, c.dims) / float64(c.M)
		}
		r := rand.New(rand.NewPCG(11, 12))
		const n = 40000
		xs := make([]float64, n)
		var m float64
		for i := range xs {
			xs[i] = sp.Sample(r, c.D, nil)
			m += xs[i]
		}
		m /= n
		var v, m4 float64
		for _, x := range xs {
			d := x - m
			v += d * d
			m4 += d * d * d * d
		}
		v /= n - 1
		m4 /= n
		// Standard errors: of the mean √(v/n); of the sample variance √((μ4 − v²)/n).
		if se := math.Sqrt(v / n); math.Abs(m-c.D) > 4*se {
			t.Errorf("%s: mean %.5g, want D = %.5g (4 SE %.2g)", c.name, m, c.D, 4*se)
		}
		if se := math.Sqrt((m4 - v*v) / n); math.Abs(v-want) > 4*se {
			t.Errorf("%s: variance %.5g, exact %.5g (4 SE %.2g)", c.name, v, want, 4*se)
		}
	}
}

func TestSpectralMatchesDirectSimulation(t *testing.T) {
	// Two-sample KS test of the spectral sampler against simulate-then-estimate, for every case.
	const n = 3000
	for ci, c := range spectralCases {
		sp := c.sampler()
		R := c.tE / (6 * c.dt)
		rec := Recording{D: c.D, Dims: c.dims, Interval: c.dt, Exposure: c.tE, Sigma: c.sigma, Drift: c.drift}
		rs := rand.New(rand.NewPCG(21, uint64(ci)))
		src := rand.NewPCG(31, uint64(ci))
		spec := make([]float64, n)
		direct := make([]float64, n)
		tracks := make([]Track, c.M)
		for i := range n {
			spec[i] = sp.Sample(rs, c.D, c.drift)
			for j := range tracks {
				tracks[j] = Simulate(src, rec, c.N+1)
			}
			var e Estimate
			var err error
			if c.knownNoise {
				e, err = KnownNoise(tracks, c.dt, R, c.sigma*c.sigma, false)
			} else {
				e, err = CVE(tracks, c.dt, R, false)
			}
			if err != nil {
				t.Fatal(err)
			}
			direct[i] = e.D
		}
		if d, crit := ksTwoSample(spec, direct), ksCrit(n/2); d > crit {
			t.Errorf("%s: two-sample KS = %.4f > %.4f", c.name, d, crit)
		}
	}
}

func TestSpectralDriftBias(t *testing.T) {
	// Exact mean with drift: E[dxᵀQdx] gains (vΔt)²·1ᵀQ1 per axis; for the CVE 1ᵀQ1 = N·Diag + 2(N−1)·Off
	// = 3/(2Δt), so the bias is 1.5·v²Δt per axis, averaged over the axes.
	c := spectralCases[3]
	sp := c.sampler()
	r := rand.New(rand.NewPCG(41, 42))
	const n = 40000
	var m, m2 float64
	for range n {
		x := sp.Sample(r, c.D, c.drift)
		m += x
		m2 += x * x
	}
	m /= n
	se := math.Sqrt((m2/n - m*m) / n)
	want := c.D + 1.5*c.drift[0]*c.drift[0]*c.dt/float64(c.dims)
	if math.Abs(m-want) > 4*se {
		t.Errorf("mean with drift %.6g, want %.6g (4 SE %.2g)", m, want, 4*se)
	}
	// The DST-I sums Σ_j v_k(j) used for the drift: direct summation agrees to 1e-12.
	for k := 1; k <= c.N; k++ {
		s := 0.0
		for j := 1; j <= c.N; j++ {
			s += DSTVector(k, j, c.N)
		}
		if math.Abs(s-sp.ones[k-1]) > 1e-12 {
			t.Errorf("Σ v_%d = %.15f, closed form %.15f", k, s, sp.ones[k-1])
		}
	}
}
