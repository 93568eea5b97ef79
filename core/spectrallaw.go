package core

// Law returns the exact distribution of the pooled estimate D̂ that Sample draws, for true diffusion
// coefficient D (m²/s) and a constant drift velocity drift (m/s per axis; nil = none), as a weighted
// sum of chi-squared variates (see Spectral for the notation):
//
//	D̂ = Const + Σ_k (μ_k λ_k/(dM))·[ χ²(d_f·M)_k + Σ_{drift axes a} χ²(M; M·(v_aΔt·Σ_j v_k(j))²/λ_k)_k ]
//
// with d_f the axes without drift and all variates independent. Along a drifting axis, mode k summed
// over the M tracks is (√λ_k·Z + √M·m_k)² + λ_k·χ²(M − 1) = λ_k·χ²(M; M·m_k²/λ_k), a non-central
// chi-squared variate. Its CDF, density and quantiles follow by ChiSquaredSum (Imhof's inversion).
// Modes with λ_k = 0 (possible only at the edge R = 1/4, s2 = 0) are exactly 0 and left out.
//
// References:
//   - Imhof J.P. (1961) Biometrika 48, 419–426 (the law of a quadratic form in normal variables).
//   - Michalet X., Berglund A.J. (2012) Phys. Rev. E 85, 061916 (the DST-I diagonalisation).
func (sp *Spectral) Law(D float64, drift []float64) ChiSquaredSum {
	if !(D >= 0) {
		panic("core: Spectral.Law: D must be non-negative")
	}
	if len(drift) != 0 && len(drift) != sp.dims {
		panic("core: Spectral.Law: drift needs one velocity per axis")
	}
	driftAxes := 0
	for _, v := range drift {
		if v != 0 {
			driftAxes++
		}
	}
	M := float64(sp.tracks)
	dM := float64(sp.dims) * M
	q := ChiSquaredSum{Const: sp.form.Const, Terms: make([]ChiSquaredTerm, 0, len(sp.alpha)*(1+driftAxes))}
	for k := range sp.alpha {
		lam := D*sp.muA[k] + sp.s2*sp.muB[k]
		if lam <= 0 {
			continue
		}
		w := sp.mu[k] * lam / dM
		if free := sp.dims - driftAxes; free > 0 {
			q.Terms = append(q.Terms, ChiSquaredTerm{Weight: w, DOF: float64(free) * M})
		}
		for _, v := range drift {
			if v == 0 {
				continue
			}
			m := v * sp.interval * sp.ones[k]
			q.Terms = append(q.Terms, ChiSquaredTerm{Weight: w, DOF: M, NonCentrality: M * m * m / lam})
		}
	}
	return q
}
