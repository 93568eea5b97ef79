package uncertainty

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"
)

// exactScenario returns a demo scenario with the given edits and no planner target.
func exactScenario(edit func(*Scenario)) Scenario {
	s := Demo()
	s.TargetRelU = 0
	if edit != nil {
		edit(&s)
	}
	return s
}

func mustExact(t *testing.T, s Scenario) *ExactLaw {
	t.Helper()
	l, err := NewExactLaw(TrialSpec{Scenario: s})
	if err != nil {
		t.Fatal(err)
	}
	return l
}

func TestExactLawChiSquaredCase(t *testing.T) {
	// Known-noise estimator, σ = 0, no blur, exact temperature, viscosity and pixel size: y = r₀·χ²(k)/k
	// with k = d·M·N (REFERENCES.md §3), so quantiles, mean r₀ and standard deviation r₀·√(2/k) are
	// exact (gonum distuv.ChiSquared). Tolerance 1e-9 relative.
	zero := 0.0
	s := exactScenario(func(s *Scenario) {
		s.Estimator, s.LocalisationNM, s.ExposureS, s.TemperatureUK, s.PixelRelU = "known-noise", 0, 0, 0, 0
		s.ViscosityRelU = &zero
		s.Frames, s.Tracks = 11, 3
	})
	l := mustExact(t, s)
	k := float64(s.Dims * s.Tracks * (s.Frames - 1))
	chi := distuv.ChiSquared{K: k}
	for _, p := range []float64{1e-6, 0.025, 0.3, 0.5, 0.975, 1 - 1e-6} {
		want := s.RadiusNM * chi.Quantile(p) / k
		if got := l.Quantile(p); math.Abs(got-want) > 1e-9*want {
			t.Errorf("quantile %g: %.12g, want %.12g", p, got, want)
		}
		if got := l.CDF(want); math.Abs(got-p) > 1e-9*math.Min(p, 1-p)+1e-12 {
			t.Errorf("CDF at the %g quantile: %.12g", p, got)
		}
	}
	if m := l.Mean(); math.Abs(m-s.RadiusNM) > 1e-12*s.RadiusNM {
		t.Errorf("mean %.15g, want %g", m, s.RadiusNM)
	}
	if sd, want := l.StdUnc(), s.RadiusNM*math.Sqrt(2/k); math.Abs(sd-want) > 1e-12*want {
		t.Errorf("standard deviation %.15g, want %.15g", sd, want)
	}
	sym, short := l.Intervals(0.95)
	if short[1]-short[0] > sym[1]-sym[0] || math.Abs(l.CDF(short[1])-l.CDF(short[0])-0.95) > 1e-9 {
		t.Errorf("shortest %v is not a shorter 95 %% interval than %v", short, sym)
	}
	// The shortest interval of a unimodal law has equal densities at its ends (gonum density).
	f0, f1 := chi.Prob(short[0]*k/s.RadiusNM), chi.Prob(short[1]*k/s.RadiusNM)
	if math.Abs(f0-f1) > 1e-5*f0 {
		t.Errorf("densities at the shortest interval's ends %.8g, %.8g differ", f0, f1)
	}
}

// nestedReference returns P(y ≤ q) for the known-noise estimator with σ = 0 and no blur, where
// D̂ = D·χ²(k)/k exactly, by nested Gauss–Legendre quadrature written independently of ExactLaw: the
// rectangular temperature on [T₀ − a, T₀ + a] (n nodes), the viscosity factor 1 + u_η·Z and the pixel
// factor (1 + u_p·Z₂)², Z and Z₂ standard normal on [−8, 8] (n nodes each; the mass beyond is 1e-15):
//
//	P(y ≤ q) = E[ F_χ²(k·(q/r₀)·(D₀/D)·(1 + δ)²) ]
func nestedReference(t *testing.T, s Scenario, q float64, n int) float64 {
	u, err := newSetup(s.Defaults())
	if err != nil {
		t.Fatal(err)
	}
	k := float64(s.Dims * s.Tracks * (s.Frames - 1))
	chi := distuv.ChiSquared{K: k}
	xt, wt := make([]float64, n), make([]float64, n)
	quad.Legendre{}.FixedLocations(xt, wt, u.T0-s.TemperatureUK, u.T0+s.TemperatureUK)
	xz, wz := make([]float64, n), make([]float64, n)
	quad.Legendre{}.FixedLocations(xz, wz, -8, 8)
	total := 0.0
	for i := range xt {
		eta, err := u.medium.Viscosity(xt[i])
		if err != nil {
			t.Fatal(err)
		}
		for a := range xz {
			D := 1.380649e-23 * xt[i] / (6 * math.Pi * eta * (1 + u.uEta*xz[a]) * u.r0) // k_B exact (SI 2019)
			inner := 0.0
			for j := range xz {
				d := 1 + u.uPix*xz[j]
				inner += wz[j] * distuv.UnitNormal.Prob(xz[j]) * chi.CDF(k*q/(s.RadiusNM)*(u.D0/D)*d*d)
			}
			total += wt[i] / (2 * s.TemperatureUK) * wz[a] * distuv.UnitNormal.Prob(xz[a]) * inner
		}
	}
	return total
}

func TestExactLawAgainstNestedQuadrature(t *testing.T) {
	// A pivotal case (σ = 0, no blur, known noise) with every other input uncertain: the law's CDF
	// against an independent nested quadrature (nestedReference, 48 nodes per input), to 1e-8.
	s := exactScenario(func(s *Scenario) {
		s.Estimator, s.LocalisationNM, s.ExposureS = "known-noise", 0, 0
		s.Frames, s.Tracks, s.TemperatureUK, s.PixelRelU = 40, 30, 1.5, 0.02
	})
	l := mustExact(t, s)
	for _, p := range []float64{0.001, 0.025, 0.5, 0.975, 0.999} {
		q := l.Quantile(p)
		want := nestedReference(t, s, q, 48)
		if math.Abs(want-p) > 1e-8 {
			t.Errorf("p %g: nested quadrature gives %.10g at the exact law's quantile %.8g", p, want, q)
		}
	}
}

func TestExactLawTableAgainstDirectInversion(t *testing.T) {
	// With localisation noise the conditional law depends on D beyond a scale: the tabulated
	// conditional law against inversion at every node (the fallback path), and both against doubled
	// quadrature node counts, to 1e-8 in probability.
	s := exactScenario(func(s *Scenario) {
		s.LocalisationNM, s.Frames, s.Tracks, s.TemperatureUK, s.TemperatureDist = 60, 12, 6, 2, "normal"
	})
	l := mustExact(t, s)
	d := *l
	d.direct = true
	for _, p := range []float64{0.025, 0.5, 0.975} {
		q := l.Quantile(p)
		lo, _ := d.tails(q)
		if math.Abs(lo-p) > 1e-8 {
			t.Errorf("p %g: direct inversion gives %.10g at the table's quantile", p, lo)
		}
	}
}

func TestExactLawNodeCounts(t *testing.T) {
	// The quadrature node counts suffice: doubling them moves the interval ends by less than 1e-7
	// relative, in a temperature-dominated case and a viscosity-dominated one.
	for _, edit := range []func(*Scenario){
		func(s *Scenario) { s.TemperatureUK, s.Frames, s.Tracks = 3, 200, 200 },
		func(s *Scenario) {
			v := 0.06
			s.Medium, s.ViscosityMPaS, s.ViscosityRelU, s.Frames, s.Tracks = "custom", 1.1, &v, 100, 100
		},
	} {
		s := exactScenario(edit)
		u, err := newSetup(s.Defaults())
		if err != nil {
			t.Fatal(err)
		}
		base, err := buildExactLaw(u, 1)
		if err != nil {
			t.Fatal(err)
		}
		fine, err := buildExactLaw(u, 2)
		if err != nil {
			t.Fatal(err)
		}
		a, _ := base.Intervals(0.95)
		b, _ := fine.Intervals(0.95)
		for i := range a {
			if math.Abs(a[i]-b[i]) > 1e-7*b[i] {
				t.Errorf("%d nodes: interval end %d %.10g, with %d nodes %.10g", len(base.nodes), i, a[i], len(fine.nodes), b[i])
			}
		}
	}
}

// exactKS returns the one-sample Kolmogorov–Smirnov statistic of xs against the law's tabulated CDF.
func exactKS(l *ExactLaw, xs []float64) float64 {
	s := slices.Sorted(slices.Values(xs))
	n := float64(len(s))
	d := 0.0
	for i, x := range s {
		f, _ := normTails(l.fwd.at(math.Max(l.qLo, math.Min(l.qHi, x))))
		d = math.Max(d, math.Max(f-float64(i)/n, float64(i+1)/n-f))
	}
	return d
}

// exactKS2 returns the two-sample Kolmogorov–Smirnov statistic.
func exactKS2(a, b []float64) float64 {
	x, y := slices.Sorted(slices.Values(a)), slices.Sorted(slices.Values(b))
	i, j, d := 0, 0, 0.0
	for i < len(x) && j < len(y) {
		if x[i] <= y[j] {
			i++
		} else {
			j++
		}
		d = math.Max(d, math.Abs(float64(i)/float64(len(x))-float64(j)/float64(len(y))))
	}
	return d
}

// ksLevel is the asymptotic 0.1 % critical value of √n·D for the Kolmogorov distribution,
// √(−ln(0.0005)/2) = 1.9495 (from memory; it is the leading term of the Kolmogorov tail).
var ksLevel = math.Sqrt(-math.Log(0.0005) / 2)

func TestEnginesAgreeOnGrid(t *testing.T) {
	// On a grid of scenarios (σ, blur, N, M, d, estimator, temperature law) the direct and the
	// spectral Monte Carlo engines and the exact law agree: the 95 % interval ends of each engine
	// within 4 standard errors of a Monte Carlo quantile of the exact ones (√(p(1−p)/M)/f, f the exact
	// density), a one-sample KS test of each engine's values against the exact CDF and a two-sample KS
	// test of direct against spectral, all at the 0.1 % level.
	nd, ns := 3000, 20000
	if testing.Short() {
		nd, ns = 600, 4000
	}
	cases := []struct {
		name string
		edit func(*Scenario)
	}{
		{"2-D, noise and blur", func(s *Scenario) { s.Frames, s.Tracks = 20, 8 }},
		{"1-D, noise-dominated", func(s *Scenario) {
			s.Dims, s.LocalisationNM, s.RadiusNM, s.Frames, s.Tracks = 1, 150, 200, 30, 6
		}},
		{"3-D, full-frame blur, few frames", func(s *Scenario) {
			s.Dims, s.ExposureS, s.Frames, s.Tracks = 3, s.FrameIntervalS, 6, 12
		}},
		{"known noise, normal temperature", func(s *Scenario) {
			s.Estimator, s.TemperatureDist, s.TemperatureUK, s.Frames, s.Tracks = "known-noise", "normal", 0.4, 25, 5
		}},
		{"no noise, one long track", func(s *Scenario) {
			s.LocalisationNM, s.ExposureS, s.Frames, s.Tracks = 0, 0, 200, 1
		}},
		{"mixed track lengths", func(s *Scenario) {
			s.TrackLengths = []LengthGroup{{Frames: 8, Count: 5}, {Frames: 31, Count: 2}}
			s.Frames, s.Tracks = 31, 7
		}},
	}
	for ci, c := range cases {
		s := exactScenario(c.edit)
		l := mustExact(t, s)
		sym, _ := l.Intervals(0.95)
		values := map[string][]float64{}
		for _, eng := range []string{EngineDirect, EngineSpectral} {
			n := ns
			if eng == EngineDirect {
				n = nd
			}
			m, _, err := TrialModel(TrialSpec{Scenario: s, Engine: eng})
			if err != nil {
				t.Fatal(err)
			}
			y := make([]float64, n)
			m(rand.New(rand.NewPCG(uint64(ci), 77)), y)
			values[eng] = y
			if d := exactKS(l, y); d > ksLevel/math.Sqrt(float64(n)) {
				t.Errorf("%s, %s: KS against the exact law %.4f > %.4f", c.name, eng, d, ksLevel/math.Sqrt(float64(n)))
			}
			res, err := Summarise(y, 0.95, 2)
			if err != nil {
				t.Fatal(err)
			}
			for i, got := range []float64{res.Low, res.High} {
				se := quantileSE([]float64{0.025, 0.975}[i], l.Density(sym[i]), n)
				if math.Abs(got-sym[i]) > 4*se {
					t.Errorf("%s, %s: interval end %d %.5g, exact %.5g (4 SE %.2g)", c.name, eng, i, got, sym[i], 4*se)
				}
			}
		}
		a, b := values[EngineDirect], values[EngineSpectral]
		ne := float64(len(a)) * float64(len(b)) / float64(len(a)+len(b))
		if d := exactKS2(a, b); d > ksLevel/math.Sqrt(ne) {
			t.Errorf("%s: two-sample KS direct against spectral %.4f > %.4f", c.name, d, ksLevel/math.Sqrt(ne))
		}
	}
}

func TestExactEngineSampler(t *testing.T) {
	// The exact engine's Monte Carlo draws by inversion: its values follow the law (one-sample KS), it
	// is reproducible, and Plan reports the exact intervals with the Monte Carlo beside them.
	s := exactScenario(func(s *Scenario) { s.Trials = 20000 })
	l := mustExact(t, s)
	m, engine, err := TrialModel(TrialSpec{Scenario: s, Engine: EngineExact})
	if err != nil || engine != EngineExact {
		t.Fatalf("TrialModel: %v, engine %q", err, engine)
	}
	y1, y2 := make([]float64, 20000), make([]float64, 20000)
	m(rand.New(rand.NewPCG(3, 4)), y1)
	m(rand.New(rand.NewPCG(3, 4)), y2)
	if !slices.Equal(y1, y2) {
		t.Error("exact engine: the same stream gives different values")
	}
	if d := exactKS(l, y1); d > ksLevel/math.Sqrt(20000) {
		t.Errorf("exact engine draws: KS %.4f > %.4f", d, ksLevel/math.Sqrt(20000))
	}
	res, err := Plan(context.Background(), s, PlanOptions{Engine: EngineExact, NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	sym, short := l.Intervals(0.95)
	if res.MonteCarlo.Engine != EngineExact || res.Exact == nil || res.IntervalNM != sym || res.ShortestIntervalNM != short {
		t.Errorf("Plan with the exact engine: engine %q, intervals %v %v, want %v %v", res.MonteCarlo.Engine, res.IntervalNM, res.ShortestIntervalNM, sym, short)
	}
	if !res.Exact.MonteCarloAgrees || res.MonteCarlo.Trials != 20000 {
		t.Errorf("Plan with the exact engine: Monte Carlo of %d trials deviates by %.3g SE", res.MonteCarlo.Trials, res.Exact.MonteCarloDeviationSE)
	}
	// The default engine stays the spectral Monte Carlo, without the exact law unless asked for.
	res, err = Plan(context.Background(), s, PlanOptions{NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	if res.MonteCarlo.Engine != EngineSpectral || res.Exact != nil {
		t.Errorf("default: engine %q, exact %v", res.MonteCarlo.Engine, res.Exact)
	}
	res, err = Plan(context.Background(), s, PlanOptions{NoPlanner: true, CrossCheck: true})
	if err != nil {
		t.Fatal(err)
	}
	if res.Exact == nil || res.Exact.IntervalNM != sym || !res.Exact.MonteCarloAgrees {
		t.Errorf("cross-check: %+v", res.Exact)
	}
}

func TestExactEngineRefusals(t *testing.T) {
	// The exact law covers the spectral engine's scenarios without drift; elsewhere a FieldError on
	// "engine".
	for _, edit := range []func(*Scenario){
		func(s *Scenario) { s.Estimator = "msd" },
		func(s *Scenario) { s.DriftUMPerS = 0.5 },
		func(s *Scenario) { s.DriftUMPerS, s.DriftRemoved = 0.5, true },
	} {
		s := exactScenario(edit)
		s.Frames, s.Tracks, s.Trials = 20, 10, 2000
		_, _, err := TrialModel(TrialSpec{Scenario: s, Engine: EngineExact})
		var fe *FieldError
		if !errors.As(err, &fe) || fe.Field != "engine" {
			t.Errorf("%+v: error %v, want a FieldError on engine", s, err)
		}
		if _, err := Plan(context.Background(), s, PlanOptions{Engine: EngineExact, NoPlanner: true}); err == nil {
			t.Error("Plan: no error")
		}
		// Cross-checking quietly skips what it cannot cover.
		if res, err := Plan(context.Background(), s, PlanOptions{CrossCheck: true, NoPlanner: true}); err != nil || res.Exact != nil {
			t.Errorf("cross-check of an uncovered scenario: %v, %v", err, res.Exact)
		}
	}
}

func TestLegendreRule(t *testing.T) {
	// n Gauss–Legendre points integrate every polynomial of degree ≤ 2n − 1 exactly: ∫ x^k over [−1, 1]
	// is 2/(k + 1) for even k and 0 for odd k (exact); checked to 1e-13 for n up to 400, and on a
	// shifted interval.
	for n := 1; n <= 400; n++ {
		x, w := legendreRule(n, -1, 1)
		for _, k := range []int{0, 1, 2, 7, 2*n - 2, 2*n - 1} {
			if k < 0 || k > 2*n-1 {
				continue
			}
			s := 0.0
			for i := range x {
				s += w[i] * math.Pow(x[i], float64(k))
			}
			want := 0.0
			if k%2 == 0 {
				want = 2 / float64(k+1)
			}
			if math.Abs(s-want) > 1e-13 {
				t.Fatalf("n %d: ∫x^%d = %.16g, want %.16g", n, k, s, want)
			}
		}
	}
	x, w := legendreRule(26, 297.65, 298.65)
	s := 0.0
	for i := range x {
		s += w[i] * x[i]
	}
	if math.Abs(s-298.15) > 1e-10 {
		t.Errorf("26 points on [297.65, 298.65]: ∫x = %.15g, want 298.15", s)
	}
}
