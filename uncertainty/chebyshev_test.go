package uncertainty

import (
	"math"
	"testing"
)

func TestChebyshevInterpolant(t *testing.T) {
	// Exact case: a polynomial of degree below the number of nodes is reproduced to rounding error.
	p := func(x float64) float64 { return 1 - 2*x + 0.5*x*x*x - 0.1*x*x*x*x*x }
	ch := newChebyshev(p, -3, 2, 8)
	for x := -3.0; x <= 2; x += 0.01 {
		if d := math.Abs(ch.at(x) - p(x)); d > 1e-12*(1+math.Abs(p(x))) {
			t.Fatalf("x=%g: %g vs %g", x, ch.at(x), p(x))
		}
	}
}

func TestViscosityInterpolantMatchesModel(t *testing.T) {
	// For water, glycerol and a custom medium across the drawn range, the interpolant (when used)
	// agrees with the medium model to 1e-13 relative; an exact temperature gives η(T₀) itself.
	for _, s := range []Scenario{Demo(), func() Scenario {
		s := Demo()
		s.Medium, s.GlycerolMassFraction, s.TemperatureUK, s.TemperatureDist = "glycerol", 0.6, 2, "normal"
		return s
	}()} {
		u, err := newSetup(s)
		if err != nil {
			t.Fatal(err)
		}
		f := u.viscosityAt()
		h := s.tempHalfRange()
		for i := 0; i <= 200; i++ {
			T := u.T0 - h + 2*h*float64(i)/200
			want, _ := u.medium.Viscosity(T)
			if got := f(T); math.Abs(got-want) > 1e-13*want {
				t.Fatalf("%s T=%g: %.17g vs %.17g", s.Medium, T, got, want)
			}
		}
	}
	s := Demo()
	s.TemperatureUK = 0
	u, _ := newSetup(s)
	if got := u.viscosityAt()(u.T0); got != u.eta0 {
		t.Errorf("exact temperature: %g vs %g", got, u.eta0)
	}
}
