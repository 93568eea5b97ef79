package uncertainty

import (
	"fmt"
	"math"
)

// Validation is the outcome of the comparison of the GUM uncertainty framework with a Monte Carlo
// result (JCGM 101:2008 clause 8). DLow, DHigh and Delta have the unit of the output quantity.
type Validation struct {
	DLow, DHigh float64 // |y − U_p − y_low| and |y + U_p − y_high|
	Delta       float64 // numerical tolerance δ of the Monte Carlo u(y) at n_dig digits
	Passed      bool    // both DLow and DHigh ≤ Delta: the GUM framework is validated
}

// ValidateGUM compares the coverage interval y ± U_p of the GUM uncertainty framework (estimate yGUM,
// expanded uncertainty UGUM for the coverage probability of res) with the probabilistically symmetric
// Monte Carlo coverage interval [y_low, y_high] of res (JCGM 101:2008 clause 8.2):
//
//	d_low  = |y − U_p − y_low|,   d_high = |y + U_p − y_high|,
//	δ = NumericalTolerance(u(y), n_dig)   with u(y) the Monte Carlo standard uncertainty,
//	validated  ⇔  d_low ≤ δ and d_high ≤ δ.
//
// res should come from the adaptive procedure with the same n_dig (clause 8.2 b)). ndig = 0 means 2.
// It panics if res is nil, UGUM is negative or not finite, yGUM is not finite, or ndig is outside
// [1, 15].
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 8 (comparison with the GUM uncertainty framework).
func ValidateGUM(res *Result, yGUM, UGUM float64, ndig int) Validation {
	if res == nil {
		panic("uncertainty: ValidateGUM of a nil Result")
	}
	if !(UGUM >= 0) || math.IsInf(UGUM, 0) || math.IsNaN(yGUM) || math.IsInf(yGUM, 0) {
		panic(fmt.Sprintf("uncertainty: ValidateGUM needs finite y and U ≥ 0, got y = %v, U = %v", yGUM, UGUM))
	}
	if ndig == 0 {
		ndig = DefaultNDig
	}
	v := Validation{
		DLow:  math.Abs(yGUM - UGUM - res.Low),
		DHigh: math.Abs(yGUM + UGUM - res.High),
		Delta: NumericalTolerance(res.StdUnc, ndig),
	}
	v.Passed = v.DLow <= v.Delta && v.DHigh <= v.Delta
	return v
}
