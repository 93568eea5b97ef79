package core

import "math"

// MeanResidence returns the mean time in s that a particle starting uniformly inside a focal slab of
// depth h (m) stays inside it before first reaching either face, when it diffuses along the optical
// axis with coefficient D (m²/s):
//
//	⟨T⟩ = h² / (12 D)
//
// References:
//   - Redner S., A Guide to First-Passage Processes (2001), ch. 2 (absorbing interval; from memory).
func MeanResidence(h, D float64) float64 {
	mustPositive("MeanResidence", h, D)
	return h * h / (12 * D)
}

// Survival returns S(t), the probability that a particle that started uniformly inside a focal slab of
// depth h (m) is still inside at time t ≥ 0 (s), diffusing with D (m²/s) and absorbed at both faces:
//
//	S(t) = Σ_{n odd} 8/(n²π²) · exp(−n²π² D t / h²)
//
// For short times (D t / h² < 0.02) the image form of the same law is used, which converges fast there:
//
//	τ = D t / h²,  ierfc(x) = exp(−x²)/√π − x·erfc(x)
//	S(t) = 1 − 4√(τ/π) + 8√τ Σ_{k≥1} (−1)^(k+1) ierfc(k / (2√τ))
//
// References:
//   - Carslaw H.S. & Jaeger J.C., Conduction of Heat in Solids (1959), §3.3 (slab, from memory).
func Survival(t, h, D float64) float64 {
	mustPositive("Survival", h, D)
	if t < 0 || math.IsNaN(t) {
		panic("core: Survival: negative time")
	}
	if t == 0 {
		return 1
	}
	tau := D * t / (h * h)
	if tau < 0.02 {
		return survivalShort(tau)
	}
	sum := 0.0
	for n := 1; ; n += 2 {
		fn := float64(n)
		e := math.Exp(-fn * fn * math.Pi * math.Pi * tau)
		sum += 8 / (fn * fn * math.Pi * math.Pi) * e
		if e < 1e-18 {
			break
		}
	}
	return sum
}

// survivalShort evaluates S at dimensionless time tau = Dt/h² by images: the loss through the two
// faces of a uniform initial profile, with each image correction of the finite slab.
func survivalShort(tau float64) float64 {
	s := math.Sqrt(tau)
	// Each face of a half-infinite medium alone loses the fraction 2√(τ/π); the alternating images of
	// the finite slab add terms that are exponentially small (exp(−k²/(4τ))).
	sum := 0.0
	for k := 1; k < 50; k++ {
		x := float64(k) / (2 * s)
		term := math.Exp(-x*x)/math.SqrtPi - x*math.Erfc(x)
		if k%2 == 1 {
			sum += term
		} else {
			sum -= term
		}
		if term < 1e-18 {
			break
		}
	}
	return 1 - 4*s/math.SqrtPi + 8*s*sum
}

// ExpectedFrames returns the expected number of frames in which a particle is recorded before it leaves
// a focal slab of depth h (m), for frames every interval (s), starting in focus at frame 0, and at most
// maxFrames frames (≥ 1):
//
//	E[frames] = Σ_{k=0}^{maxFrames−1} S(k·Δt)
//
// It treats a particle as lost at its first exit (no re-entry into the same track).
func ExpectedFrames(h, D, interval float64, maxFrames int) float64 {
	mustPositive("ExpectedFrames", h, D, interval)
	if maxFrames < 1 {
		panic("core: ExpectedFrames: maxFrames < 1")
	}
	sum := 0.0
	for k := 0; k < maxFrames; k++ {
		s := Survival(float64(k)*interval, h, D)
		sum += s
		if s < 1e-12 {
			break
		}
	}
	return sum
}
