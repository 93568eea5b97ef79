package core

import "math"

// KnownNoise estimates the diffusion coefficient from tracks when the localisation variance s2 (m² per
// axis) is known independently. Per axis of a track with N displacements, Δt = interval, R = blur:
//
//	D̂ = (⟨dx²⟩ − 2·s2) / (2(1 − 2R)Δt),   ⟨dx²⟩ = (1/N) Σ dx_k²
//
// unbiased for free diffusion. Axes are averaged and tracks pooled by the mean of their estimates
// weighted by their numbers of displacements N_i, which here equals the estimate from the pooled sum of
// squares. With s2 = 0 and R = 0 the estimate from d axes and Σ N_i = n displacements is exactly
// D·χ²(k)/k, k = d·n. The returned Estimate has S2 = NaN (σ² is given, not estimated).
//
// removeDrift subtracts each track's mean displacement m = (x_N − x_0)/N per axis. With the tridiagonal
// displacement covariance (a = 2DΔt(1−2R) + 2s2, b = −(s2 − 2RDΔt)),
//
//	E Σ (dx_k − m)² = (N−1)(a − 2b/N)
//
// so the plain formula would be biased by about −D/N. KnownNoise corrects this exactly:
//
//	D̂ = (Σ(dx_k − m)²/(N−1) − 2·s2(1 + 1/N)) / (2Δt(1 − 2R(1 + 1/N)))
//
// Tracks need 2 points (3 with drift removal). interval must be positive and finite, blur within
// [0, 1/4] and s2 non-negative and finite (a *RangeError otherwise); data errors are as for CVE.
//
// References:
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
//   - Qian H., Sheetz M.P., Elson E.L. (1991) Biophys. J. 60, 910 (the χ² law without noise).
func KnownNoise(tracks []Track, interval, blur, s2 float64, removeDrift bool) (Estimate, error) {
	if err := checkEstimatorArgs(interval, blur); err != nil {
		return Estimate{}, err
	}
	if err := checkRange("s2_m2", s2, 0, math.MaxFloat64, "known localisation variance, non-negative and finite"); err != nil {
		return Estimate{}, err
	}
	var est Estimate
	var err error
	if removeDrift {
		est, err = pool(tracks, 3, "drift removal needs 2 displacements", func(p []float64) (float64, float64) {
			s0, _ := laggedSums(p, meanStep(p))
			n := float64(len(p) - 1)
			f := 1 + 1/n
			return (s0/(n-1) - 2*s2*f) / (2 * interval * (1 - 2*blur*f)), 0
		})
	} else {
		est, err = pool(tracks, 2, "a displacement needs 2 points", func(p []float64) (float64, float64) {
			var s0 float64
			for k := 1; k < len(p); k++ {
				d := p[k] - p[k-1]
				s0 += d * d
			}
			return (s0/float64(len(p)-1) - 2*s2) / (2 * (1 - 2*blur) * interval), 0
		})
	}
	if err != nil {
		return Estimate{}, err
	}
	est.S2 = math.NaN()
	return est, nil
}
