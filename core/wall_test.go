package core

import (
	"errors"
	"math"
	"testing"
)

func TestBrennerTable(t *testing.T) {
	// Brenner 1961, Chem. Eng. Sci. 16, 242, Table 1: α and the correction factor λ = D₀/D⊥,
	// printed to four decimals (values from memory; the α = 3.0 entry as remembered, 1.1269, disagrees
	// with the method-of-reflections limit 1.1252 at z/a = 10.07 and is left out as a memory error).
	for _, c := range []struct{ alpha, lambda float64 }{
		{0.5, 9.2518},
		{1.0, 3.0361},
		{1.5, 1.8375},
		{2.0, 1.4129},
		{2.5, 1.2220},
	} {
		a := 1.0
		z := math.Cosh(c.alpha)
		f, err := BrennerPerpendicular(a, z)
		if err != nil {
			t.Fatal(err)
		}
		if got := 1 / f; math.Abs(got-c.lambda) > 0.5e-4 {
			t.Errorf("α=%.1f: λ = %.5f, want %.4f (Brenner 1961 Table 1)", c.alpha, got, c.lambda)
		}
	}
}

func TestWallFarField(t *testing.T) {
	// Method of reflections (Happel & Brenner 1965, from memory): D⊥/D₀ = 1 − (9/8)(a/z) + ½(a/z)³ + O((a/z)⁴),
	// D∥/D₀ = 1 − (9/16)(a/z) + O((a/z)³). At z/a = 100 the next terms are below 1e-7.
	for _, zr := range []float64{100, 300, 1000} {
		s := 1 / zr
		perp, _ := BrennerPerpendicular(1, zr)
		if want := 1 - 9.0/8*s + 0.5*s*s*s; math.Abs(perp-want) > 2*s*s*s*s {
			t.Errorf("z/a=%g: D⊥/D₀ = %.12f, far field %.12f", zr, perp, want)
		}
		par, _ := FaxenParallel(1, zr)
		if want := 1 - 9.0/16*s; math.Abs(par-want) > s*s*s {
			t.Errorf("z/a=%g: D∥/D₀ = %.12f, far field %.12f", zr, par, want)
		}
	}
	// Far enough that the hyperbolic functions would overflow: the limit branch.
	if f, err := BrennerPerpendicular(1, 1e200); err != nil || f != 1-9.0/8*1e-200 {
		t.Errorf("very far: %v %v", f, err)
	}
}

func TestFaxenValue(t *testing.T) {
	// Exact arithmetic of the published polynomial at a/z = 1/2:
	// 1 − 9/32 + 1/64 − 45/4096 − 1/512 = 2958/4096... computed exactly: 4096 − 1152 + 64 − 45 − 8 = 2955.
	f, err := FaxenParallel(1, 2)
	if err != nil {
		t.Fatal(err)
	}
	if want := 2955.0 / 4096; math.Abs(f-want) > 1e-15 {
		t.Errorf("Faxén(z/a=2) = %.15f, want %.15f", f, want)
	}
}

func TestWallLimits(t *testing.T) {
	var re *RangeError
	if _, err := FaxenParallel(1, 1.49); !errors.As(err, &re) || re.Field != "wall_distance_radii" {
		t.Errorf("Faxén below 1.5 radii: err = %v", err)
	}
	if _, err := BrennerPerpendicular(1, 1.005); !errors.As(err, &re) || re.Min != BrennerMinDistance {
		t.Errorf("Brenner below limit: err = %v", err)
	}
	if _, err := FaxenParallel(0, 2); err == nil {
		t.Error("zero radius accepted")
	}
	if _, err := BrennerPerpendicular(1, math.NaN()); err == nil {
		t.Error("NaN distance accepted")
	}
	// Near contact the perpendicular mobility vanishes like the gap (lubrication, D⊥/D₀ ≈ (z−a)/a):
	// at 1 % gap it must be small and positive.
	if f, err := BrennerPerpendicular(1, 1.01); err != nil || !(f > 0 && f < 0.02) {
		t.Errorf("near contact: %v %v", f, err)
	}
}
