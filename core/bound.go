package core

import "math"

// FisherInformation returns the exact Fisher information matrix of θ = (D, s2) carried by N
// displacements along one axis in the tridiagonal Gaussian model (NewStepCovariance; no drift), in
// units of (m²/s)⁻², (m²/s)⁻¹·m⁻² and m⁻⁴: info[0][0] = I_DD, info[0][1] = info[1][0] = I_Ds2,
// info[1][1] = I_s2s2. For a zero-mean Gaussian with covariance S(θ),
//
//	I_ij = ½·tr(S⁻¹ ∂_iS S⁻¹ ∂_jS)
//
// S, ∂_D S = tridiag(2RΔt, 2Δt(1−2R), 2RΔt) and ∂_s2 S = tridiag(−1, 2, −1) are all symmetric
// tridiagonal Toeplitz, hence share the DST-I eigenvectors, and the trace is an exact O(N) sum over the
// eigenvalues λ_k (see StepCovariance.Eigenvalue), c_k = cos(kπ/(N+1)):
//
//	I_ij = ½·Σ_k (∂_iλ_k)(∂_jλ_k)/λ_k²
//	∂_D λ_k = 2Δt(1 − 2R + 2R·c_k),   ∂_s2 λ_k = 2(1 − c_k)
//
// Independent axes and tracks add their information. Valid for D > 0, Δt > 0, 0 ≤ R ≤ 1/4, s2 ≥ 0 and
// N ≥ 1; FisherInformation panics outside that range.
//
// References:
//   - Michalet X., Berglund A.J. (2012) Optimal diffusion coefficient estimation in single-particle
//     tracking. Phys. Rev. E 85, 061916.
//   - Kay S.M. (1993) Fundamentals of Statistical Signal Processing: Estimation Theory, ch. 3 (the
//     Fisher information of a Gaussian with parameter-dependent covariance; from memory).
func FisherInformation(D, interval, blur, s2 float64, N int) [2][2]float64 {
	mustModel("FisherInformation", D, interval, blur, s2)
	if !(D > 0) {
		panic("core: FisherInformation: D must be positive")
	}
	mustCount("FisherInformation", N, 1, 1)
	c := NewStepCovariance(D, interval, blur, s2)
	var dd, ds, ss float64
	for k := 1; k <= N; k++ {
		ck := math.Cos(float64(k) * math.Pi / float64(N+1))
		lam := c.Diag + 2*c.Off*ck
		gD := 2 * interval * (1 - 2*blur + 2*blur*ck) / lam
		gS := 2 * (1 - ck) / lam
		dd += gD * gD
		ds += gD * gS
		ss += gS * gS
	}
	return [2][2]float64{{dd / 2, ds / 2}, {ds / 2, ss / 2}}
}

// CRBExact returns the exact Cramér–Rao lower bound, in (m²/s)², on the variance of any unbiased
// estimator of D from N displacements per axis in each of dims independent axes when the localisation
// variance s2 is unknown (estimated jointly):
//
//	Var(D̂) ≥ [I⁻¹]_DD / dims = I_s2s2 / (I_DD·I_s2s2 − I_Ds2²) / dims
//
// with I from FisherInformation. For large N it approaches CRBAsymptotic like 1 + O(1/N). Valid for
// the range of FisherInformation and dims ≥ 1.
//
// References:
//   - Michalet X., Berglund A.J. (2012) Optimal diffusion coefficient estimation in single-particle
//     tracking. Phys. Rev. E 85, 061916.
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
func CRBExact(D, interval, blur, s2 float64, N, dims int) float64 {
	mustCount("CRBExact", N, 1, dims)
	I := FisherInformation(D, interval, blur, s2, N)
	det := I[0][0]*I[1][1] - I[0][1]*I[0][1]
	return I[1][1] / det / float64(dims)
}

// CRBKnownNoise returns the exact Cramér–Rao lower bound, in (m²/s)², on the variance of any unbiased
// estimator of D from N displacements per axis in each of dims axes when s2 is known:
//
//	Var(D̂) ≥ 1 / (I_DD·dims)
//
// with I_DD from FisherInformation. Without noise and blur all λ_k = 2DΔt and the bound is 2D²/(N·dims),
// the variance of D·χ²(dims·N)/(dims·N). Valid for the range of FisherInformation and dims ≥ 1.
//
// References:
//   - Michalet X., Berglund A.J. (2012) Optimal diffusion coefficient estimation in single-particle
//     tracking. Phys. Rev. E 85, 061916.
func CRBKnownNoise(D, interval, blur, s2 float64, N, dims int) float64 {
	mustCount("CRBKnownNoise", N, 1, dims)
	I := FisherInformation(D, interval, blur, s2, N)
	return 1 / I[0][0] / float64(dims)
}

// CRBAsymptotic returns the large-N Cramér–Rao bound, in (m²/s)², on the variance of an unbiased
// estimator of D with s2 unknown, from N displacements per axis in each of dims axes:
//
//	Var(D̂) ≥ (2D²/N)·(1 + 2√(1 + 2ε)) / dims,   ε = s2/(DΔt) − 2R
//
// It is the N → ∞ limit of N·CRBExact (the relative difference falls like 1/N). Valid for D > 0,
// ε ≥ −1/2, N ≥ 1 and dims ≥ 1; CRBAsymptotic panics outside that range.
//
// References:
//   - Michalet X., Berglund A.J. (2012) Optimal diffusion coefficient estimation in single-particle
//     tracking. Phys. Rev. E 85, 061916.
func CRBAsymptotic(D, eps float64, N, dims int) float64 {
	mustEps("CRBAsymptotic", D, eps, N, 1, dims)
	return 2 * D * D / float64(N) * (1 + 2*math.Sqrt(1+2*eps)) / float64(dims)
}
