package uncertainty

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"sizebudget/core"
)

// binomialRegion returns the central acceptance region [lo, hi] of a Binomial(n, p) count at two-sided
// level alpha, from the exact distribution (gonum distuv.Binomial CDF).
func binomialRegion(n int, p, alpha float64) (lo, hi int) {
	b := distuv.Binomial{N: float64(n), P: p}
	lo, hi = 0, n
	for k := 0; k <= n; k++ {
		if b.CDF(float64(k)) > alpha/2 {
			lo = k
			break
		}
	}
	for k := n; k >= 0; k-- {
		if 1-b.CDF(float64(k-1)) > alpha/2 {
			hi = k
			break
		}
	}
	return lo, hi
}

// drawTruth draws, for one simulated experiment, what the scenario's distributions say the truth
// may be: the temperature (K), the viscosity with its model error (Pa·s) and the relative error of
// the length scale. It also returns the setup of s.
func drawTruth(t *testing.T, s Scenario, r *rand.Rand) (u *setup, T, eta, delta float64) {
	t.Helper()
	u, err := newSetup(s)
	if err != nil {
		t.Fatal(err)
	}
	T = u.drawTemperature(r)
	if eta, err = u.medium.Viscosity(T); err != nil {
		t.Fatal(err)
	}
	eta *= 1 + u.uEta*r.NormFloat64()
	return u, T, eta, u.uPix * r.NormFloat64()
}

// experiment plays one measurement as it really happens and returns the analyst's radius estimate (nm)
// and the true radius (nm): the true temperature, viscosity error and pixel error are drawn from the
// scenario's distributions, the tracks are simulated directly at the true D, and the estimate is
// converted with the nominal temperature and viscosity.
func experiment(t *testing.T, s Scenario, r *rand.Rand) (estimate, truth float64) {
	t.Helper()
	u, T, eta, delta := drawTruth(t, s, r)
	D := core.Boltzmann * T / (6 * math.Pi * eta * u.r0)
	rec := core.Recording{D: D, Dims: u.dims, Interval: u.dt, Exposure: u.tE, Sigma: math.Sqrt(u.s2)}
	tracks := make([]core.Track, u.tracks)
	for i := range tracks {
		tracks[i] = core.Simulate(randSource{r}, rec, u.frames)
	}
	var e core.Estimate
	var err error
	switch s.Estimator {
	case "known-noise":
		e, err = core.KnownNoise(tracks, u.dt, u.blur, u.s2, false)
	case "msd":
		e, err = core.MSDFit(tracks, u.dt, u.blur, u.msdLags(u.frames))
	default:
		e, err = core.CVE(tracks, u.dt, u.blur, false)
	}
	if err != nil {
		t.Fatal(err)
	}
	Da := e.D / ((1 + delta) * (1 + delta))
	if Da <= 0 {
		t.Fatalf("non-positive estimate %g: the case is too noisy for a coverage test", Da)
	}
	return core.Radius(u.T0, u.eta0, Da) * 1e9, u.r0 * 1e9
}

func TestCoverageOfReportedInterval(t *testing.T) {
	// Repeated simulated experiments: the analyst enters the estimate as the radius and reports the
	// 95 % Monte Carlo interval; the true radius must fall inside it at a rate consistent with 95 %
	// (acceptance region of the exact binomial law at two-sided level 0.001).
	base := Demo()
	base.Trials = 2000
	base.TargetRelU = 0
	relU := func(x float64) *float64 { return &x }
	cases := []struct {
		name string
		edit func(*Scenario)
	}{
		{"sigma 0, no blur", func(s *Scenario) { s.LocalisationNM, s.ExposureS, s.Frames, s.Tracks = 0, 0, 20, 10 }},
		{"high localisation noise", func(s *Scenario) {
			s.RadiusNM, s.LocalisationNM, s.Frames, s.Tracks = 200, 150, 30, 20 // √(DΔt) ≈ 200 nm
		}},
		{"full-frame blur", func(s *Scenario) { s.ExposureS, s.LocalisationNM, s.Frames, s.Tracks = s.FrameIntervalS, 30, 25, 15 }},
		{"temperature-dominated", func(s *Scenario) { s.TemperatureUK, s.Frames, s.Tracks = 3, 200, 200 }},
		{"glycerol mixture", func(s *Scenario) {
			s.Medium, s.GlycerolMassFraction, s.RadiusNM, s.Frames, s.Tracks = "glycerol", 0.4, 25, 40, 30
		}},
		{"known noise, normal temperature, custom viscosity", func(s *Scenario) {
			s.Estimator, s.TemperatureDist, s.TemperatureUK = "known-noise", "normal", 0.4
			s.Medium, s.ViscosityMPaS, s.ViscosityTempCoeff, s.ViscosityRelU = "custom", 1.3, -0.02, relU(0.02)
			s.Frames, s.Tracks = 15, 12
		}},
	}
	n := 300
	if testing.Short() {
		n = 80 // under WebAssembly (-short); the acceptance region widens accordingly
	}
	lo, hi := binomialRegion(n, 0.95, 0.001)
	for ci, c := range cases {
		s := base
		c.edit(&s)
		if err := s.Validate(); err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		r := rand.New(rand.NewPCG(2024, uint64(ci)))
		hits := 0
		for i := range n {
			est, truth := experiment(t, s, r)
			rep := s
			rep.RadiusNM = est
			rep.Seed = uint64(1000 + i)
			res, err := Plan(context.Background(), rep, PlanOptions{NoPlanner: true, Workers: 1})
			if err != nil {
				t.Fatalf("%s: %v", c.name, err)
			}
			if truth >= res.IntervalNM[0] && truth <= res.IntervalNM[1] {
				hits++
			}
		}
		t.Logf("%s: %d of %d intervals hold the true radius (acceptance %d–%d)", c.name, hits, n, lo, hi)
		if hits < lo || hits > hi {
			t.Errorf("%s: coverage %d/%d outside the binomial acceptance region [%d, %d]", c.name, hits, n, lo, hi)
		}
	}
}

func TestExactChiSquaredCase(t *testing.T) {
	// Known-noise estimator, σ = 0, no blur, exact temperature and viscosity: D̂ = D·χ²(k)/k exactly
	// (k = d·M·N), so y = r₀·χ²(k)/k and the interval is r₀·[χ²_k(0.025), χ²_k(0.975)]/k (gonum
	// distuv.ChiSquared quantiles). Tolerance: 4 standard errors of a Monte Carlo quantile,
	// √(p(1−p)/M)/f(q).
	zero := 0.0
	s := Demo()
	s.Estimator, s.LocalisationNM, s.ExposureS, s.TemperatureUK, s.PixelRelU = "known-noise", 0, 0, 0, 0
	s.ViscosityRelU = &zero
	s.Frames, s.Tracks, s.TargetRelU, s.Trials = 11, 3, 0, 200000
	res, err := Plan(context.Background(), s, PlanOptions{NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	k := float64(s.Dims * s.Tracks * (s.Frames - 1))
	chi := distuv.ChiSquared{K: k}
	M := float64(res.MonteCarlo.Trials)
	for i, p := range []float64{0.025, 0.975} {
		q := chi.Quantile(p)
		want := s.RadiusNM * q / k
		// density of y = r₀·X/k at the quantile
		f := chi.Prob(q) * k / s.RadiusNM
		se := math.Sqrt(p*(1-p)/M) / f
		if got := res.IntervalNM[i]; math.Abs(got-want) > 4*se {
			t.Errorf("interval end %d: Monte Carlo %.4f nm, χ² %.4f nm (4 SE %.4f)", i, got, want, 4*se)
		}
	}
	if res.MonteCarlo.Engine != EngineSpectral {
		t.Errorf("engine %q, want spectral", res.MonteCarlo.Engine)
	}
}

func TestEnginesAgree(t *testing.T) {
	// The direct and the spectral engine sample the same law: their 95 % interval ends agree within the
	// Monte Carlo tolerance (4 combined standard errors of the quantiles, from the density estimated by
	// the normal approximation of the spread).
	s := Demo()
	s.Frames, s.Tracks, s.Trials, s.TargetRelU = 15, 8, 20000, 0
	var ends [2][2]float64
	var sd float64
	for i, eng := range []string{EngineDirect, EngineSpectral} {
		res, err := Plan(context.Background(), s, PlanOptions{Engine: eng, NoPlanner: true})
		if err != nil {
			t.Fatal(err)
		}
		ends[i] = res.IntervalNM
		sd = res.MonteCarlo.StdUncNM
	}
	// quantile SE ≈ √(p(1−p)/M)/f with f ≈ φ(1.96)/sd for a near-normal law
	se := math.Sqrt(0.025*0.975/float64(s.Trials)) * sd / distuv.UnitNormal.Prob(1.96)
	for j := range 2 {
		if d := math.Abs(ends[0][j] - ends[1][j]); d > 4*math.Sqrt2*se {
			t.Errorf("interval end %d: direct %.4f, spectral %.4f nm (tolerance %.4f)", j, ends[0][j], ends[1][j], 4*math.Sqrt2*se)
		}
	}
}

func TestGUMValidation(t *testing.T) {
	// Nearly linear (many frames over many tracks, small relative u of D, a small normal temperature
	// uncertainty, and no viscosity or pixel error, whose 1/(1 + e) factors are the model's strongest
	// non-linearity): the JCGM 101 clause 8 comparison passes. Its tolerance at n_dig = 2 is tight: the
	// skewness γ ≈ √(8/k) of the χ²-like D̂ moves both interval ends by about 0.47·γ·u, which must stay
	// below δ ≥ 0.005·u, so k must be large (here k ≈ 2/u_rel² ≈ 8e5). Few frames (large relative u of
	// D, strongly skewed law of D̂): it fails.
	zero := 0.0
	s := Demo()
	s.TargetRelU, s.ViscosityRelU, s.PixelRelU = 0, &zero, 0
	s.Frames, s.Tracks, s.TemperatureDist, s.TemperatureUK = 101, 4000, "normal", 0.1
	res, err := Plan(context.Background(), s, PlanOptions{NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	if !res.GUM.Validated {
		t.Errorf("many frames (%d runs): GUM not validated (d_low %.3g, d_high %.3g, δ %.3g nm)", res.MonteCarlo.Runs, res.GUM.DLowNM, res.GUM.DHighNM, res.GUM.ToleranceNM)
	}
	t.Logf("many frames: %d trials, d_low %.3g, d_high %.3g, δ %.3g nm", res.MonteCarlo.Trials, res.GUM.DLowNM, res.GUM.DHighNM, res.GUM.ToleranceNM)
	s.Frames, s.Tracks = 5, 2
	res, err = Plan(context.Background(), s, PlanOptions{NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	if res.GUM.Validated {
		t.Errorf("few frames: GUM validated (d_low %.3g, d_high %.3g, δ %.3g nm)", res.GUM.DLowNM, res.GUM.DHighNM, res.GUM.ToleranceNM)
	}
	t.Logf("few frames: %d trials, d_low %.3g, d_high %.3g, δ %.3g nm", res.MonteCarlo.Trials, res.GUM.DLowNM, res.GUM.DHighNM, res.GUM.ToleranceNM)
}
