package core

import "math"

// VarCVE returns the published large-N variance, in (m²/s)², of the covariance-based estimator (CVE)
// of D from one track of N displacements per axis, averaged over dims independent axes:
//
//	Var(D̂) = D²·[(6 + 4ε + 2ε²)/N + 4(1 + ε)²/N²] / dims,   ε = s2/(DΔt) − 2R
//
// It agrees with the exact finite-N variance (VarCVEExact) through order 1/N²: the exact result is
//
//	VarCVEExact = VarCVE + D²·[4(1+ε)²/(N²(N−1)) − (N+1)ε²/(N²(N−1)²)] / dims
//
// so VarCVE slightly underestimates (the bracket is positive for every valid ε ≥ −1/2 and N ≥ 2), by
// a relative amount ≈ [4(1+ε)² − ε²]/((6 + 4ε + 2ε²)N²): 0.69 % at N = 10, 0.0067 % at N = 100 for
// ε = 0. Valid for D > 0,
// ε ≥ −1/2, N ≥ 2 and dims ≥ 1; VarCVE panics outside that range.
//
// References:
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
func VarCVE(D, eps float64, N, dims int) float64 {
	mustEps("VarCVE", D, eps, N, 2, dims)
	n := float64(N)
	e1 := 1 + eps
	return D * D * ((6+4*eps+2*eps*eps)/n + 4*e1*e1/(n*n)) / float64(dims)
}

// VarKnownNoise returns the variance, in (m²/s)², of the estimator of D that takes the localisation
// variance s2 as known, D̂ = (⟨dx²⟩ − 2s2)/(2(1 − 2R)Δt), from one track of N displacements per axis,
// averaged over dims independent axes:
//
//	Var(D̂) = D²·[2(1 + ε)²/N + (N − 1)ε²/N²] / (1 − 2R)² / dims,   ε = s2/(DΔt) − 2R
//
// This published form is exact for every N ≥ 1: it is 2·tr(QΣQΣ) for Q = I/(2N(1−2R)Δt) and the
// tridiagonal step covariance Σ (see VarKnownNoiseExact, which computes it from D, Δt, R and s2).
// Valid for D > 0, ε ≥ −2R, 0 ≤ R ≤ 1/4, N ≥ 1 and dims ≥ 1; VarKnownNoise panics outside that range.
//
// References:
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
func VarKnownNoise(D, eps, blur float64, N, dims int) float64 {
	mustEps("VarKnownNoise", D, eps, N, 1, dims)
	if !(blur >= 0 && blur <= 0.25) || eps < -2*blur {
		panic("core: VarKnownNoise: need 0 ≤ blur ≤ 1/4 and ε ≥ −2·blur")
	}
	n := float64(N)
	e1 := 1 + eps
	g := 1 - 2*blur
	return D * D * (2*e1*e1/n + (n-1)*eps*eps/(n*n)) / (g * g) / float64(dims)
}

// VarCVEExact returns the exact variance, in (m²/s)², of the CVE from one track of N ≥ 2
// displacements per axis, averaged over dims independent axes, in the tridiagonal Gaussian model
// (NewStepCovariance; no drift). The CVE is the quadratic form
//
//	D̂ = ⟨dx²⟩/(2Δt) + ⟨dx_k dx_{k+1}⟩/Δt = dxᵀ·Q·dx,   Q = tridiag(q1, q0, q1)
//	q0 = 1/(2NΔt),   q1 = 1/(2(N−1)Δt)
//
// (the squares are averaged over N terms, the lag-1 products over N − 1). Q and the step covariance
// Σ = tridiag(b, a, b) share the DST-I eigenvectors, so with c_k = cos(kπ/(N+1)),
// μ_k = q0 + 2q1·c_k and λ_k = a + 2b·c_k,
//
//	Var(D̂) = 2·tr(QΣQΣ) / dims = 2·Σ_k μ_k²λ_k² / dims
//	       = 2·[N·q0²a² + 2(N−1)(q0²b² + 4q0q1·ab + q1²a²) + 2(3N−5)·q1²b²] / dims
//
// using Σc_k = Σc_k³ = 0, Σc_k² = (N−1)/2 and Σc_k⁴ = (3N−5)/8 (N ≥ 2). See VarCVE for how the
// published large-N form compares. Valid for D ≥ 0, Δt > 0, 0 ≤ R ≤ 1/4, s2 ≥ 0, N ≥ 2, dims ≥ 1;
// VarCVEExact panics outside that range.
//
// References:
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
func VarCVEExact(D, interval, blur, s2 float64, N, dims int) float64 {
	mustModel("VarCVEExact", D, interval, blur, s2)
	mustCount("VarCVEExact", N, 2, dims)
	n := float64(N)
	q := StepCovariance{Diag: 1 / (2 * n * interval), Off: 1 / (2 * (n - 1) * interval)}
	return tridiagQuadVar(q, NewStepCovariance(D, interval, blur, s2), N) / float64(dims)
}

// VarKnownNoiseExact returns the exact variance, in (m²/s)², of the known-noise estimator
// D̂ = (⟨dx²⟩ − 2s2)/(2(1 − 2R)Δt) from one track of N ≥ 1 displacements per axis, averaged over dims
// axes, computed from the tridiagonal step covariance Σ = tridiag(b, a, b) (NewStepCovariance):
//
//	Var(D̂) = 2·tr(Σ²) / (2N(1 − 2R)Δt)² / dims = 2·[N·a² + 2(N − 1)·b²] / (2N(1 − 2R)Δt)² / dims
//
// It equals VarKnownNoise with ε = s2/(DΔt) − 2R for D > 0. Valid for D ≥ 0, Δt > 0, 0 ≤ R ≤ 1/4,
// s2 ≥ 0, N ≥ 1, dims ≥ 1; VarKnownNoiseExact panics outside that range.
//
// References:
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
func VarKnownNoiseExact(D, interval, blur, s2 float64, N, dims int) float64 {
	mustModel("VarKnownNoiseExact", D, interval, blur, s2)
	mustCount("VarKnownNoiseExact", N, 1, dims)
	q := StepCovariance{Diag: 1 / (2 * float64(N) * (1 - 2*blur) * interval)}
	return tridiagQuadVar(q, NewStepCovariance(D, interval, blur, s2), N) / float64(dims)
}

// PooledVariance returns the variance of the displacement-weighted mean of independent per-track
// estimates, Σ_i w_i·D̂_i with w_i = N_i/ΣN, where lengths[i] = N_i is the number of displacements (per
// axis) of track i and variance(N) the variance of one track's estimate:
//
//	Var = Σ_i w_i²·variance(N_i),   w_i = N_i / Σ_j N_j
//
// For M tracks of equal length this is variance(N)/M. CVE and KnownNoise pool tracks by exactly this
// weighted mean, so PooledVariance with VarCVEExact or VarKnownNoiseExact is their exact variance (for
// KnownNoise the weighted mean is also the estimate from the pooled sum of squares). The variances here
// are those of the estimators without drift removal. PooledVariance panics if lengths is empty or
// holds a length < 1.
func PooledVariance(lengths []int, variance func(N int) float64) float64 {
	if len(lengths) == 0 {
		panic("core: PooledVariance: no tracks")
	}
	total := 0
	for _, n := range lengths {
		if n < 1 {
			panic("core: PooledVariance: track lengths must be ≥ 1")
		}
		total += n
	}
	v := 0.0
	for _, n := range lengths {
		w := float64(n) / float64(total)
		v += w * w * variance(n)
	}
	return v
}

// QianRelVar returns the relative variance Var(MSD_n)/E[MSD_n]² of the time-averaged mean squared
// displacement at lag n (in frames) of a noise-free, blur-free Brownian track with K = Npos − n
// overlapping displacement pairs, summed over dims axes. For two dimensions
//
//	n ≤ K:  (4n²K + 2K + n − n³) / (6nK²)
//	n > K:  1 + (K³ − 4nK² + 4n − K) / (6n²K)
//
// and for d dimensions the 2-D value times 2/d. The result is exact for Gaussian steps (it agrees
// with the quadratic-form covariance of MSDCovariance at s2 = 0, R = 0). QianRelVar panics unless
// n ≥ 1, K ≥ 1 and dims ≥ 1.
//
// References:
//   - Qian H., Sheetz M.P., Elson E.L. (1991) Single particle tracking. Analysis of diffusion and flow
//     in two-dimensional systems. Biophys. J. 60, 910–921.
func QianRelVar(n, K, dims int) float64 {
	if n < 1 || K < 1 || dims < 1 {
		panic("core: QianRelVar: need n ≥ 1, K ≥ 1 and dims ≥ 1")
	}
	fn, fk := float64(n), float64(K)
	var r2 float64
	if n <= K {
		r2 = (4*fn*fn*fk + 2*fk + fn - fn*fn*fn) / (6 * fn * fk * fk)
	} else {
		r2 = 1 + (fk*fk*fk-4*fn*fk*fk+4*fn-fk)/(6*fn*fn*fk)
	}
	return r2 * 2 / float64(dims)
}

// tridiagQuadVar returns 2·tr(QΣQΣ) for the N×N symmetric tridiagonal Toeplitz matrices
// Q = tridiag(q.Off, q.Diag, q.Off) and Σ = tridiag(s.Off, s.Diag, s.Off): the variance of dxᵀQdx for
// dx ~ N(0, Σ). Both are diagonal in the DST-I basis, with eigenvalues μ_k = q0 + 2q1c_k and
// λ_k = a + 2bc_k, c_k = cos(kπ/(N+1)); the sum 2Σμ_k²λ_k² is taken in closed form with the power
// sums Σc_k = Σc_k³ = 0, Σc_k² = (N−1)/2 and Σc_k⁴ = (3N−5)/8 for N ≥ 2 (0 for N = 1).
func tridiagQuadVar(q, s StepCovariance, N int) float64 {
	n := float64(N)
	q0, q1, a, b := q.Diag, q.Off, s.Diag, s.Off
	s4 := 0.0
	if N >= 2 {
		s4 = (3*n - 5) / 8
	}
	t := n*q0*q0*a*a + 2*(n-1)*(q0*q0*b*b+4*q0*q1*a*b+q1*q1*a*a) + 16*s4*q1*q1*b*b
	return 2 * t
}

// mustEps panics unless D > 0, ε ≥ −1/2 (the smallest value allowed by s2 ≥ 0 and R ≤ 1/4), N ≥ minN and
// dims ≥ 1.
func mustEps(fn string, D, eps float64, N, minN, dims int) {
	if !(D > 0) || math.IsInf(D, 1) {
		panic("core: " + fn + ": D must be positive and finite")
	}
	if !(eps >= -0.5) || math.IsInf(eps, 1) {
		panic("core: " + fn + ": ε must be finite and ≥ −1/2")
	}
	mustCount(fn, N, minN, dims)
}

// mustCount panics unless N ≥ minN and dims ≥ 1.
func mustCount(fn string, N, minN, dims int) {
	if N < minN {
		panic("core: " + fn + ": too few displacements")
	}
	if dims < 1 {
		panic("core: " + fn + ": dims must be ≥ 1")
	}
}
