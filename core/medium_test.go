package core

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The media implement Medium.
var (
	_ Medium = Water{}
	_ Medium = GlycerolWater{}
	_ Medium = CustomMedium{}
)

// richardsonDerivative returns df/dx at x from central differences of step h, h/2 and h/4 combined
// by two levels of Richardson extrapolation (error O(h⁶)); it is independent of any analytic
// derivative under test.
func richardsonDerivative(f func(float64) float64, x, h float64) float64 {
	central := func(h float64) float64 { return (f(x+h) - f(x-h)) / (2 * h) }
	d1, d2, d4 := central(h), central(h/2), central(h/4)
	r1 := (4*d2 - d1) / 3
	r2 := (4*d4 - d2) / 3
	return (16*r2 - r1) / 15
}

// lnEta returns ln η(T) of m, failing the test on an error.
func lnEta(t *testing.T, m Medium) func(float64) float64 {
	return func(T float64) float64 {
		eta, err := m.Viscosity(T)
		if err != nil {
			t.Fatalf("%s: Viscosity(%g): %v", m.Name(), T, err)
		}
		return math.Log(eta)
	}
}

// wantRangeError fails unless err is a *RangeError naming field.
func wantRangeError(t *testing.T, what string, err error, field string) {
	t.Helper()
	var re *RangeError
	if !errors.As(err, &re) {
		t.Errorf("%s: error %v is not a *RangeError", what, err)
		return
	}
	if re.Field != field {
		t.Errorf("%s: RangeError names %q, want %q (%v)", what, re.Field, field, err)
	}
	if !strings.Contains(err.Error(), field) {
		t.Errorf("%s: message %q does not name %q", what, err.Error(), field)
	}
}

func TestMediaDLnEtaDTRichardson(t *testing.T) {
	// Each analytic d ln η/dT against a sixth-order finite difference of ln η (step 0.4 K; the
	// truncation and rounding errors are about 1e-11 relative for these smooth functions, so the
	// 1e-9 tolerance checks the analytic formula, not the difference scheme).
	media := []Medium{
		Water{}, Water{PressureMPa: 1}, Water{PressureMPa: 10}, Water{PressureMPa: 50}, Water{PressureMPa: 100},
		GlycerolWater{}, GlycerolWater{MassFraction: 0.3}, GlycerolWater{MassFraction: 0.5},
		GlycerolWater{MassFraction: 0.8}, GlycerolWater{MassFraction: 0.95}, GlycerolWater{MassFraction: 1},
		CustomMedium{ViscosityRef: 1.2e-3, TRef: 298.15, RelU: 0.02, TempCoeff: -0.031},
		CustomMedium{ViscosityRef: 1.2e-3, TRef: 298.15, RelU: 0.02},
	}
	worst := 0.0
	for _, m := range media {
		for _, T := range []float64{275, 283.15, 293.15, 298.15, 310.15, 323.15, 343.15, 363.15, 372} {
			const h = 0.4
			_, errLo := m.Viscosity(T - h)
			_, errHi := m.Viscosity(T + h)
			if errLo != nil || errHi != nil {
				continue // the stencil leaves a custom medium's window
			}
			got, err := m.DLnEtaDT(T)
			if err != nil {
				t.Fatalf("%s %+v: DLnEtaDT(%g): %v", m.Name(), m, T, err)
			}
			want := richardsonDerivative(lnEta(t, m), T, h)
			d := math.Abs(got - want)
			if want != 0 {
				d /= math.Abs(want)
			}
			worst = math.Max(worst, d)
			if d > 1e-9 {
				t.Errorf("%s %+v at %g K: DLnEtaDT = %.12g, finite difference %.12g (rel. diff %.2g)",
					m.Name(), m, T, got, want, d)
			}
		}
	}
	t.Logf("largest relative difference analytic vs Richardson: %.2g", worst)
}

func TestMediaRejectNaNTemperature(t *testing.T) {
	for _, m := range []Medium{Water{}, GlycerolWater{MassFraction: 0.5},
		CustomMedium{ViscosityRef: 1e-3, TRef: 298.15, RelU: 0.01}} {
		_, err := m.Viscosity(math.NaN())
		wantRangeError(t, m.Name()+" Viscosity(NaN)", err, "temperature_K")
		_, err = m.DLnEtaDT(math.NaN())
		wantRangeError(t, m.Name()+" DLnEtaDT(NaN)", err, "temperature_K")
	}
}

func TestMediaNames(t *testing.T) {
	// Medium's documented identifiers.
	for m, want := range map[Medium]string{Water{}: "water", GlycerolWater{}: "glycerol", CustomMedium{}: "custom"} {
		if got := m.Name(); got != want {
			t.Errorf("Name() = %q, want %q", got, want)
		}
	}
}

func TestMediumByName(t *testing.T) {
	m, err := MediumByName("water", 0.7, 0)
	if err != nil {
		t.Fatal(err)
	}
	if m != (Water{}) {
		t.Errorf(`MediumByName("water", 0.7, 0) = %#v, want Water{}`, m)
	}
	m, err = MediumByName("water", 0, 5)
	if err != nil || m != (Water{PressureMPa: 5}) {
		t.Errorf(`MediumByName("water", 0, 5) = %#v, %v`, m, err)
	}
	m, err = MediumByName("glycerol", 0.6, -3)
	if err != nil || m != (GlycerolWater{MassFraction: 0.6}) {
		t.Errorf(`MediumByName("glycerol", 0.6, -3) = %#v, %v`, m, err)
	}

	_, err = MediumByName("water", 0, 150)
	wantRangeError(t, "water at 150 MPa", err, "pressure_MPa")
	_, err = MediumByName("water", 0, -0.1)
	wantRangeError(t, "water at -0.1 MPa", err, "pressure_MPa")
	_, err = MediumByName("glycerol", 1.2, 0)
	wantRangeError(t, "glycerol fraction 1.2", err, "glycerol_mass_fraction")
	_, err = MediumByName("glycerol", math.NaN(), 0)
	wantRangeError(t, "glycerol fraction NaN", err, "glycerol_mass_fraction")

	for _, name := range []string{"custom", "Water", "oil", ""} {
		m, err := MediumByName(name, 0, 0)
		if m != nil || !errors.Is(err, ErrUnknownMedium) {
			t.Errorf("MediumByName(%q) = %v, %v; want nil and ErrUnknownMedium", name, m, err)
			continue
		}
		for _, s := range []string{`"water"`, `"glycerol"`} {
			if !strings.Contains(err.Error(), s) {
				t.Errorf("MediumByName(%q) error %q does not name %s", name, err, s)
			}
		}
	}
}
