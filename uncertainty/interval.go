package uncertainty

import (
	"fmt"
	"math"
	"slices"
)

// CoverageCount returns the number q of sorted model values that a 100p % coverage interval spans out
// of m values, following JCGM 101:2008 clause 7.7.1:
//
//	q = pM           if pM is an integer,
//	q = ⌊pM + ½⌋     otherwise.
//
// pM is taken as an integer when it is within 1e-9·pM of one, which absorbs the binary representation of
// p (0.95 × 10⁴ is exactly 9 500 in decimal but not in float64); the two branches then agree anyway.
// The interval exists only when 1 ≤ q ≤ m − 1 (see MinTrials); CoverageCount itself only needs m ≥ 1
// and 0 < p < 1, and panics otherwise.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 7.7.1.
func CoverageCount(m int, p float64) int {
	mustCoverage(p)
	if m < 1 {
		panic(fmt.Sprintf("uncertainty: CoverageCount needs at least one value, got %d", m))
	}
	x := p * float64(m)
	return int(math.Floor(x + 0.5 + 1e-9*x))
}

// SymmetricIndex returns the 1-based index r of the lower end of the probabilistically symmetric
// coverage interval [y_(r), y_(r+q)] of m sorted values spanning q of them (JCGM 101:2008 clause 7.7.1):
//
//	r = (M − q)/2       if M − q is even (q + M even),
//	r = (M − q + 1)/2   otherwise.
//
// It panics unless 1 ≤ q ≤ m − 1.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 7.7.1.
func SymmetricIndex(m, q int) int {
	mustCoverageCount(m, q)
	if (m-q)%2 == 0 {
		return (m - q) / 2
	}
	return (m - q + 1) / 2
}

// ShortestIndex returns the 1-based index r* of the lower end of the shortest coverage interval
// [y_(r*), y_(r*+q)] spanning q of the ascending sorted values (JCGM 101:2008 clause 7.7.2):
//
//	y_(r*+q) − y_(r*) ≤ y_(r+q) − y_(r)   for all r = 1, …, M − q.
//
// Ties go to the smallest r. It panics unless 1 ≤ q ≤ len(sorted) − 1 and sorted is ascending.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 7.7.2.
func ShortestIndex(sorted []float64, q int) int {
	m := len(sorted)
	mustCoverageCount(m, q)
	mustSorted(sorted)
	best, width := 1, math.Inf(1)
	for r := 1; r <= m-q; r++ {
		if w := sorted[r+q-1] - sorted[r-1]; w < width {
			best, width = r, w
		}
	}
	return best
}

// SymmetricInterval returns the probabilistically symmetric 100p % coverage interval [y_(r), y_(r+q)]
// of the ascending sorted model values, with q from CoverageCount and r from SymmetricIndex (JCGM
// 101:2008 clause 7.7.1). The endpoints have the unit of the values. It panics if sorted is not
// ascending, p is outside (0, 1) or len(sorted) < MinTrials(p).
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 7.7.1.
func SymmetricInterval(sorted []float64, p float64) (low, high float64) {
	m := len(sorted)
	mustEnoughValues(m, p)
	mustSorted(sorted)
	q := CoverageCount(m, p)
	r := SymmetricIndex(m, q)
	return sorted[r-1], sorted[r+q-1]
}

// ShortestInterval returns the shortest 100p % coverage interval [y_(r*), y_(r*+q)] of the ascending
// sorted model values (JCGM 101:2008 clause 7.7.2), with q from CoverageCount and r* from
// ShortestIndex. It panics under the same conditions as SymmetricInterval.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 7.7.2.
func ShortestInterval(sorted []float64, p float64) (low, high float64) {
	m := len(sorted)
	mustEnoughValues(m, p)
	q := CoverageCount(m, p)
	r := ShortestIndex(sorted, q)
	return sorted[r-1], sorted[r+q-1]
}

// MinTrials returns the smallest number of model values M for which a 100p % coverage interval exists
// under the rules of JCGM 101:2008 clause 7.7, that is 1 ≤ q ≤ M − 1 with q = CoverageCount(M, p)
// (for p = 0.95 this is 11). It is a bound for the arithmetic, not advice: JCGM 101 clause 7.2 asks for
// M large compared with 1/(1 − p) (the adaptive procedure, RunSize, takes care of this). It panics
// unless 0 < p < 1.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clauses 7.2 and 7.7.
func MinTrials(p float64) int {
	mustCoverage(p)
	// q ≥ 1 needs pM ≥ ½ and q ≤ M − 1 needs pM + ½ < M, i.e. M > ½/(1−p): start just below both.
	m := int(math.Max(0.5/p, 0.5/(1-p))) - 2
	if m < 1 {
		m = 1
	}
	for {
		if q := CoverageCount(m, p); q >= 1 && q <= m-1 {
			return m
		}
		m++
	}
}

func mustCoverage(p float64) {
	if !(p > 0 && p < 1) {
		panic(fmt.Sprintf("uncertainty: coverage probability %v outside (0, 1)", p))
	}
}

func mustCoverageCount(m, q int) {
	if q < 1 || q > m-1 {
		panic(fmt.Sprintf("uncertainty: coverage count q = %d outside [1, %d] for %d values", q, m-1, m))
	}
}

func mustEnoughValues(m int, p float64) {
	if n := MinTrials(p); m < n {
		panic(fmt.Sprintf("uncertainty: %d values are too few for a %v coverage interval (need %d)", m, p, n))
	}
}

func mustSorted(x []float64) {
	if !slices.IsSorted(x) {
		panic("uncertainty: values not sorted ascending")
	}
}
