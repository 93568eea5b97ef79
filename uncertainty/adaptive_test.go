package uncertainty

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

func TestRunSize(t *testing.T) {
	// JCGM 101:2008 clause 7.9.4 b): M = max(J, 10⁴), J the smallest integer ≥ 100/(1 − p); by hand:
	// p = 0.95 → J = 2 000; p = 0.99 → J = 10 000; p = 0.999 → J = 100 000; p = 0.9999 → J = 10⁶;
	// p = 0.5 → J = 200; p = 0.9975 → J = 40 000.
	for _, tc := range []struct {
		p    float64
		want int
	}{{0.95, 10_000}, {0.99, 10_000}, {0.999, 100_000}, {0.9999, 1_000_000}, {0.5, 10_000}, {0.9975, 40_000}} {
		if got := RunSize(tc.p); got != tc.want {
			t.Errorf("RunSize(%v) = %d, want %d", tc.p, got, tc.want)
		}
	}
}

// shiftedRun returns 1+d, 2+d, …, 20+d.
func shiftedRun(d float64) []float64 {
	y := indexValues(20)
	for i := range y {
		y[i] += d
	}
	return y
}

func TestStabilityRuleByHand(t *testing.T) {
	// Runs of 20 values 1..20 shifted by d, p = 0.9: each run has y = 10.5 + d, u = √(665/19) = √35,
	// interval [y_(1), y_(19)] = [1 + d, 19 + d] (q = 18, r = 1). Two runs shifted by 0 and d give, for
	// y, y_low and y_high, s = √(2(d/2)²/(2·1)) = d/2 and for u, s = 0. The pooled u of the 40 values
	// is √((2·665 + 10d²)/39) ≈ 5.84, so δ = 0.05 at n_dig = 2 and 0.005 at n_dig = 3 (JCGM 101
	// 7.9.2). The rule (7.9.4 k) is 2s ≤ δ.
	cases := []struct {
		d      float64
		ndig   int
		stable bool
	}{
		{0.01, 2, true},   // 2s = 0.01 ≤ 0.05
		{0.06, 2, false},  // 2s = 0.06 > 0.05
		{0.01, 3, false},  // 2s = 0.01 > 0.005
		{0.004, 3, true},  // 2s = 0.004 ≤ 0.005
		{0.04, 2, true},   // 2s = 0.04 ≤ 0.05
		{0.011, 3, false}, // 2s = 0.011 > 0.005
	}
	for _, tc := range cases {
		s := runStability{p: 0.9, ndig: tc.ndig}
		s.add(shiftedRun(0))
		if s.stable() {
			t.Errorf("one run judged stable")
		}
		s.add(shiftedRun(tc.d))
		sd := s.spread()
		want := [4]float64{tc.d / 2, 0, tc.d / 2, tc.d / 2}
		for j := range sd {
			near(t, "spread", sd[j], want[j], 1e-12*10)
		}
		near(t, "pooled u", s.pooledStdUnc(), math.Sqrt((2*665+10*tc.d*tc.d)/39), 1e-12*6)
		if got := s.stable(); got != tc.stable {
			t.Errorf("d = %v, n_dig = %d: stable = %v, want %v", tc.d, tc.ndig, got, tc.stable)
		}
	}
	// Three runs shifted by 0, d, 2d: deviations −d, 0, d from the average, s = √(2d²/(3·2)) = d/√3.
	s := runStability{p: 0.9, ndig: 2}
	for _, d := range []float64{0, 0.03, 0.06} {
		s.add(shiftedRun(d))
	}
	near(t, "three-run spread", s.spread()[0], 0.03/math.Sqrt(3), 1e-12)
	// Pooled u against the direct computation over all values (analytic identity).
	all := slices.Concat(shiftedRun(0), shiftedRun(0.03), shiftedRun(0.06))
	_, u := meanStdUnc(all)
	near(t, "pooled u vs direct", s.pooledStdUnc(), u, 1e-12*u)
}

func TestAdaptiveJCGM101Clause922(t *testing.T) {
	// JCGM 101:2008 clause 9.2.2 with the adaptive procedure of 7.9.4 at n_dig = 2, p = 0.95.
	ctx := context.Background()
	opt := Options{Seed: 9224}
	res, err := Propagate(ctx, sumOfNormals, opt)
	if err != nil {
		t.Fatal(err)
	}
	if !res.Converged || res.Runs < 2 || res.Trials != res.Runs*10_000 {
		t.Fatalf("Converged %v, Runs %d, Trials %d; want true, ≥ 2, 10⁴ per run", res.Converged, res.Runs, res.Trials)
	}
	// Re-derive the stopping decision independently from the runs (10 chunks of 1000 each): the rule
	// must fail after every run before the last and hold after the last.
	var est [][4]float64
	var all []float64
	for h := 1; h <= res.Runs; h++ {
		v, err := RunChunks(ctx, sumOfNormals, opt, (h-1)*10, 10)
		if err != nil {
			t.Fatal(err)
		}
		all = append(all, v...)
		s := slices.Sorted(slices.Values(v))
		var sum float64
		for _, x := range s {
			sum += x
		}
		mean := sum / float64(len(s))
		var ss float64
		for _, x := range s {
			ss += (x - mean) * (x - mean)
		}
		// M = 10⁴, p = 0.95: q = 9 500, r = 250: [y_(250), y_(9750)].
		est = append(est, [4]float64{mean, math.Sqrt(ss / float64(len(s)-1)), s[249], s[9749]})
		if h == 1 {
			continue
		}
		_, uAll := meanStdUnc(all)
		delta := NumericalTolerance(uAll, 2)
		stop := true
		for j := range 4 {
			var m float64
			for _, e := range est {
				m += e[j]
			}
			m /= float64(h)
			var d2 float64
			for _, e := range est {
				d2 += (e[j] - m) * (e[j] - m)
			}
			if 2*math.Sqrt(d2/float64(h*(h-1))) > delta {
				stop = false
			}
		}
		if stop != (h == res.Runs) {
			t.Errorf("after run %d the rule says stop = %v, but the procedure ran %d runs", h, stop, res.Runs)
		}
	}
	// The stabilised result against the exact law N(0, 4), 4 standard errors.
	m := res.Trials
	z := normalQuantile(0.975)
	near(t, "u", res.StdUnc, 2, 4*2/math.Sqrt(2*float64(m-1)))
	near(t, "y_high", res.High, 2*z, 4*quantileSE(0.975, normalPDF(z)/2, m))
	near(t, "y_low", res.Low, -2*z, 4*quantileSE(0.025, normalPDF(z)/2, m))
	t.Logf("adaptive 9.2.2: %d runs, M = %d, u = %.4f, [%.4f, %.4f]", res.Runs, m, res.StdUnc, res.Low, res.High)
}

func TestAdaptiveMaxTrials(t *testing.T) {
	// Six significant digits cannot be reached in three runs of 10⁴: the cap stops the procedure.
	res, err := Propagate(context.Background(), sumOfNormals, Options{NDig: 6, MaxTrials: 35_000, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	if res.Converged || res.Runs != 3 || res.Trials != 30_000 {
		t.Errorf("Converged %v, Runs %d, Trials %d; want false, 3, 30000", res.Converged, res.Runs, res.Trials)
	}
}

func TestAdaptiveConstantModel(t *testing.T) {
	// A constant output has u = 0, δ = 0 and no spread: stable at the second run.
	res, err := Propagate(context.Background(), func(_ *rand.Rand, y []float64) {
		for i := range y {
			y[i] = 1.5
		}
	}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !res.Converged || res.Runs != 2 || res.StdUnc != 0 || res.Tolerance != 0 || res.Low != 1.5 || res.High != 1.5 {
		t.Errorf("Converged %v Runs %d u %v δ %v [%v, %v]; want true 2 0 0 [1.5, 1.5]",
			res.Converged, res.Runs, res.StdUnc, res.Tolerance, res.Low, res.High)
	}
}
