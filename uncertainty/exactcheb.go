package uncertainty

import "math"

// cheb is a polynomial on [a, b] in the Chebyshev basis, Σ_k c_k·T_k(x̂) with x̂ = (2x − a − b)/(b − a),
// built by interpolation in the Chebyshev points of the second kind (the extrema of T_n), which nest
// when n doubles, so an adaptive construction reuses every value. The size of the trailing
// coefficients estimates the interpolation error (for functions analytic near [a, b] they decay
// geometrically).
//
// References:
//   - Trefethen L.N., Approximation Theory and Approximation Practice (2013), ch. 2–3, 8 and 18.
type cheb struct {
	a, b float64
	c    []float64
}

// chebPoint returns the j-th of the n+1 Chebyshev points of the second kind on [a, b],
// x_j = cos(πj/n) mapped to [a, b] (j = 0 is b).
func chebPoint(j, n int, a, b float64) float64 {
	if n == 0 {
		return (a + b) / 2
	}
	x := math.Cos(math.Pi * float64(j) / float64(n))
	return a + (b-a)*(x+1)/2
}

// chebCoeffs returns the coefficients of the interpolant of the values f_j at the n+1 points of the
// second kind (a type-I discrete cosine transform):
//
//	c_k = (2/n)·Σ″_j f_j·cos(πjk/n),   with c_0 and c_n halved (Σ″ halves the first and last terms).
func chebCoeffs(f []float64) []float64 {
	n := len(f) - 1
	if n == 0 {
		return []float64{f[0]}
	}
	c := make([]float64, n+1)
	for k := 0; k <= n; k++ {
		s := 0.0
		for j := 0; j <= n; j++ {
			t := f[j] * math.Cos(math.Pi*float64((j*k)%(2*n))/float64(n))
			if j == 0 || j == n {
				t /= 2
			}
			s += t
		}
		c[k] = 2 * s / float64(n)
	}
	c[0] /= 2
	c[n] /= 2
	return c
}

// clenshaw evaluates Σ c_k T_k(x) for x in [−1, 1].
func clenshaw(c []float64, x float64) float64 {
	var b1, b2 float64
	for k := len(c) - 1; k >= 1; k-- {
		b1, b2 = 2*x*b1-b2+c[k], b1
	}
	return x*b1 - b2 + c[0]
}

func (ch cheb) scaled(x float64) float64 { return (2*x - ch.a - ch.b) / (ch.b - ch.a) }

// at evaluates the polynomial at x (any x: outside [a, b] it extrapolates).
func (ch cheb) at(x float64) float64 { return clenshaw(ch.c, ch.scaled(x)) }

// deriv returns the derivative, by the recurrence c′_{k−1} = c′_{k+1} + 2k·c_k.
func (ch cheb) deriv() cheb {
	n := len(ch.c) - 1
	if n < 1 {
		return cheb{a: ch.a, b: ch.b, c: []float64{0}}
	}
	d := make([]float64, n+1)
	for k := n; k >= 1; k-- {
		d[k-1] = 2 * float64(k) * ch.c[k]
		if k+1 <= n {
			d[k-1] += d[k+1]
		}
	}
	d[0] /= 2
	s := 2 / (ch.b - ch.a)
	for k := range d {
		d[k] *= s
	}
	return cheb{a: ch.a, b: ch.b, c: d[:n]}
}

// chebTail returns the largest magnitude among the last three coefficients relative to the largest
// coefficient (or to 1 if that is smaller): the error estimate of the interpolant.
func chebTail(c []float64) float64 {
	big, tail := 1.0, 0.0
	for k, v := range c {
		big = math.Max(big, math.Abs(v))
		if k >= len(c)-3 {
			tail = math.Max(tail, math.Abs(v))
		}
	}
	return tail / big
}

// chop drops trailing coefficients below tol relative to the largest (or to 1).
func chop(c []float64, tol float64) []float64 {
	big := 1.0
	for _, v := range c {
		big = math.Max(big, math.Abs(v))
	}
	n := len(c)
	for n > 1 && math.Abs(c[n-1]) <= tol*big {
		n--
	}
	return c[:n]
}

// adaptCheb interpolates f on [a, b] at 2^m + 1 points of the second kind, doubling from nMin until
// the trailing coefficients fall below tol or nMax is reached; ok reports convergence.
func adaptCheb(f func(float64) float64, a, b float64, nMin, nMax int, tol float64) (ch cheb, ok bool) {
	n := nMin
	vals := make([]float64, n+1)
	for j := range vals {
		vals[j] = f(chebPoint(j, n, a, b))
	}
	for {
		c := chebCoeffs(vals)
		if chebTail(c) <= tol {
			return cheb{a: a, b: b, c: chop(c, tol/10)}, true
		}
		if 2*n > nMax {
			return cheb{a: a, b: b, c: c}, false
		}
		next := make([]float64, 2*n+1)
		for j := range next {
			if j%2 == 0 {
				next[j] = vals[j/2]
			} else {
				next[j] = f(chebPoint(j, 2*n, a, b))
			}
		}
		vals, n = next, 2*n
	}
}
