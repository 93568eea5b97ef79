package uncertainty

import (
	"math"

	"gonum.org/v1/gonum/mathext"
)

// The few distribution functions the engine needs, from gonum's mathext directly: gonum's stat/distuv
// brings its matrix and optimisation packages with it, which would add about 1.5 MB to the browser's
// WebAssembly engine. The tests check them against distuv.

// normalQuantile is Φ⁻¹(p), the standard normal quantile, 0 < p < 1.
func normalQuantile(p float64) float64 { return mathext.NormalQuantile(p) }

// normalCDF is Φ(x).
func normalCDF(x float64) float64 { return 0.5 * math.Erfc(-x/math.Sqrt2) }

// normalPDF is φ(x).
func normalPDF(x float64) float64 { return math.Exp(-x*x/2) / math.Sqrt(2*math.Pi) }

// studentQuantile is the quantile t_p(ν) of Student's t with ν > 0 degrees of freedom, 0 < p < 1:
// with F(t) = 1 − ½·I_{ν/(ν+t²)}(ν/2, ½) for t > 0, t = √(ν(1 − x)/x), x = I⁻¹(ν/2, ½; 2(1 − p)).
func studentQuantile(p, nu float64) float64 {
	if p == 0.5 {
		return 0
	}
	q := p
	if p < 0.5 {
		q = 1 - p
	}
	x := mathext.InvRegIncBeta(nu/2, 0.5, 2*(1-q))
	t := math.Sqrt(nu * (1 - x) / x)
	if p < 0.5 {
		return -t
	}
	return t
}

// chiSquaredCDF is P(χ²(k) ≤ x), the regularised lower incomplete gamma function P(k/2, x/2).
func chiSquaredCDF(k, x float64) float64 {
	if x <= 0 {
		return 0
	}
	return mathext.GammaIncReg(k/2, x/2)
}
