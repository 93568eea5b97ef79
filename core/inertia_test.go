package core

import (
	"math"
	"testing"
)

func TestMomentumRelaxation(t *testing.T) {
	// Exact identity m/(6πηa) with m = (4/3)πa³ρ_p equals 2ρ_p a²/(9η).
	rho, a, eta := 1050.0, 50e-9, 0.89e-3
	m := 4.0 / 3 * math.Pi * a * a * a * rho
	if got, want := MomentumRelaxation(rho, a, eta), m/Friction(eta, a); math.Abs(got-want)/want > 1e-12 {
		t.Errorf("τ_p = %g, m/f = %g", got, want)
	}
	// Hand computation for a 50 nm polystyrene-density sphere in water: 2·1050·(5e-8)²/(9·0.89e-3)
	// = 6.554e-10 s, i.e. well under a nanosecond (common practice, no source: colloids are overdamped
	// on camera time scales).
	if got := MomentumRelaxation(rho, a, eta); math.Abs(got-6.5543e-10) > 0.0001e-10 {
		t.Errorf("τ_p = %.5g, want 6.5543e-10", got)
	}
}

func TestCheckInertia(t *testing.T) {
	tau := 1e-9
	if err := CheckInertia(tau, 0.033, 0.01); err != nil {
		t.Errorf("camera frames flagged: %v", err)
	}
	if err := CheckInertia(tau, 50e-9, 0); err == nil {
		t.Error("50 ns frames not flagged")
	}
	if err := CheckInertia(tau, 0.033, 20e-9); err == nil {
		t.Error("20 ns exposure not flagged")
	}
	if err := CheckInertia(tau, 0.033, 0); err != nil {
		t.Errorf("stroboscopic exposure flagged: %v", err)
	}
}
