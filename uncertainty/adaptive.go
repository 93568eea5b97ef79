package uncertainty

import (
	"math"
	"slices"
)

// RunSize returns the number of trials M of one run of the adaptive Monte Carlo procedure of JCGM
// 101:2008 clause 7.9.4 b) for coverage probability p:
//
//	M = max(J, 10⁴),   J the smallest integer ≥ 100/(1 − p)
//
// (10⁴ for p ≤ 0.99, 10⁵ for p = 0.999). 100/(1 − p) is taken as an integer when it is within 1e-9
// relative of one, which absorbs the binary representation of p. The stopping rule that Propagate and
// Run apply after each run watches y, u(y) and the endpoints of the probabilistically symmetric
// interval. It panics unless 0 < p < 1.
//
// References:
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 7.9.4.
func RunSize(p float64) int {
	mustCoverage(p)
	x := 100 / (1 - p)
	j := math.Ceil(x - 1e-9*x)
	if j > 1e15 {
		panic("uncertainty: coverage probability too close to 1 for the adaptive procedure")
	}
	return max(int(j), 10_000)
}

// runStability applies the stopping rule of the adaptive procedure of JCGM 101:2008 clause 7.9.4 to the
// runs of M trials added so far. For each run h it keeps the estimates y^(h), u(y^(h)), y_low^(h) and
// y_high^(h) (probabilistically symmetric interval); the procedure has stabilised when, with h ≥ 2,
//
//	s_z² = (1/(h(h−1))) Σ_r (z^(r) − z̄)²,   2·s_z ≤ δ   for z = y, u(y), y_low, y_high,
//
// δ being the numerical tolerance (7.9.2) at ndig digits of u(y) formed from all h·M values.
type runStability struct {
	p    float64
	ndig int
	est  [][4]float64 // per run: y, u, y_low, y_high
	n    []int        // per run: number of values
	m2   []float64    // per run: Σ (y_r − y^(h))², for the pooled u(y)
	work []float64    // scratch for sorting a run
}

// add records the estimates of one run of model values (the slice is not modified).
func (s *runStability) add(run []float64) {
	s.work = append(s.work[:0], run...)
	slices.Sort(s.work)
	mean, u := meanStdUnc(s.work)
	lo, hi := SymmetricInterval(s.work, s.p)
	s.est = append(s.est, [4]float64{mean, u, lo, hi})
	s.n = append(s.n, len(run))
	s.m2 = append(s.m2, u*u*float64(len(run)-1))
}

// runs returns h, the number of runs recorded.
func (s *runStability) runs() int { return len(s.est) }

// spread returns s_z for z = y, u(y), y_low, y_high: the standard deviation of the average of the h
// run estimates, √(Σ (z^(r) − z̄)² / (h(h−1))). It needs h ≥ 2.
func (s *runStability) spread() [4]float64 {
	h := float64(len(s.est))
	var sd [4]float64
	for j := range sd {
		var mean float64
		for _, e := range s.est {
			mean += e[j]
		}
		mean /= h
		var ss float64
		for _, e := range s.est {
			d := e[j] - mean
			ss += d * d
		}
		sd[j] = math.Sqrt(ss / (h * (h - 1)))
	}
	return sd
}

// pooledStdUnc returns u(y) of all the values of the runs recorded (7.9.4 i)), pooled exactly from the
// run means and sums of squares:
//
//	ȳ = Σ n_h y^(h) / N,   u²(y) = (Σ m2_h + Σ n_h (y^(h) − ȳ)²) / (N − 1)
func (s *runStability) pooledStdUnc() float64 {
	var n, sum float64
	for i, e := range s.est {
		n += float64(s.n[i])
		sum += float64(s.n[i]) * e[0]
	}
	mean := sum / n
	var ss float64
	for i, e := range s.est {
		d := e[0] - mean
		ss += s.m2[i] + float64(s.n[i])*d*d
	}
	return math.Sqrt(ss / (n - 1))
}

// tolerance returns δ of 7.9.4 j): the numerical tolerance of the pooled u(y).
func (s *runStability) tolerance() float64 {
	return NumericalTolerance(s.pooledStdUnc(), s.ndig)
}

// stable reports whether the stopping rule of 7.9.4 k) is met.
func (s *runStability) stable() bool {
	if len(s.est) < 2 {
		return false
	}
	delta := s.tolerance()
	for _, sd := range s.spread() {
		if !(2*sd <= delta) {
			return false
		}
	}
	return true
}
