package core

import (
	"math"
	"math/rand/v2"
)

// QuadraticForm describes an estimator of D that is, per axis of a track of N displacements, a
// tridiagonal Toeplitz quadratic form in the displacements plus a constant:
//
//	D̂ = dxᵀ·Q·dx + Const,   Q = tridiag(Off, Diag, Off)   (m²/s when dx is in m)
//
// averaged over axes and tracks of equal length.
type QuadraticForm struct {
	Diag, Off, Const float64
}

// CVEForm is the covariance-based estimator as a quadratic form: Diag = 1/(2NΔt), Off = 1/(2(N−1)Δt).
// N ≥ 2 displacements.
func CVEForm(interval float64, N int) QuadraticForm {
	if N < 2 {
		panic("core: CVEForm: need at least 2 displacements")
	}
	return QuadraticForm{Diag: 1 / (2 * float64(N) * interval), Off: 1 / (2 * float64(N-1) * interval)}
}

// KnownNoiseForm is the known-noise estimator as a quadratic form: Diag = 1/(2(1−2R)NΔt),
// Const = −s2/((1−2R)Δt). N ≥ 1 displacements.
func KnownNoiseForm(interval, blur, s2 float64, N int) QuadraticForm {
	if N < 1 {
		panic("core: KnownNoiseForm: need at least 1 displacement")
	}
	g := 1 - 2*blur
	return QuadraticForm{Diag: 1 / (2 * g * float64(N) * interval), Const: -s2 / (g * interval)}
}

// Spectral samples, exactly in distribution, the pooled estimate of D from M tracks of N displacements
// in d axes recorded with one localisation variance s2 and continuous-exposure blur R, for an estimator
// given as a QuadraticForm. The step covariance Σ = tridiag(b, a, b) and Q share the DST-I eigenvectors
// (DSTVector), so with θ_k = kπ/(N+1), y = Vᵀdx has independent components of variance
//
//	λ_k = a + 2b·cos θ_k = D·α_k + s2·β_k,   α_k = 2Δt(1−2R) + 4RΔt·cos θ_k,   β_k = 2 − 2cos θ_k
//
// and the pooled estimate, averaging dM independent copies of each mode, is
//
//	D̂ = Σ_k μ_k λ_k · G_k/(dM) + Const,   μ_k = Diag + 2·Off·cos θ_k,   G_k ~ Gamma(dM/2, scale 2)
//
// one gamma draw per mode whatever the number of tracks. A constant drift v (m/s, the same for every
// track) shifts each displacement's mean by vΔt; along an axis with drift, mode k of the M tracks
// summed is exactly (√λ_k·Z + √M·m_k)² + λ_k·Gamma((M−1)/2, 2), with m_k = vΔt·Σ_j v_k(j).
//
// References:
//   - Berglund A.J. (2010) Phys. Rev. E 82, 011917 (the tridiagonal covariance).
//   - Michalet X., Berglund A.J. (2012) Phys. Rev. E 85, 061916 (its DST-I diagonalisation).
type Spectral struct {
	form     QuadraticForm
	s2       float64
	interval float64
	tracks   int
	dims     int
	alpha    []float64 // μ_k·α_k
	beta     []float64 // μ_k·β_k
	ones     []float64 // Σ_j v_k(j)
	muA, muB []float64 // α_k, β_k themselves (for the drift modes)
	mu       []float64
}

// NewSpectral prepares the sampler. It panics on programmer misuse (N < 1, tracks < 1, dims outside
// 1..3, blur outside [0, 1/4], negative s2 or non-positive interval).
func NewSpectral(form QuadraticForm, interval, blur, s2 float64, N, tracks, dims int) *Spectral {
	if N < 1 || tracks < 1 || dims < 1 || dims > 3 || !(blur >= 0 && blur <= 0.25) || !(s2 >= 0) || !(interval > 0) {
		panic("core: NewSpectral: invalid arguments")
	}
	sp := &Spectral{form: form, s2: s2, interval: interval, tracks: tracks, dims: dims,
		alpha: make([]float64, N), beta: make([]float64, N), ones: make([]float64, N),
		muA: make([]float64, N), muB: make([]float64, N), mu: make([]float64, N)}
	norm := math.Sqrt(2 / float64(N+1))
	for k := 1; k <= N; k++ {
		th := float64(k) * math.Pi / float64(N+1)
		c := math.Cos(th)
		a := 2*interval*(1-2*blur) + 4*blur*interval*c
		b := 2 - 2*c
		m := form.Diag + 2*form.Off*c
		sp.alpha[k-1], sp.beta[k-1], sp.mu[k-1] = m*a, m*b, m
		sp.muA[k-1], sp.muB[k-1] = a, b
		// Σ_j sin(jθ) for j = 1..N = sin(Nθ/2)·sin((N+1)θ/2)/sin(θ/2).
		sp.ones[k-1] = norm * math.Sin(float64(N)*th/2) * math.Sin(float64(N+1)*th/2) / math.Sin(th/2)
	}
	return sp
}

// Modes returns the number of DST modes (the displacements per track, N).
func (sp *Spectral) Modes() int { return len(sp.alpha) }

// Sample draws one pooled estimate D̂ (m²/s) for true diffusion coefficient D (m²/s) and drift
// velocity drift (m/s per axis; nil = none).
func (sp *Spectral) Sample(r *rand.Rand, D float64, drift []float64) float64 {
	driftAxes := 0
	for _, v := range drift {
		if v != 0 {
			driftAxes++
		}
	}
	M := float64(sp.tracks)
	dM := float64(sp.dims) * M
	sum := 0.0
	if free := sp.dims - driftAxes; free > 0 {
		shape := float64(free) * M / 2
		sA, sB := 0.0, 0.0
		for k := range sp.alpha {
			g := 2 * Gamma(r, shape)
			sA += sp.alpha[k] * g
			sB += sp.beta[k] * g
		}
		sum += D*sA + sp.s2*sB
	}
	if driftAxes > 0 {
		sqM := math.Sqrt(M)
		for _, v := range drift {
			if v == 0 {
				continue
			}
			step := v * sp.interval
			for k := range sp.alpha {
				lam := D*sp.muA[k] + sp.s2*sp.muB[k]
				z := math.Sqrt(lam)*r.NormFloat64() + sqM*step*sp.ones[k]
				q := z * z
				if sp.tracks > 1 {
					q += lam * 2 * Gamma(r, (M-1)/2)
				}
				sum += sp.mu[k] * q
			}
		}
	}
	return sum/dM + sp.form.Const
}

// Gamma draws from the gamma distribution with shape k > 0 and unit scale, by Marsaglia and Tsang's
// squeeze method (with the Stuart boost U^(1/k) for k < 1).
//
// References:
//   - Marsaglia G., Tsang W.W. (2000) A simple method for generating gamma variables. ACM Trans. Math.
//     Softw. 26, 363–372.
func Gamma(r *rand.Rand, k float64) float64 {
	if !(k > 0) {
		panic("core: Gamma: shape must be positive")
	}
	if k < 1 {
		u := r.Float64()
		return Gamma(r, k+1) * math.Pow(u, 1/k)
	}
	d := k - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := r.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := r.Float64()
		x2 := x * x
		if u < 1-0.0331*x2*x2 {
			return d * v
		}
		if math.Log(u) < 0.5*x2+d*(1-v+math.Log(v)) {
			return d * v
		}
	}
}
