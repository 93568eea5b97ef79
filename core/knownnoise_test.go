package core

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestKnownNoiseChiSquared checks the exact law without noise and blur (REFERENCES.md §3; Qian, Sheetz &
// Elson 1991, Biophys. J. 60, 910): from d axes and n displacements in all, D̂/D·k ~ χ²(k), k = d·n.
// Each trial pools a 2-D track of 5 points and one of 8 points, so k = 2·(4 + 7) = 22. The empirical
// distribution of 2000 trials is compared with gonum distuv.ChiSquared{K: 22}.CDF by the
// Kolmogorov–Smirnov statistic, which must stay below the 0.1 % critical value 1.95/√n of the
// asymptotic Kolmogorov distribution (from memory).
func TestKnownNoiseChiSquared(t *testing.T) {
	src := rand.NewPCG(1991, 910)
	rec := Recording{D: simD, Dims: 2, Interval: simDt}
	const trials = 2000
	k := float64(rec.Dims * (4 + 7))
	xs := make([]float64, trials)
	for i := range xs {
		trs := []Track{Simulate(src, rec, 5), Simulate(src, rec, 8)}
		est, err := KnownNoise(trs, rec.Interval, 0, 0, false)
		if err != nil {
			t.Fatal(err)
		}
		xs[i] = est.D / rec.D * k
	}
	chi := distuv.ChiSquared{K: k}
	ks, crit := simKS(xs, chi.CDF), simKSCritical(trials)
	t.Logf("KS statistic %.4f, 0.1 %% critical value %.4f", ks, crit)
	if ks > crit {
		t.Errorf("KS statistic %.4f above the 0.1 %% critical value %.4f", ks, crit)
	}
	// The same sample is far from χ² with a wrong number of degrees of freedom (the test has power).
	if wrong := simKS(xs, distuv.ChiSquared{K: k - 4}.CDF); wrong < 2*crit {
		t.Errorf("KS statistic against χ²(%g) only %.4f: the test cannot tell k apart", k-4, wrong)
	}
}

// TestKnownNoiseUnbiased checks that the known-noise estimate is unbiased (4 standard errors;
// REFERENCES.md §2, Vestergaard et al. 2014, Phys. Rev. E 89, 022726) with noise and blur, with and
// without drift removal; without it, that its mean squared error equals the exact variance
// VarKnownNoiseExact (variance.go) within 4 standard errors; with it, that the plain formula applied to
// centred displacements is biased by the predicted amount E Σy² = (N−1)(a − 2b/N).
func TestKnownNoiseUnbiased(t *testing.T) {
	src := rand.NewPCG(89, 22726)
	const tracks = 12000
	cases := []estCase{
		{Recording{D: simD, Dims: 2, Interval: simDt, Exposure: simDt / 2, Sigma: 150e-9}, 2, false},
		{Recording{D: simD, Dims: 3, Interval: simDt, Exposure: simDt, Sigma: 250e-9}, 30, false},
		{Recording{D: simD, Dims: 1, Interval: simDt, Sigma: 400e-9}, 10, false},
		{Recording{D: simD, Dims: 1, Interval: simDt, Exposure: simDt, Sigma: 100e-9}, 3, true},
		{Recording{D: simD, Dims: 2, Interval: simDt, Exposure: 0.3 * simDt, Sigma: 100e-9, Drift: []float64{5e-6, -2e-6}}, 5, true},
	}
	for _, c := range cases {
		rec := c.rec
		R, s2 := rec.Blur(), rec.Sigma*rec.Sigma
		N := c.points - 1
		var dHat, sqErr, naive simAcc
		for range tracks {
			tr := Simulate(src, rec, c.points)
			est, err := KnownNoise([]Track{tr}, rec.Interval, R, s2, c.removeDrift)
			if err != nil {
				t.Fatalf("%v: %v", c, err)
			}
			if !math.IsNaN(est.S2) || est.Displacements != N || est.Tracks != 1 {
				t.Fatalf("%v: estimate %+v, want S2 = NaN and counts %d, 1", c, est, N)
			}
			dHat.add(est.D)
			sqErr.add((est.D - rec.D) * (est.D - rec.D))
			if c.removeDrift {
				var d float64
				for _, p := range tr.Pos {
					s0, _ := laggedSums(p, meanStep(p))
					d += (s0/float64(N) - 2*s2) / (2 * (1 - 2*R) * rec.Interval)
				}
				naive.add(d / float64(rec.Dims))
			}
		}
		simCheck(t, c.String()+": D̂", &dHat, rec.D)
		if !c.removeDrift {
			simCheck(t, c.String()+": (D̂ − D)²", &sqErr, VarKnownNoiseExact(rec.D, rec.Interval, R, s2, N, rec.Dims))
			continue
		}
		sc := NewStepCovariance(rec.D, rec.Interval, R, s2)
		n := float64(N)
		want := ((n-1)*(sc.Diag-2*sc.Off/n)/n - 2*s2) / (2 * (1 - 2*R) * rec.Interval)
		simCheck(t, c.String()+": uncorrected centred D̂", &naive, want)
		if math.Abs(want-rec.D) < 8*naive.se() {
			t.Errorf("%v: the drift-removal bias %.3g is too small to be seen (SE %.3g)", c, want-rec.D, naive.se())
		}
	}
}

// TestKnownNoiseExactValues works the formula by hand (exact fractions, 1e-12): 1-D positions 0, 1, 3, 2 m,
// Δt = 1 s, R = 1/6, s2 = 0.25 m²: ⟨dx²⟩ = 2, D̂ = (2 − 0.5)/(2·(2/3)) = 9/8 m²/s. With drift removal
// (m = 2/3, Σy² = 42/9, N = 3): D̂ = (42/18 − 0.5·4/3)/(2·(1 − (1/3)(4/3))) = (5/3)/(10/9) = 3/2 m²/s.
func TestKnownNoiseExactValues(t *testing.T) {
	tr := []Track{{Pos: [][]float64{{0, 1, 3, 2}}}}
	for _, c := range []struct {
		removeDrift bool
		want        float64
	}{{false, 9.0 / 8}, {true, 1.5}} {
		est, err := KnownNoise(tr, 1, 1.0/6, 0.25, c.removeDrift)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(est.D-c.want) > 1e-12 {
			t.Errorf("removeDrift=%v: D = %.15g, want %.15g", c.removeDrift, est.D, c.want)
		}
	}
}

func TestKnownNoiseErrors(t *testing.T) {
	tr := []Track{{Pos: [][]float64{{0, 1, 3}}}}
	for _, s2 := range []float64{-1e-18, math.NaN(), math.Inf(1)} {
		_, err := KnownNoise(tr, 1, 0, s2, false)
		var re *RangeError
		if !errors.As(err, &re) || re.Field != "s2_m2" {
			t.Errorf("s2 = %g: got %v, want a RangeError for s2_m2", s2, err)
		}
	}
	two := []Track{{Pos: [][]float64{{0, 1}}}}
	if _, err := KnownNoise(two, 1, 0, 0, false); err != nil {
		t.Errorf("2 points without drift removal: %v", err)
	}
	_, err := KnownNoise(two, 1, 0, 0, true)
	var re *RangeError
	if !errors.As(err, &re) || re.Field != "points" || re.Min != 3 {
		t.Errorf("2 points with drift removal: got %v, want a points RangeError with minimum 3", err)
	}
	_, err = KnownNoise([]Track{{Pos: [][]float64{{0}}}}, 1, 0, 0, false)
	if !errors.As(err, &re) || re.Field != "points" || re.Min != 2 {
		t.Errorf("1 point: got %v, want a points RangeError with minimum 2", err)
	}
}
