package core

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// quadFormDense returns mean tr(QΣ) and variance 2·tr(QΣQΣ) of dxᵀQdx for dx ~ N(0, Σ), from dense
// gonum matrices: the reference for the closed forms.
func quadFormDense(q, s *mat.SymDense) (mean, variance float64) {
	var qs, qsqs mat.Dense
	qs.Mul(q, s)
	qsqs.Mul(&qs, &qs)
	return mat.Trace(&qs), 2 * mat.Trace(&qsqs)
}

// cveMatrix returns the dense N×N matrix Q of the CVE quadratic form for one track.
func cveMatrix(N int, dt float64) *mat.SymDense {
	return tridiagonal(StepCovariance{Diag: 1 / (2 * float64(N) * dt), Off: 1 / (2 * float64(N-1) * dt)}, N)
}

// varModels are (D, Δt, R, s2) cases with D > 0 for the variance tests.
var varModels = []struct{ D, dt, R, s2 float64 }{
	{2e-12, 0.03, 0, 0},
	{2e-12, 0.03, 0, 4e-15},
	{2e-12, 0.03, 1.0 / 6, 0},
	{1e-12, 0.01, 1.0 / 12, 9e-16},
	{1e-12, 0.01, 0.25, 0},
	{5e-13, 0.05, 0.1, 1e-12},
}

func TestVarCVEExactAgainstDenseTrace(t *testing.T) {
	// Reference: 2·tr(QΣQΣ) with gonum mat products (tolerance 1e-10), and the DST eigen sum
	// 2·Σμ_k²λ_k² (exact identity, 1e-12). The mean tr(QΣ) must be D (the CVE is unbiased).
	for _, N := range []int{2, 3, 4, 10, 57} {
		for _, m := range varModels {
			s := NewStepCovariance(m.D, m.dt, m.R, m.s2)
			mean, ref := quadFormDense(cveMatrix(N, m.dt), tridiagonal(s, N))
			got := VarCVEExact(m.D, m.dt, m.R, m.s2, N, 1)
			if !approxRel(got, ref, 1e-10) {
				t.Errorf("N=%d %+v: VarCVEExact %g, dense %g", N, m, got, ref)
			}
			if !approxRel(mean, m.D, 1e-10) {
				t.Errorf("N=%d %+v: E[D̂] = %g, want D = %g", N, m, mean, m.D)
			}
			q := StepCovariance{Diag: 1 / (2 * float64(N) * m.dt), Off: 1 / (2 * float64(N-1) * m.dt)}
			sum := 0.0
			for k := 1; k <= N; k++ {
				mu, lam := q.Eigenvalue(k, N), s.Eigenvalue(k, N)
				sum += 2 * mu * mu * lam * lam
			}
			if !approxRel(got, sum, 1e-12) {
				t.Errorf("N=%d %+v: VarCVEExact %g, DST sum %g", N, m, got, sum)
			}
			if d := VarCVEExact(m.D, m.dt, m.R, m.s2, N, 3); !approxRel(d, got/3, 1e-15) {
				t.Errorf("dims=3 does not divide by 3")
			}
		}
	}
}

func TestVarCVEPublishedFormIsLargeNApproximation(t *testing.T) {
	// Finding: the published CVE variance (Vestergaard et al. 2014) is exact through 1/N² only. The
	// exact quadratic-form variance exceeds it by D²[4(1+ε)²/(N²(N−1)) − (N+1)ε²/(N²(N−1)²)] (exact
	// algebra, derived in the VarCVE doc comment). Measure the difference and check that expression.
	for _, m := range varModels {
		eps := m.s2/(m.D*m.dt) - 2*m.R
		for _, N := range []int{2, 3, 10, 30, 100} {
			n := float64(N)
			exact := VarCVEExact(m.D, m.dt, m.R, m.s2, N, 1)
			pub := VarCVE(m.D, eps, N, 1)
			diff := exact - pub
			want := m.D * m.D * (4*(1+eps)*(1+eps)/(n*n*(n-1)) - (n+1)*eps*eps/(n*n*(n-1)*(n-1)))
			// The difference of two numbers of size ~D²/N carries their rounding, ~1e-16·D²/N.
			if math.Abs(diff-want) > 1e-12*math.Abs(want)+1e-14*exact {
				t.Errorf("%+v N=%d: exact−published %g, derived %g", m, N, diff, want)
			}
			if !(diff > 0) {
				t.Errorf("%+v N=%d: published form should underestimate (diff %g)", m, N, diff)
			}
		}
	}
	D := 1.0
	for _, N := range []int{10, 100} {
		r := VarCVEExact(D, 1, 0, 0, N, 1)/VarCVE(D, 0, N, 1) - 1
		t.Logf("ε=0, N=%d: VarCVEExact/VarCVE − 1 = %.4g", N, r)
	}
	// ε = 0, N = 10: exact 0.64 + 4/900 against published 0.64 (exact arithmetic), i.e. +0.694 %.
	if r := VarCVEExact(D, 1, 0, 0, 10, 1)/VarCVE(D, 0, 10, 1) - 1; math.Abs(r-(4.0/900)/0.64) > 1e-12 {
		t.Errorf("N=10 relative excess %g, want %g", r, (4.0/900)/0.64)
	}
}

func TestVarKnownNoisePublishedFormIsExact(t *testing.T) {
	// The published known-noise variance equals 2·tr(QΣQΣ) for every N (exact algebra; 1e-12), and both
	// match the dense gonum trace (1e-10).
	for _, m := range varModels {
		eps := m.s2/(m.D*m.dt) - 2*m.R
		for _, N := range []int{1, 2, 5, 40, 1000} {
			exact := VarKnownNoiseExact(m.D, m.dt, m.R, m.s2, N, 2)
			pub := VarKnownNoise(m.D, eps, m.R, N, 2)
			if !approxRel(exact, pub, 1e-12) {
				t.Errorf("%+v N=%d: exact %g, published %g", m, N, exact, pub)
			}
			if N > 100 {
				continue
			}
			q := tridiagonal(StepCovariance{Diag: 1 / (2 * float64(N) * (1 - 2*m.R) * m.dt)}, N)
			_, ref := quadFormDense(q, tridiagonal(NewStepCovariance(m.D, m.dt, m.R, m.s2), N))
			if !approxRel(2*exact, ref, 1e-10) {
				t.Errorf("%+v N=%d: exact %g, dense %g", m, N, 2*exact, ref)
			}
		}
	}
	// No noise, no blur: D̂ = D·χ²(N)/N, so Var = 2D²/N exactly (REFERENCES.md §3).
	if v := VarKnownNoise(3, 0, 0, 25, 1); !approxRel(v, 2*9.0/25, 1e-15) {
		t.Errorf("χ² case: %g, want %g", v, 2*9.0/25)
	}
}

func TestPooledVariance(t *testing.T) {
	m := varModels[3]
	one := func(N int) float64 { return VarKnownNoiseExact(m.D, m.dt, m.R, m.s2, N, 1) }
	// M equal tracks: variance/M (exact algebra).
	if v := PooledVariance([]int{20, 20, 20, 20}, one); !approxRel(v, one(20)/4, 1e-14) {
		t.Errorf("equal tracks: %g, want %g", v, one(20)/4)
	}
	// Unequal tracks, known noise: the estimator pooled over all P displacements is the quadratic form
	// Σ_i dx_iᵀdx_i/(2P(1−2R)Δt) − const; its variance is Σ_i 2·tr(Σ_i²)/(2P(1−2R)Δt)² (exact).
	lengths := []int{3, 10, 31}
	P := 44.0
	want := 0.0
	for _, n := range lengths {
		s := NewStepCovariance(m.D, m.dt, m.R, m.s2)
		g := 2 * P * (1 - 2*m.R) * m.dt
		want += 2 * (float64(n)*s.Diag*s.Diag + 2*float64(n-1)*s.Off*s.Off) / (g * g)
	}
	if v := PooledVariance(lengths, one); !approxRel(v, want, 1e-12) {
		t.Errorf("unequal known-noise pool: %g, want %g", v, want)
	}
}

func TestQianRelVarExactCases(t *testing.T) {
	// Exact results: with K = 1 the MSD is one squared displacement, χ² with d degrees of freedom
	// scaled, so Var/mean² = 2/d for every n. At n = K both branches give ½ + 1/(2K²) (2-D).
	for _, d := range []int{1, 2, 3} {
		for _, n := range []int{1, 2, 7} {
			if r := QianRelVar(n, 1, d); !approxRel(r, 2/float64(d), 1e-15) {
				t.Errorf("K=1 n=%d d=%d: %g, want %g", n, d, r, 2/float64(d))
			}
		}
	}
	for _, K := range []int{1, 2, 5, 40} {
		k := float64(K)
		if r := QianRelVar(K, K, 2); !approxRel(r, 0.5+1/(2*k*k), 1e-14) {
			t.Errorf("n=K=%d: %g, want %g", K, r, 0.5+1/(2*k*k))
		}
	}
}

func TestVarianceFormulasPanicOnMisuse(t *testing.T) {
	for name, f := range map[string]func(){
		"VarCVE N=1":             func() { VarCVE(1, 0, 1, 1) },
		"VarCVE D=0":             func() { VarCVE(0, 0, 10, 1) },
		"VarKnownNoise eps<-2R":  func() { VarKnownNoise(1, -0.3, 0.1, 10, 1) },
		"VarCVEExact dims=0":     func() { VarCVEExact(1, 1, 0, 0, 10, 0) },
		"VarKnownNoiseExact R":   func() { VarKnownNoiseExact(1, 1, 0.26, 0, 10, 1) },
		"PooledVariance empty":   func() { PooledVariance(nil, func(int) float64 { return 1 }) },
		"QianRelVar K=0":         func() { QianRelVar(3, 0, 2) },
		"VarKnownNoise negative": func() { VarKnownNoise(-1, 0, 0, 10, 1) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic", name)
				}
			}()
			f()
		}()
	}
}

// checkSampleVariance compares the sample variance of xs with the predicted variance want. The
// tolerance is 4 standard errors of the sample variance, estimated from the sample itself:
//
//	Var(s²) ≈ (m4 − m2²(M−3)/(M−1)) / M
//
// with m2, m4 the second and fourth central sample moments (Cramér, Mathematical Methods of Statistics,
// 1946, §27.4; from memory). It returns s² and the standard error for reporting.
func checkSampleVariance(t *testing.T, name string, xs []float64, want float64) (s2, se float64) {
	t.Helper()
	M := float64(len(xs))
	mean := 0.0
	for _, x := range xs {
		mean += x
	}
	mean /= M
	var m2, m4 float64
	for _, x := range xs {
		d := (x - mean) * (x - mean)
		m2 += d
		m4 += d * d
	}
	s2 = m2 / (M - 1)
	m2 /= M
	m4 /= M
	se = math.Sqrt((m4 - m2*m2*(M-3)/(M-1)) / M)
	if math.Abs(s2-want) > 4*se {
		t.Errorf("%s: sample variance %.5g ± %.2g (1 SE), predicted %.5g (%.1f SE off)", name, s2, se, want, (s2-want)/se)
	} else {
		t.Logf("%s: sample variance %.5g ± %.2g (1 SE), predicted %.5g (%+.2f SE)", name, s2, se, want, (s2-want)/se)
	}
	return s2, se
}

// mcRecordings are invented acquisition settings for the simulation cross-checks: low noise with
// blur, and strong noise (x = s2/(DΔt) = 2) with full-frame blur.
var mcRecordings = []Recording{
	{D: 1e-12, Dims: 2, Interval: 0.02, Exposure: 0.01, Sigma: 3e-8},
	{D: 1e-12, Dims: 1, Interval: 0.02, Exposure: 0.02, Sigma: 2e-7},
}

func TestVarCVEExactBySimulation(t *testing.T) {
	// Sample variance of CVE estimates from 4000 simulated 11-point tracks (fixed seed) against
	// VarCVEExact; then the same for a pool of three unequal tracks against PooledVariance.
	src := rand.NewPCG(20240611, 1)
	for _, rec := range mcRecordings {
		R, s2 := rec.Blur(), rec.Sigma*rec.Sigma
		const M, points = 4000, 11
		xs := make([]float64, M)
		for i := range xs {
			est, err := CVE([]Track{Simulate(src, rec, points)}, rec.Interval, R, false)
			if err != nil {
				t.Fatal(err)
			}
			xs[i] = est.D
		}
		want := VarCVEExact(rec.D, rec.Interval, R, s2, points-1, rec.Dims)
		checkSampleVariance(t, "CVE one track", xs, want)

		lengths := []int{4, 12, 30} // points per track
		ns := []int{3, 11, 29}      // displacements
		for i := range xs[:2000] {
			tracks := make([]Track, len(lengths))
			for j, p := range lengths {
				tracks[j] = Simulate(src, rec, p)
			}
			est, err := CVE(tracks, rec.Interval, R, false)
			if err != nil {
				t.Fatal(err)
			}
			xs[i] = est.D
		}
		pooled := PooledVariance(ns, func(N int) float64 { return VarCVEExact(rec.D, rec.Interval, R, s2, N, rec.Dims) })
		checkSampleVariance(t, "CVE pooled unequal tracks", xs[:2000], pooled)
	}
}

func TestVarKnownNoiseExactBySimulation(t *testing.T) {
	// Sample variance of KnownNoise estimates from 4000 simulated 9-point tracks (fixed seed) against
	// VarKnownNoiseExact.
	src := rand.NewPCG(20240611, 2)
	for _, rec := range mcRecordings {
		R, s2 := rec.Blur(), rec.Sigma*rec.Sigma
		const M, points = 4000, 9
		xs := make([]float64, M)
		for i := range xs {
			est, err := KnownNoise([]Track{Simulate(src, rec, points)}, rec.Interval, R, s2, false)
			if err != nil {
				t.Fatal(err)
			}
			xs[i] = est.D
		}
		want := VarKnownNoiseExact(rec.D, rec.Interval, R, s2, points-1, rec.Dims)
		checkSampleVariance(t, "KnownNoise one track", xs, want)
	}
}
