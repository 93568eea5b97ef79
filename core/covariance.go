package core

import "math"

// StepCovariance is the covariance of the displacements dx_k = x_k − x_{k−1} of a camera-recorded
// freely diffusing particle along one axis, in m²: Diag = Var dx_k on the diagonal, Off =
// Cov(dx_k, dx_{k+1}) on the first off-diagonals; covariances at lags ≥ 2 vanish. For N displacements it
// is the symmetric tridiagonal Toeplitz N×N matrix
//
//	Σ = tridiag(Off, Diag, Off)
//
// Every such matrix is diagonalised by the type-I discrete sine basis (see DSTVector), with eigenvalues
// given by Eigenvalue. Drift does not enter: it shifts the mean of every displacement only.
//
// References:
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
type StepCovariance struct {
	Diag float64 // Var dx_k, m²
	Off  float64 // Cov(dx_k, dx_{k+1}), m²
}

// NewStepCovariance returns the displacement covariance for diffusion coefficient D (m²/s), frame
// interval Δt (s), motion-blur coefficient R (dimensionless) and localisation variance s2 = σ² (m²):
//
//	Diag = 2DΔt(1 − 2R) + 2·s2
//	Off  = −(s2 − 2R·D·Δt)
//
// R = (1/Δt)∫₀^Δt S(t)[1 − S(t)] dt for the cumulative normalised exposure S; continuous illumination
// during an exposure t_E gives R = t_E/(6Δt). Valid for D ≥ 0, Δt > 0, 0 ≤ R ≤ 1/4 and s2 ≥ 0, where the
// matrix is positive semi-definite for every N; NewStepCovariance panics outside that range.
//
// References:
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
func NewStepCovariance(D, interval, blur, s2 float64) StepCovariance {
	mustModel("NewStepCovariance", D, interval, blur, s2)
	return StepCovariance{
		Diag: 2*D*interval*(1-2*blur) + 2*s2,
		Off:  -(s2 - 2*blur*D*interval),
	}
}

// Eigenvalue returns the k-th eigenvalue (k = 1..N) of the N×N displacement covariance, in m²:
//
//	λ_k = Diag + 2·Off·cos(kπ/(N+1))
//
// Its eigenvector is v_k(j) = DSTVector(k, j, N). Eigenvalue panics unless 1 ≤ k ≤ N.
//
// References:
//   - Michalet X., Berglund A.J. (2012) Optimal diffusion coefficient estimation in single-particle
//     tracking. Phys. Rev. E 85, 061916.
func (c StepCovariance) Eigenvalue(k, N int) float64 {
	if k < 1 || k > N {
		panic("core: StepCovariance.Eigenvalue: need 1 ≤ k ≤ N")
	}
	return c.Diag + 2*c.Off*math.Cos(float64(k)*math.Pi/float64(N+1))
}

// Eigenvalues returns λ_1..λ_N of the N×N displacement covariance (see Eigenvalue), in m²; element
// k−1 holds λ_k. It panics if N < 1.
func (c StepCovariance) Eigenvalues(N int) []float64 {
	if N < 1 {
		panic("core: StepCovariance.Eigenvalues: need N ≥ 1")
	}
	lam := make([]float64, N)
	for k := range lam {
		lam[k] = c.Eigenvalue(k+1, N)
	}
	return lam
}

// DSTVector returns element j of the k-th normalised type-I discrete sine vector of length N
// (1 ≤ j, k ≤ N):
//
//	v_k(j) = √(2/(N+1)) · sin(jkπ/(N+1))
//
// The vectors v_1..v_N are orthonormal and are the eigenvectors of every N×N symmetric tridiagonal
// Toeplitz matrix, so V = [v_1 … v_N] satisfies Σ = V·diag(λ)·Vᵀ with λ from Eigenvalue, and
// y = Vᵀ·dx has independent components of variance λ_k. V is symmetric and V·V = I. DSTVector panics
// unless both indices are in 1..N.
//
// References:
//   - Michalet X., Berglund A.J. (2012) Optimal diffusion coefficient estimation in single-particle
//     tracking. Phys. Rev. E 85, 061916.
func DSTVector(k, j, N int) float64 {
	if k < 1 || k > N || j < 1 || j > N {
		panic("core: DSTVector: need 1 ≤ k, j ≤ N")
	}
	// Reduce jk modulo 2(N+1) so that the sine's argument stays below 2π and keeps full accuracy.
	m := (j * k) % (2 * (N + 1))
	return math.Sqrt(2/float64(N+1)) * math.Sin(float64(m)*math.Pi/float64(N+1))
}

// mustModel panics unless D ≥ 0, Δt > 0, 0 ≤ R ≤ 1/4 and s2 ≥ 0, all finite.
func mustModel(fn string, D, interval, blur, s2 float64) {
	if !(D >= 0) || math.IsInf(D, 1) {
		panic("core: " + fn + ": D must be non-negative and finite")
	}
	if !(interval > 0) || math.IsInf(interval, 1) {
		panic("core: " + fn + ": frame interval must be positive and finite")
	}
	if !(blur >= 0 && blur <= 0.25) {
		panic("core: " + fn + ": blur coefficient must be in [0, 1/4]")
	}
	if !(s2 >= 0) || math.IsInf(s2, 1) {
		panic("core: " + fn + ": localisation variance must be non-negative and finite")
	}
}
