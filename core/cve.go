package core

import "math"

// CVE estimates the diffusion coefficient and the localisation variance from tracks with the
// covariance-based estimator. Per axis of a track with N displacements dx_k (⟨dx²⟩ averaged over the N
// terms, ⟨dx_k dx_{k+1}⟩ over the N−1 neighbouring pairs), Δt = interval and R = blur:
//
//	D̂  = ⟨dx²⟩/(2Δt) + ⟨dx_k dx_{k+1}⟩/Δt
//	ŝ2 = R⟨dx²⟩ + (2R − 1)⟨dx_k dx_{k+1}⟩
//
// Both are unbiased for free diffusion observed with localisation variance s2 and motion blur R. Axes
// are averaged; tracks are pooled by the mean of their estimates weighted by their numbers of
// displacements (unbiased, since every track estimate is).
//
// removeDrift subtracts each track's mean displacement m = (x_N − x_0)/N per axis, which removes any
// constant drift exactly. The centred sums are then biased by O(1/N): with a = 2DΔt(1−2R) + 2s2 and
// b = −(s2 − 2RDΔt) the diagonal and off-diagonal of the (tridiagonal) displacement covariance,
//
//	E Σ_k (dx_k − m)²               = (N−1)·a − 2(N−1)/N·b
//	E Σ_k (dx_k − m)(dx_{k+1} − m)  = −(N−1)/N·a + (N³ − 3N² + 2N + 2)/N²·b
//
// (so ⟨dx²⟩ falls by about (a + 2b)/N = 2DΔt/N and the lag-1 mean by about the same). CVE corrects this
// exactly: it solves these two equations for (â, b̂) and returns D̂ = (â + 2b̂)/(2Δt) and
// ŝ2 = Râ + (2R − 1)b̂, again unbiased. The system's determinant (N−1)(N−2)²(N+1)/N² vanishes at N = 2,
// so drift removal needs at least 3 displacements (4 points) per track; without it, 3 points.
//
// interval must be positive and finite and blur within [0, 1/4] (a *RangeError otherwise). Errors for
// data: ErrNoTracks, ErrDimsDiffer, ErrRagged, ErrNonFinite and a *RangeError (field "points", wrapped
// with the track index) for a track that is too short.
//
// References:
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
func CVE(tracks []Track, interval, blur float64, removeDrift bool) (Estimate, error) {
	if err := checkEstimatorArgs(interval, blur); err != nil {
		return Estimate{}, err
	}
	if removeDrift {
		return pool(tracks, 4, "the drift-corrected covariance estimator needs 3 displacements", func(p []float64) (float64, float64) {
			return cveCentred(p, interval, blur)
		})
	}
	return pool(tracks, 3, "the covariance estimator needs a lag-1 pair of displacements", func(p []float64) (float64, float64) {
		return cveAxis(p, interval, blur)
	})
}

// CVETrack is the covariance-based estimate (see CVE, without drift removal) from a single track: D in
// m²/s and s2 in m², averaged over the axes, and n the number of displacements per axis. For a track with
// fewer than 3 points, or no axes, D and s2 are NaN. It panics if interval is not positive and finite or
// blur is outside [0, 1/4] (callers validate first).
//
// References:
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Phys. Rev. E 89, 022726.
func CVETrack(tr Track, interval, blur float64) (D, s2 float64, n int) {
	if err := checkEstimatorArgs(interval, blur); err != nil {
		panic("core: CVETrack: " + err.Error())
	}
	pts := tr.Len()
	n = max(pts-1, 0)
	if pts < 3 || tr.Dims() == 0 {
		return math.NaN(), math.NaN(), n
	}
	for _, p := range tr.Pos {
		if len(p) != pts {
			panic("core: CVETrack: axes of the track differ in length")
		}
		d, s := cveAxis(p, interval, blur)
		D += d
		s2 += s
	}
	return D / float64(tr.Dims()), s2 / float64(tr.Dims()), n
}

// cveAxis is the covariance-based estimate from one axis (len(pos) ≥ 3).
func cveAxis(pos []float64, dt, R float64) (D, s2 float64) {
	s0, s1 := laggedSums(pos, 0)
	n := float64(len(pos) - 1)
	m2, m1 := s0/n, s1/(n-1)
	return m2/(2*dt) + m1/dt, R*m2 + (2*R-1)*m1
}

// cveCentred is the drift-corrected covariance-based estimate from one axis (len(pos) ≥ 4).
func cveCentred(pos []float64, dt, R float64) (D, s2 float64) {
	s0, s1 := laggedSums(pos, meanStep(pos))
	a0, b0, a1, b1 := centredMoments(len(pos) - 1)
	det := a0*b1 - b0*a1
	a := (b1*s0 - b0*s1) / det
	b := (a0*s1 - a1*s0) / det
	return (a + 2*b) / (2 * dt), R*a + (2*R-1)*b
}

// centredMoments returns the coefficients of the expected centred sums of n displacements with
// tridiagonal Toeplitz covariance (a on the diagonal, b beside it):
//
//	E Σ (dx_k − m)²              = a0·a + b0·b
//	E Σ (dx_k − m)(dx_{k+1} − m) = a1·a + b1·b
//
// Derivation: with m = (1/n)Σdx_j, E[dx_k m] = (a + 2b)/n inside and (a + b)/n at both ends, and
// E[m²] = (na + 2(n−1)b)/n².
func centredMoments(n int) (a0, b0, a1, b1 float64) {
	N := float64(n)
	a0 = N - 1
	b0 = -2 * (N - 1) / N
	a1 = -(N - 1) / N
	b1 = (N*N*N - 3*N*N + 2*N + 2) / (N * N)
	return a0, b0, a1, b1
}
