package core

import (
	"math"
	"math/rand/v2"
	"testing"
)

func TestSurvivalBranchesAgree(t *testing.T) {
	// The eigenfunction series and the image series are two exact forms of the same law; where both
	// converge quickly (τ = Dt/h² near the switch at 0.02) they must agree to 1e-12.
	h, D := 1.0, 1.0
	for _, tau := range []float64{0.01, 0.015, 0.02, 0.03, 0.05} {
		img := survivalShort(tau)
		eig := 0.0
		for n := 1; n < 4001; n += 2 {
			fn := float64(n)
			eig += 8 / (fn * fn * math.Pi * math.Pi) * math.Exp(-fn*fn*math.Pi*math.Pi*tau)
		}
		if math.Abs(img-eig) > 1e-12 {
			t.Errorf("τ=%g: image %.15f, eigen %.15f", tau, img, eig)
		}
		_ = Survival(tau*h*h/D, h, D)
	}
	if Survival(0, 1, 1) != 1 {
		t.Error("S(0) != 1")
	}
}

func TestMeanResidenceIsIntegralOfSurvival(t *testing.T) {
	// Exact identity: ⟨T⟩ = ∫₀^∞ S(t) dt = h²/(12D). Simpson's rule on a fine grid (the √t cusp at 0
	// limits the accuracy to about 1e-7 relative).
	h, D := 2e-6, 3e-12
	T := MeanResidence(h, D)
	tMax := 3 * h * h / D // S < 1e-12 beyond
	n := 200000
	dt := tMax / float64(n)
	sum := Survival(0, h, D) + Survival(tMax, h, D)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		sum += w * Survival(float64(i)*dt, h, D)
	}
	integral := sum * dt / 3
	if math.Abs(integral-T)/T > 1e-6 {
		t.Errorf("∫S = %.9g, h²/(12D) = %.9g", integral, T)
	}
}

func TestSurvivalBySimulation(t *testing.T) {
	// Brownian walkers started uniformly in [0, h], stepped exactly with Gaussian increments, with the
	// exact Brownian-bridge probability of crossing a face between two steps,
	// P = exp(−2·d₀·d₁/(2DΔ)) per face (Borodin & Salminen, Handbook of Brownian Motion, from memory).
	// The two faces are treated independently within a step, an error of order exp(−h²/(DΔ)), nil here.
	const walkers = 20000
	h, D := 1.0, 1.0
	step := 1e-4
	checks := []float64{0.01, 0.05, 0.1, 0.2}
	rng := rand.New(rand.NewPCG(1, 2))
	alive := make([]int, len(checks))
	sd := math.Sqrt(2 * D * step)
	for w := 0; w < walkers; w++ {
		x := rng.Float64() * h
		tNow := 0.0
		c := 0
		for c < len(checks) {
			x1 := x + sd*rng.NormFloat64()
			dead := x1 <= 0 || x1 >= h
			if !dead {
				p0 := math.Exp(-2 * x * x1 / (2 * D * step))
				p1 := math.Exp(-2 * (h - x) * (h - x1) / (2 * D * step))
				dead = rng.Float64() < p0 || rng.Float64() < p1
			}
			if dead {
				break
			}
			x = x1
			tNow += step
			for c < len(checks) && tNow >= checks[c]-1e-12 {
				alive[c]++
				c++
			}
		}
	}
	for i, tc := range checks {
		p := Survival(tc, h, D)
		got := float64(alive[i]) / walkers
		se := math.Sqrt(p * (1 - p) / walkers)
		if math.Abs(got-p) > 4*se {
			t.Errorf("S(%g): simulated %.4f, theory %.4f (4 SE = %.4f)", tc, got, p, 4*se)
		}
	}
}

func TestExpectedFrames(t *testing.T) {
	// With frames far apart compared to the residence the first frame is all one gets.
	if f := ExpectedFrames(1e-6, 1e-12, 100, 50); math.Abs(f-1) > 1e-12 {
		t.Errorf("frames far apart: %g, want 1", f)
	}
	// With very short frames, frames·Δt approaches the mean residence h²/(12D) (Riemann sum of S;
	// the error is of order Δt/2 in time, i.e. half a frame).
	h, D, dt := 1e-6, 1e-12, 1e-4
	f := ExpectedFrames(h, D, dt, 1<<30)
	want := MeanResidence(h, D)/dt + 0.5
	if math.Abs(f-want) > 0.01*want {
		t.Errorf("fine frames: %g, want ≈ %g", f, want)
	}
	// The cap is respected.
	if f := ExpectedFrames(h, D, dt, 10); f > 10 || f < 9 {
		t.Errorf("capped: %g", f)
	}
}
