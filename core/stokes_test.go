package core

import (
	"math"
	"testing"
)

func TestStokesEinsteinRoundTrip(t *testing.T) {
	// Exact identity: Radius(Diffusion(r)) == r.
	for _, r := range []float64{1e-9, 5e-8, 1e-6} {
		D := Diffusion(298.15, 0.89e-3, r)
		if got := Radius(298.15, 0.89e-3, D); math.Abs(got-r)/r > 1e-12 {
			t.Errorf("round trip r=%g: got %g", r, got)
		}
	}
}

func TestStokesEinsteinValue(t *testing.T) {
	// Hand computation: k_B·T/(6π·η·r) with k_B = 1.380649e-23 J/K (SI brochure), T = 298.15 K,
	// η = 0.890 mPa·s, r = 50 nm gives 4.9075e-12 m²/s (computed by hand to 5 digits: 4.11641e-21 J /
	// 8.38805e-10 kg/s).
	D := Diffusion(298.15, 0.890e-3, 50e-9)
	if math.Abs(D-4.9075e-12) > 0.00005e-12 {
		t.Errorf("D = %.6g, want 4.9075e-12", D)
	}
	// Einstein relation: mobility times k_B T equals D.
	if b := Mobility(0.890e-3, 50e-9); math.Abs(b*Boltzmann*298.15-D)/D > 1e-12 {
		t.Errorf("Einstein relation broken: b·kT = %g, D = %g", b*Boltzmann*298.15, D)
	}
}

func TestDiffusionPanicsOnMisuse(t *testing.T) {
	defer func() {
		if recover() == nil {
			t.Fatal("no panic on negative radius")
		}
	}()
	Diffusion(298.15, 1e-3, -1)
}
