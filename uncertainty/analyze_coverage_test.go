package uncertainty

import (
	"context"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"sizebudget/core"
)

// recordedExperiment plays one recording as it really happens, for the coverage of Analyze: the true
// temperature, the error of the viscosity model and the error of the length calibration are drawn
// from the distributions the settings state; the particle of radius rNM (nm) diffuses at the true D;
// its tracks (of the given lengths, localisation precision sigma in m) are recorded with the
// analyst's length scale off by the calibration error, with a common drift (m/s per axis, nil = none).
func recordedExperiment(t *testing.T, s Scenario, rNM, sigma float64, drift []float64, lengths []int, r *rand.Rand) []core.Track {
	t.Helper()
	_, T, eta, delta := drawTruth(t, s, r)
	scale := 1 + delta
	rec := core.Recording{D: core.Diffusion(T, eta, rNM*1e-9), Dims: s.Dims, Interval: s.FrameIntervalS, Exposure: s.ExposureS, Sigma: sigma, Drift: drift}
	tracks := simulateTracks(r, rec, lengths)
	for _, tr := range tracks {
		for _, p := range tr.Pos {
			for i := range p {
				p[i] *= scale
			}
		}
	}
	return tracks
}

// TestAnalyzeCoverage analyses many simulated recordings of a particle of known radius, each with
// its own true temperature, viscosity error and calibration error drawn from the stated
// distributions, and counts how often the 95 % interval holds the true radius. The count must lie
// in the acceptance region of the exact Binomial(n, 0.95) law at two-sided level 0.001. (With M = 1000
// Monte Carlo values an interval of q = 950 of them holds a new draw of the same law with probability
// q/(M + 1) = 0.949, so the finite Monte Carlo does not move the expected count out of the region.)
func TestAnalyzeCoverage(t *testing.T) {
	cases := []struct {
		name    string
		edit    func(*Scenario)
		rNM     float64
		sigma   float64
		lengths func(r *rand.Rand) []int
		drift   []float64
	}{
		{"mixed lengths, 2-D, rect temperature", func(s *Scenario) {}, 50, 40e-9,
			func(r *rand.Rand) []int { return mixedLengths(r, 25, 5, 40) }, nil},
		{"3-D, full-frame blur, normal temperature dominating", func(s *Scenario) {
			s.Dims, s.ExposureS, s.TemperatureDist, s.TemperatureUK = 3, s.FrameIntervalS, "normal", 1.5
		}, 80, 20e-9, func(r *rand.Rand) []int { return mixedLengths(r, 120, 25, 35) }, nil},
		{"noise-dominated short tracks in glycerol", func(s *Scenario) {
			s.Medium, s.GlycerolMassFraction, s.ExposureS = "glycerol", 0.3, 0.002
		}, 100, 250e-9, func(r *rand.Rand) []int { return mixedLengths(r, 30, 8, 30) }, nil}, // ε ≈ 1.9
		// A drift that biases D̂ by about 6.6 %, found and corrected by the analysis.
		{"common drift of (3, −2) µm/s", func(s *Scenario) {}, 50, 30e-9,
			func(r *rand.Rand) []int { return mixedLengths(r, 40, 15, 35) }, []float64{3e-6, -2e-6}},
	}
	n := 200
	if testing.Short() {
		n = 30 // a smoke test (the WebAssembly run of CI); acceptance region 23–30
	}
	lo, hi := binomialRegion(n, 0.95, 0.001)
	if b := (distuv.Binomial{N: float64(n), P: 0.95}); b.CDF(float64(hi))-b.CDF(float64(lo-1)) < 0.999 {
		t.Fatalf("acceptance region [%d, %d] holds less than 99.9 %%", lo, hi)
	}
	for ci, c := range cases {
		s := analysisSettings()
		c.edit(&s)
		r := rand.New(rand.NewPCG(2026, uint64(ci)))
		hits, corrected := 0, 0
		for i := range n {
			tracks := recordedExperiment(t, s, c.rNM, c.sigma, c.drift, c.lengths(r), r)
			set := s
			set.Seed, set.Trials = uint64(1000+i), 1000 // the smallest fixed run the scenario allows, for speed
			a, err := Analyze(context.Background(), Tracks(tracks), set, PlanOptions{Workers: 1})
			if err != nil {
				t.Fatalf("%s, experiment %d: %v", c.name, i, err)
			}
			if a.IntervalNM[0] <= c.rNM && c.rNM <= a.IntervalNM[1] {
				hits++
			}
			if a.Drift.Corrected {
				corrected++
			}
		}
		if c.drift != nil && corrected < n*9/10 {
			t.Errorf("%s: the drift was corrected in %d of %d experiments only", c.name, corrected, n)
		}
		t.Logf("%s: %d of %d intervals hold the true radius (acceptance %d–%d)", c.name, hits, n, lo, hi)
		if hits < lo || hits > hi {
			t.Errorf("%s: coverage %d/%d outside the binomial acceptance region [%d, %d]", c.name, hits, n, lo, hi)
		}
	}
}
