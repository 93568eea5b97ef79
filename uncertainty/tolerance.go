package uncertainty

import (
	"fmt"
	"math"
)

// maxNDig is the largest number of significant decimal digits a float64 can carry meaningfully.
const maxNDig = 15

// DecimalForm writes z in the form of JCGM 101:2008 clause 7.9.2 a),
//
//	z = c × 10^l,   c an integer of exactly ndig decimal digits (10^(ndig−1) ≤ |c| < 10^ndig), l an integer,
//
// where c is z/10^l rounded to the nearest integer (so 0.0999 with ndig = 2 becomes 10 × 10^−2, not
// 100 × 10^−3). The sign of z is carried by c; z = 0 gives c = 0, l = 0. Units: z in any unit, c and l
// without. ndig must be in [1, 15] and z finite; it panics otherwise.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 7.9.2 (numerical tolerance of a numerical value).
func DecimalForm(z float64, ndig int) (c int64, l int) {
	mustNDig(ndig)
	if math.IsNaN(z) || math.IsInf(z, 0) {
		panic(fmt.Sprintf("uncertainty: DecimalForm of non-finite value %v", z))
	}
	if z == 0 {
		return 0, 0
	}
	a := math.Abs(z)
	lo := math.Pow10(ndig - 1) // smallest ndig-digit integer
	hi := math.Pow10(ndig)     // smallest (ndig+1)-digit integer
	l = int(math.Floor(math.Log10(a))) - (ndig - 1)
	// math.Log10 may be off by one ulp near exact powers of ten, and rounding may carry into an extra
	// digit (9.96 → 10.0): correct l until the rounded mantissa has exactly ndig digits.
	for range 4 {
		m := math.Round(timesPow10(a, -l))
		switch {
		case m >= hi:
			l++
		case m < lo:
			l--
		default:
			if z < 0 {
				m = -m
			}
			return int64(m), l
		}
	}
	panic("uncertainty: DecimalForm did not settle") // unreachable for finite non-zero z
}

// NumericalTolerance returns the numerical tolerance δ of JCGM 101:2008 clause 7.9.2 b) for a numerical
// value z (usually the standard uncertainty u(y)) regarded as meaningful to ndig significant decimal
// digits:
//
//	z = c × 10^l  (DecimalForm),   δ = ½ × 10^l
//
// δ has the unit of z. z = 0 gives δ = 0. ndig must be in [1, 15] and z finite; it panics otherwise.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 7.9.2.
func NumericalTolerance(z float64, ndig int) float64 {
	c, l := DecimalForm(z, ndig)
	if c == 0 {
		return 0
	}
	return 0.5 * math.Pow10(l)
}

// scale returns a×10^e, dividing by an exact power of ten when e < 0 so that 0.00035×10^5 is 35.
func timesPow10(a float64, e int) float64 {
	if e < 0 {
		return a / math.Pow10(-e)
	}
	return a * math.Pow10(e)
}

func mustNDig(ndig int) {
	if ndig < 1 || ndig > maxNDig {
		panic(fmt.Sprintf("uncertainty: number of significant digits %d outside [1, %d]", ndig, maxNDig))
	}
}
