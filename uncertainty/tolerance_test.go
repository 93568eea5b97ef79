package uncertainty

import (
	"math"
	"testing"
)

func TestDecimalFormJCGM101Examples(t *testing.T) {
	// JCGM 101:2008 clause 7.9.2, Examples 1–3 (from memory): the mass of a nominal 100 g standard,
	// y = 100.021 47 g with u(y) = 0.000 35 g (the GUM 7.2.2 example); with n_dig = 2, u(y) = 35 × 10^−5 g
	// and δ = ½ × 10^−5 g = 0.000 005 g; with n_dig = 1, u(y) = 4 × 10^−4 g and δ = 0.000 05 g; a
	// temperature with u(y) = 2 K and n_dig = 1 gives 2 × 10^0 K and δ = 0.5 K.
	// The brief's own case, derived from the rule: u = 0.002 6 with n_dig = 2 is 26 × 10^−4, δ = 0.000 05.
	cases := []struct {
		z     float64
		ndig  int
		c     int64
		l     int
		delta float64
	}{
		{0.00035, 2, 35, -5, 0.000005},
		{0.00035, 1, 4, -4, 0.00005},
		{2, 1, 2, 0, 0.5},
		{0.0026, 2, 26, -4, 0.00005},
		// The rule itself (exact by construction):
		{2.0, 2, 20, -1, 0.05},       // 9.2.3: u(y) = 2.0 at n_dig = 2
		{2.0, 3, 200, -2, 0.005},     // ... and at n_dig = 3
		{10.15, 2, 10, 0, 0.5},       // 9.2.4: u(y) ≈ 10.15 at n_dig = 2
		{10.15, 1, 1, 1, 5},          // ... and at n_dig = 1
		{0.0754, 2, 75, -3, 0.0005},  // 9.3: u(δm) = 0.0754 mg at n_dig = 2
		{0.0999, 2, 10, -2, 0.005},   // rounding carries into a new digit: 9.99 → 10.0
		{1000, 2, 10, 2, 50},         // exact power of ten
		{1e-300, 1, 1, -300, 5e-301}, // far below 1
		{123456789, 3, 123, 6, 5e5},  // far above 1
		{-0.00035, 2, -35, -5, 0.000005},
	}
	for _, tc := range cases {
		c, l := DecimalForm(tc.z, tc.ndig)
		if c != tc.c || l != tc.l {
			t.Errorf("DecimalForm(%g, %d) = %d×10^%d, want %d×10^%d", tc.z, tc.ndig, c, l, tc.c, tc.l)
		}
		if d := NumericalTolerance(tc.z, tc.ndig); math.Abs(d-tc.delta) > 1e-12*tc.delta {
			t.Errorf("NumericalTolerance(%g, %d) = %g, want %g", tc.z, tc.ndig, d, tc.delta)
		}
	}
	if c, l := DecimalForm(0, 2); c != 0 || l != 0 || NumericalTolerance(0, 2) != 0 {
		t.Errorf("zero: got %d×10^%d, δ = %g; want 0, 0, 0", c, l, NumericalTolerance(0, 2))
	}
}

func TestDecimalFormMantissaHasNDigits(t *testing.T) {
	// Exact identity of the rule: c has exactly n_dig digits and |c×10^l − z| ≤ ½×10^l = δ, for values
	// spread over many decades (a deterministic grid, no randomness).
	for e := -20; e <= 20; e++ {
		for _, m := range []float64{1, 1.0000001, 1.5, 2.5, 3.14159, 9.49999, 9.5, 9.99, 9.999999} {
			z := m * math.Pow10(e)
			for ndig := 1; ndig <= 6; ndig++ {
				c, l := DecimalForm(z, ndig)
				if c < int64(math.Pow10(ndig-1)) || c >= int64(math.Pow10(ndig)) {
					t.Fatalf("DecimalForm(%g, %d): c = %d does not have %d digits", z, ndig, c, ndig)
				}
				delta := NumericalTolerance(z, ndig)
				if got := float64(c) * math.Pow10(l); math.Abs(got-z) > delta*(1+1e-9) {
					t.Fatalf("DecimalForm(%g, %d) = %d×10^%d is further than δ = %g from z", z, ndig, c, l, delta)
				}
			}
		}
	}
}

func TestDecimalFormPanicsOnMisuse(t *testing.T) {
	for name, f := range map[string]func(){
		"ndig 0":  func() { DecimalForm(1, 0) },
		"ndig 16": func() { NumericalTolerance(1, 16) },
		"NaN":     func() { DecimalForm(math.NaN(), 2) },
		"Inf":     func() { NumericalTolerance(math.Inf(1), 2) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic", name)
				}
			}()
			f()
		}()
	}
}
