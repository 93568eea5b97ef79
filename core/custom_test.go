package core

import (
	"errors"
	"math"
	"testing"
)

// invented example: a buffer with 1.10 mPa·s at 25 °C, 2 % uncertainty, −0.024 1/K.
var testBuffer = CustomMedium{ViscosityRef: 1.10e-3, TRef: 298.15, RelU: 0.02, TempCoeff: -0.024}

func TestCustomMediumLaw(t *testing.T) {
	// Exact identities of η(T) = η_ref·exp(c(T − T_ref)), tolerance 1e-12 relative.
	c := testBuffer
	if eta, err := c.Viscosity(c.TRef); err != nil || eta != c.ViscosityRef {
		t.Errorf("η(TRef) = %g, %v; want %g", eta, err, c.ViscosityRef)
	}
	for _, T := range []float64{280, 290.5, 305, 320} {
		a, _ := c.Viscosity(T)
		b, _ := c.Viscosity(T + 1)
		if r := b / a; math.Abs(r/math.Exp(c.TempCoeff)-1) > 1e-12 {
			t.Errorf("η(%g + 1)/η(%g) = %.15g, want exp(c) = %.15g", T, T, r, math.Exp(c.TempCoeff))
		}
		if d, err := c.DLnEtaDT(T); err != nil || d != c.TempCoeff {
			t.Errorf("DLnEtaDT(%g) = %g, %v; want %g", T, d, err, c.TempCoeff)
		}
		if u := c.RelativeUncertainty(T); u != c.RelU {
			t.Errorf("RelativeUncertainty(%g) = %g, want %g", T, u, c.RelU)
		}
	}
	// TempCoeff = 0: no temperature dependence.
	flat := CustomMedium{ViscosityRef: 2e-3, TRef: 293.15, RelU: 0.05}
	if eta, _ := flat.Viscosity(310); eta != 2e-3 {
		t.Errorf("constant medium at 310 K: %g", eta)
	}
}

func TestCustomMediumValidate(t *testing.T) {
	if err := testBuffer.Validate(); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		m     CustomMedium
		field string
		value float64
	}{
		{CustomMedium{ViscosityRef: 0, TRef: 298.15}, "viscosity_mPa_s", 0},
		{CustomMedium{ViscosityRef: -1e-3, TRef: 298.15}, "viscosity_mPa_s", -1},
		{CustomMedium{ViscosityRef: 2e4, TRef: 298.15}, "viscosity_mPa_s", 2e7},
		{CustomMedium{ViscosityRef: math.NaN(), TRef: 298.15}, "viscosity_mPa_s", math.NaN()},
		{CustomMedium{ViscosityRef: 1e-3, TRef: 25}, "reference_temperature_K", 25}, // °C typed as K
		{CustomMedium{ViscosityRef: 1e-3, TRef: 298.15, RelU: -0.01}, "viscosity_relative_uncertainty", -0.01},
		{CustomMedium{ViscosityRef: 1e-3, TRef: 298.15, RelU: 2}, "viscosity_relative_uncertainty", 2},
		{CustomMedium{ViscosityRef: 1e-3, TRef: 298.15, TempCoeff: -0.5}, "viscosity_temperature_coefficient_per_K", -0.5},
	} {
		err := c.m.Validate()
		wantRangeError(t, "Validate", err, c.field)
		var re *RangeError
		if errors.As(err, &re) && !(re.Value == c.value || math.IsNaN(re.Value) && math.IsNaN(c.value)) {
			t.Errorf("%+v: RangeError value %g, want %g (in the field's unit)", c.m, re.Value, c.value)
		}
		_, err = c.m.Viscosity(298.15)
		wantRangeError(t, "Viscosity", err, c.field)
		_, err = c.m.DLnEtaDT(298.15)
		wantRangeError(t, "DLnEtaDT", err, c.field)
	}
}

func TestCustomMediumTemperatureWindow(t *testing.T) {
	c := testBuffer
	for _, T := range []float64{c.TRef - CustomMaxExtrapolationK, c.TRef + CustomMaxExtrapolationK} {
		if _, err := c.Viscosity(T); err != nil {
			t.Errorf("Viscosity(%g) at the edge of the window: %v", T, err)
		}
	}
	for _, T := range []float64{c.TRef - 25.01, c.TRef + 25.01, math.NaN()} {
		_, err := c.Viscosity(T)
		wantRangeError(t, "Viscosity", err, "temperature_K")
		_, err = c.DLnEtaDT(T)
		wantRangeError(t, "DLnEtaDT", err, "temperature_K")
	}
}
