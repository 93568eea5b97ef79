package uncertainty

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// indexValues returns y_(i) = i for i = 1..m, so interval endpoints read as 1-based indices.
func indexValues(m int) []float64 {
	y := make([]float64, m)
	for i := range y {
		y[i] = float64(i + 1)
	}
	return y
}

func TestSymmetricIntervalIndices(t *testing.T) {
	// JCGM 101:2008 clause 7.7.1, worked by hand: q = pM if integer else ⌊pM+½⌋; r = (M−q)/2 if M−q is
	// even else (M−q+1)/2; interval [y_(r), y_(r+q)].
	cases := []struct {
		m    int
		p    float64
		q, r int
	}{
		{20, 0.9, 18, 1},         // pM = 18 integer; M−q = 2 even
		{21, 0.9, 19, 1},         // pM = 18.9 → ⌊19.4⌋ = 19; M−q = 2
		{11, 0.5, 6, 3},          // pM = 5.5 → ⌊6.0⌋ = 6; M−q = 5 odd → (5+1)/2
		{10, 0.75, 8, 1},         // pM = 7.5 → 8; M−q = 2
		{12, 0.5, 6, 3},          // pM = 6; M−q = 6
		{13, 0.5, 7, 3},          // pM = 6.5 → 7; M−q = 6
		{14, 0.5, 7, 4},          // pM = 7; M−q = 7 odd → 4
		{10000, 0.95, 9500, 250}, // the usual first run: [y_(250), y_(9750)]
		{10001, 0.95, 9501, 250}, // pM = 9500.95 → 9501; M−q = 500
		{1000000, 0.95, 950000, 25000},
	}
	for _, tc := range cases {
		if q := CoverageCount(tc.m, tc.p); q != tc.q {
			t.Errorf("CoverageCount(%d, %v) = %d, want %d", tc.m, tc.p, q, tc.q)
			continue
		}
		if r := SymmetricIndex(tc.m, tc.q); r != tc.r {
			t.Errorf("SymmetricIndex(%d, %d) = %d, want %d", tc.m, tc.q, r, tc.r)
		}
		lo, hi := SymmetricInterval(indexValues(tc.m), tc.p)
		if lo != float64(tc.r) || hi != float64(tc.r+tc.q) {
			t.Errorf("SymmetricInterval(M=%d, p=%v) = [y_(%v), y_(%v)], want [y_(%d), y_(%d)]",
				tc.m, tc.p, lo, hi, tc.r, tc.r+tc.q)
		}
	}
}

func TestShortestIntervalHandMade(t *testing.T) {
	// JCGM 101:2008 clause 7.7.2 by hand. M = 10, p = 0.5 → q = 5. Widths y_(r+5) − y_(r):
	// r=1: 23−0 = 23, r=2: 24−10 = 14, r=3: 40−20 = 20, r=4: 50−21 = 29, r=5: 60−22 = 38 → r* = 2.
	y := []float64{0, 10, 20, 21, 22, 23, 24, 40, 50, 60}
	if r := ShortestIndex(y, 5); r != 2 {
		t.Errorf("ShortestIndex = %d, want 2", r)
	}
	if lo, hi := ShortestInterval(y, 0.5); lo != 10 || hi != 24 {
		t.Errorf("ShortestInterval = [%v, %v], want [10, 24]", lo, hi)
	}
	// The probabilistically symmetric interval of the same data: M−q = 5 odd → r = 3, [y_(3), y_(8)].
	if lo, hi := SymmetricInterval(y, 0.5); lo != 20 || hi != 40 {
		t.Errorf("SymmetricInterval = [%v, %v], want [20, 40]", lo, hi)
	}
	// Equal spacing: every width ties, the smallest r wins.
	if r := ShortestIndex(indexValues(10), 5); r != 1 {
		t.Errorf("ShortestIndex with ties = %d, want 1", r)
	}
	// Heavy upper tail at the end: M = 20, p = 0.9 → q = 18; r = 1 gives y_(19) − y_(1) = 118 − 1,
	// r = 2 gives y_(20) − y_(2) = 1000 − 2: r* = 1.
	z := indexValues(20)
	z[18], z[19] = 118, 1000
	if r := ShortestIndex(z, 18); r != 1 {
		t.Errorf("ShortestIndex heavy tail = %d, want 1", r)
	}
}

func TestMinTrials(t *testing.T) {
	// Worked by hand from clause 7.7.1 (need 1 ≤ q ≤ M−1):
	// p = 0.95: M = 10 gives q = ⌊9.5+½⌋ = 10 = M (no room), M = 11 gives q = ⌊10.95⌋ = 10.
	// p = 0.5: M = 1 gives q = 1 = M, M = 2 gives q = ⌊1.5⌋ = 1.
	// p = 0.99: M = 50 gives q = 50, M = 51 gives q = ⌊50.99⌋ = 50.
	// p = 0.01: M = 49 gives q = ⌊0.99⌋ = 0, M = 50 gives q = ⌊1.0⌋ = 1.
	for _, tc := range []struct {
		p    float64
		want int
	}{{0.95, 11}, {0.5, 2}, {0.99, 51}, {0.01, 50}} {
		if got := MinTrials(tc.p); got != tc.want {
			t.Errorf("MinTrials(%v) = %d, want %d", tc.p, got, tc.want)
		}
	}
}

func TestIntervalPanicsOnMisuse(t *testing.T) {
	for name, f := range map[string]func(){
		"p = 1":      func() { CoverageCount(10, 1) },
		"p = 0":      func() { CoverageCount(10, 0) },
		"m = 0":      func() { CoverageCount(0, 0.5) },
		"q = m":      func() { SymmetricIndex(10, 10) },
		"q = 0":      func() { SymmetricIndex(10, 0) },
		"unsorted":   func() { ShortestIndex([]float64{3, 2, 1}, 1) },
		"too few":    func() { SymmetricInterval(indexValues(10), 0.95) },
		"unsorted 2": func() { SymmetricInterval([]float64{2, 1, 3, 4, 5, 6, 7, 8, 9, 10, 11}, 0.95) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic", name)
				}
			}()
			f()
		}()
	}
}

func TestShortestIntervalExponential(t *testing.T) {
	// Exact result: for the exponential law Exp(1), F(y) = 1 − e^−y, the density decreases, so the
	// shortest 95 % interval is [0, −ln 0.05] and the probabilistically symmetric one is
	// [−ln 0.975, −ln 0.025].
	const p, m = 0.95, 200000
	res, err := Propagate(context.Background(), func(r *rand.Rand, y []float64) {
		for i := range y {
			y[i] = r.ExpFloat64()
		}
	}, Options{Coverage: p, Trials: m, Seed: 20080101})
	if err != nil {
		t.Fatal(err)
	}
	cdf := func(y float64) float64 { return 1 - math.Exp(-y) }
	pdf := func(y float64) float64 { return math.Exp(-y) }
	// An empirical endpoint behaves like a sample quantile at some level P; the level's standard error
	// is √(P(1−P)/M) ≤ √(p(1−p)/M) for the levels used here, and an endpoint's standard error is that
	// divided by the density there (asymptotic order-statistic variance).
	seLevel := math.Sqrt(p * (1 - p) / m)
	if res.ShortLow < 0 || cdf(res.ShortLow) > 4*seLevel {
		t.Errorf("shortest low = %v: F = %v, want F ≈ 0 within %v", res.ShortLow, cdf(res.ShortLow), 4*seLevel)
	}
	wantHigh := -math.Log(1 - p)
	if tol := 4 * seLevel / pdf(wantHigh); math.Abs(res.ShortHigh-wantHigh) > tol {
		t.Errorf("shortest high = %v, want %v ± %v", res.ShortHigh, wantHigh, tol)
	}
	for _, e := range []struct {
		name      string
		got, want float64
		level     float64
	}{
		{"symmetric low", res.Low, -math.Log(0.975), 0.025},
		{"symmetric high", res.High, -math.Log(0.025), 0.975},
	} {
		tol := 4 * math.Sqrt(e.level*(1-e.level)/m) / pdf(e.want)
		if math.Abs(e.got-e.want) > tol {
			t.Errorf("%s = %v, want %v ± %v", e.name, e.got, e.want, tol)
		}
	}
	if res.ShortHigh-res.ShortLow > res.High-res.Low {
		t.Errorf("shortest interval [%v, %v] longer than the symmetric one [%v, %v]",
			res.ShortLow, res.ShortHigh, res.Low, res.High)
	}
}
