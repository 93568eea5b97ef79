package uncertainty

import (
	"math"
)

// chebyshev is a Chebyshev interpolant of a smooth function on [a, b]: the Monte Carlo evaluates the
// medium's viscosity at every drawn temperature, and for water that is an IAPWS-IF97 density plus the
// IAPWS 2008 correlation per trial. ln η(T) is analytic over the few kelvin drawn, so a low-degree
// interpolant in the Chebyshev points reproduces it to rounding error.
//
// References:
//   - Trefethen L.N., Approximation Theory and Approximation Practice (2013), ch. 3–8.
type chebyshev struct {
	a, b float64
	c    []float64
}

// newChebyshev interpolates f at n Chebyshev points of the first kind on [a, b].
func newChebyshev(f func(float64) float64, a, b float64, n int) chebyshev {
	fx := make([]float64, n)
	for k := range n {
		x := math.Cos(math.Pi * (float64(k) + 0.5) / float64(n))
		fx[k] = f(a + (b-a)*(x+1)/2)
	}
	c := make([]float64, n)
	for j := range n {
		s := 0.0
		for k := range n {
			s += fx[k] * math.Cos(math.Pi*float64(j)*(float64(k)+0.5)/float64(n))
		}
		c[j] = 2 * s / float64(n)
	}
	c[0] /= 2
	return chebyshev{a: a, b: b, c: c}
}

// at evaluates the interpolant by Clenshaw's recurrence.
func (ch chebyshev) at(t float64) float64 {
	x := (2*t - ch.a - ch.b) / (ch.b - ch.a)
	var b1, b2 float64
	for j := len(ch.c) - 1; j >= 1; j-- {
		b1, b2 = 2*x*b1-b2+ch.c[j], b1
	}
	return x*b1 - b2 + ch.c[0]
}

// viscosityAt returns η(T) (Pa·s) for the temperatures the Monte Carlo draws: a constant when the
// temperature is exact, else a Chebyshev interpolant of ln η over the drawn range, accepted only if it
// agrees with the medium model to 1e-13 relative at 64 points between the nodes; otherwise the model.
func (u *setup) viscosityAt() func(T float64) float64 {
	direct := func(T float64) float64 {
		eta, err := u.medium.Viscosity(T)
		if err != nil {
			// Validate keeps every drawn temperature inside the medium's range.
			panic("uncertainty: viscosity at a drawn temperature: " + err.Error())
		}
		return eta
	}
	h := u.s.tempHalfRange()
	if h == 0 {
		return func(float64) float64 { return u.eta0 }
	}
	a, b := u.T0-h, u.T0+h
	ch := newChebyshev(func(T float64) float64 { return math.Log(direct(T)) }, a, b, 16)
	for i := range 64 {
		T := a + (b-a)*(float64(i)+0.37)/64
		if e := direct(T); math.Abs(math.Exp(ch.at(T))-e) > 1e-13*e {
			return direct
		}
	}
	return func(T float64) float64 { return math.Exp(ch.at(T)) }
}
