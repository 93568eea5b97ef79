package uncertainty

import (
	"context"
	"fmt"
	"math"
	"slices"

	"sizebudget/core"
)

// PlanFormat identifies the JSON of a PlanResult.
const PlanFormat = "sizebudget/plan/1"

// plannerTrials is the fixed number of Monte Carlo trials of each confirmation step of the planner: the
// JCGM 101 run size at 95 %. All steps share one seed, so neighbouring frame counts are compared with
// common random numbers.
const plannerTrials = 10000

// PlanOptions control Plan and Check.
type PlanOptions struct {
	// Engine forces the track-statistics engine ("direct", "spectral" or "exact"); "" picks the fastest
	// exact Monte Carlo sampler (BestEngine). With "exact" the reported intervals are those of the law
	// computed without sampling (ExactLaw), and the Monte Carlo, drawn from that law by inversion, is
	// reported beside them (JCGM 101) and checked against it (PlanResult.Exact).
	Engine string
	// CrossCheck also computes the exact law when the scenario allows it (ExactLaw) and reports it, with
	// the agreement of the Monte Carlo, in PlanResult.Exact. Implied by Engine "exact".
	CrossCheck bool
	// Workers is the number of goroutines of the native Monte Carlo; 0 = all processors.
	Workers int
	// Progress, if not nil, is called between Monte Carlo chunks with the trials done and planned so far,
	// over all the propagations of the plan.
	Progress func(done, planned int)
	// Propagate, if not nil, replaces the native Monte Carlo run of one TrialSpec (a browser splits the
	// chunks over workers with RunChunks and merges them). It must return what Propagate would.
	Propagate func(ctx context.Context, spec TrialSpec, opt Options) (*Result, error)
	// NoPlanner skips the search for the smallest number of frames (and its curve).
	NoPlanner bool
}

// PlanResult is the answer to "with these settings, what interval on the radius will I get, what
// dominates it, and how many frames do I need?". Radii in nm; relative uncertainties as fractions.
type PlanResult struct {
	Format             string     `json:"format"`
	Scenario           Scenario   `json:"scenario"`
	RadiusNM           float64    `json:"radius_nm"`
	DiffusionUM2PerS   float64    `json:"diffusion_um2_per_s"`
	ViscosityMPaS      float64    `json:"viscosity_mPa_s"`
	TemperatureK       float64    `json:"temperature_K"`
	Coverage           float64    `json:"coverage"`
	IntervalNM         [2]float64 `json:"interval_nm"`
	ShortestIntervalNM [2]float64 `json:"shortest_interval_nm"`
	RelExpanded        float64    `json:"relative_expanded_uncertainty"`
	Epsilon            float64    `json:"reduced_localisation_error"` // ε = σ²/(DΔt) − 2R
	Blur               float64    `json:"blur_coefficient"`           // R = t_E/(6Δt)
	GUM                GUMResult  `json:"gum"`
	Budget             []Source   `json:"budget"`
	MonteCarlo         MCSummary  `json:"monte_carlo"`
	// Planner.
	TargetRelU           float64       `json:"target_relative_expanded_uncertainty"`
	RecommendedMinFrames *int          `json:"recommended_min_frames"`
	TargetReachable      *bool         `json:"target_reachable"` // null when no target is set
	Unreachable          string        `json:"unreachable_reason,omitempty"`
	DominantSource       string        `json:"dominant_source"`
	Focus                *FocusSummary `json:"focus,omitempty"`
	Warnings             []string      `json:"warnings"`
	Curve                []CurvePoint  `json:"curve"`
	Histogram            Histogram     `json:"histogram"`
	// Exact is the law computed without sampling, when the engine is "exact" or CrossCheck asked for it.
	Exact *ExactSummary `json:"exact,omitempty"`

	values []float64 // sorted Monte Carlo values, nm (for charts)
}

// GUMResult summarises the GUM evaluation and its JCGM 101 clause 8 validation by the Monte Carlo.
type GUMResult struct {
	RelU         float64    `json:"relative_standard_uncertainty"`
	K            float64    `json:"coverage_factor"`
	EffectiveDOF DOF        `json:"effective_dof"`
	IntervalNM   [2]float64 `json:"interval_nm"`
	RelExpanded  float64    `json:"relative_expanded_uncertainty"`
	Validated    bool       `json:"validated"`
	DLowNM       float64    `json:"d_low_nm"`
	DHighNM      float64    `json:"d_high_nm"`
	ToleranceNM  float64    `json:"tolerance_nm"`
}

// MCSummary records how the Monte Carlo was run, so it can be reproduced.
type MCSummary struct {
	Trials     int     `json:"trials"`
	Seed       uint64  `json:"seed"`
	Engine     string  `json:"engine"`
	Adaptive   bool    `json:"adaptive"`
	Converged  bool    `json:"converged"`
	Runs       int     `json:"runs"`
	MeanNM     float64 `json:"mean_nm"`
	StdUncNM   float64 `json:"standard_uncertainty_nm"`
	NDig       int     `json:"n_dig"`
	NonPositve float64 `json:"nonpositive_fraction"` // share of trials whose D̂ was ≤ 0
}

// FocusSummary reports how long particles stay in a focal slab of the given depth.
type FocusSummary struct {
	DepthUM           float64 `json:"depth_um"`
	MeanResidenceS    float64 `json:"mean_residence_s"`
	ExpectedFrames    float64 `json:"expected_frames"` // frames per track before the particle leaves focus
	ReachableFrames   int     `json:"reachable_frames"`
	RecommendedTracks *int    `json:"recommended_tracks_at_reachable_frames"`
	TracksReachTarget bool    `json:"tracks_reach_target"`
}

// CurvePoint is one point of the analytic relative expanded uncertainty against frames per track.
type CurvePoint struct {
	Frames      int     `json:"frames"`
	RelExpanded float64 `json:"relative_expanded_uncertainty"`
}

// Histogram is a histogram of the Monte Carlo radius values.
type Histogram struct {
	EdgesNM []float64 `json:"edges_nm"`
	Counts  []int     `json:"counts"`
}

// Values returns the sorted Monte Carlo values of the radius in nm (not part of the JSON).
func (p *PlanResult) Values() []float64 { return p.values }

// Plan evaluates a scenario: the Monte Carlo coverage interval on the radius at its settings (JCGM 101
// adaptive unless Trials is set), the GUM budget and its validation, and the smallest number of frames
// per track that reaches the target (searched on the GUM model, confirmed by simulation).
func Plan(ctx context.Context, s Scenario, opt PlanOptions) (*PlanResult, error) {
	s = s.Defaults()
	if err := s.Validate(); err != nil {
		return nil, err
	}
	u, err := newSetup(s)
	if err != nil {
		return nil, err
	}
	pr := &progress{fn: opt.Progress}
	res := &PlanResult{Format: PlanFormat, Scenario: s, RadiusNM: u.r0 * 1e9, DiffusionUM2PerS: u.D0 * 1e12,
		ViscosityMPaS: u.eta0 * 1e3, TemperatureK: u.T0, Coverage: u.p, Epsilon: u.epsilon(), Blur: u.blur,
		TargetRelU: s.TargetRelU, Warnings: []string{}}

	b := u.budget(u.groups)
	res.Budget = b.Sources
	res.DominantSource = dominant(b)
	mc, engine, law, err := runMCLaw(ctx, s, 0, 0, s.Trials, opt, pr)
	if err != nil {
		return nil, err
	}
	if law == nil && opt.CrossCheck && exactEligible(s) == nil {
		if law, err = newExactLaw(u); err != nil {
			return nil, err
		}
	}
	res.IntervalNM = [2]float64{mc.Low, mc.High}
	res.ShortestIntervalNM = [2]float64{mc.ShortLow, mc.ShortHigh}
	validated := mc
	if law != nil {
		ex := law.summary(mc, u.p)
		res.Exact = &ex
		if engine == EngineExact {
			res.IntervalNM, res.ShortestIntervalNM = ex.IntervalNM, ex.ShortestIntervalNM
			validated = &Result{Low: ex.IntervalNM[0], High: ex.IntervalNM[1], StdUnc: ex.StdUncNM}
		}
		if !ex.MonteCarloAgrees {
			res.Warnings = append(res.Warnings, fmt.Sprintf("Monte Carlo: its interval ends differ from the exact law's by %.3g standard errors (more than 4)", ex.MonteCarloDeviationSE))
		}
	}
	res.RelExpanded = (res.IntervalNM[1] - res.IntervalNM[0]) / (2 * res.RadiusNM)
	ndig := mc.NDig
	val := ValidateGUM(validated, res.RadiusNM, b.RelExpanded*res.RadiusNM, ndig)
	res.GUM = GUMResult{RelU: b.RelU, K: b.K, EffectiveDOF: b.EffectiveDOF, IntervalNM: b.IntervalNM, RelExpanded: b.RelExpanded,
		Validated: val.Passed, DLowNM: val.DLow, DHighNM: val.DHigh, ToleranceNM: val.Delta}
	nonpos, _ := slices.BinarySearch(mc.Values, math.SmallestNonzeroFloat64)
	res.MonteCarlo = MCSummary{Trials: mc.Trials, Seed: s.Seed, Engine: engine, Adaptive: s.Trials == 0, Converged: mc.Converged,
		Runs: mc.Runs, MeanNM: mc.Mean, StdUncNM: mc.StdUnc, NDig: ndig, NonPositve: float64(nonpos) / float64(len(mc.Values))}
	res.values = mc.Values
	res.Histogram = histogram(mc.Values, mc.Low, mc.High, 40)
	res.Warnings = append(res.Warnings, u.warnings(res)...)

	if len(s.TrackLengths) > 0 && !opt.NoPlanner {
		res.Warnings = append(res.Warnings, "planner: skipped, the scenario gives recorded track lengths")
		opt.NoPlanner = true
	}
	if !opt.NoPlanner {
		if err := u.plan(ctx, res, opt, pr); err != nil {
			return nil, err
		}
	}
	return res, nil
}

// dominant names the source with the largest share of the variance.
func dominant(b Budget) string {
	name, best := "", -1.0
	for _, x := range b.Sources {
		if x.Share > best {
			name, best = x.Source, x.Share
		}
	}
	return name
}

// runMC runs the Monte Carlo of the scenario at frames × tracks; trials 0 = adaptive. With the exact
// engine, the Result's interval ends, mean and standard uncertainty are replaced by the exact law's (its
// Values stay the Monte Carlo draws from that law), so that the planner compares exact figures.
func runMC(ctx context.Context, s Scenario, frames, tracks, trials int, opt PlanOptions, pr *progress) (*Result, string, error) {
	res, engine, law, err := runMCLaw(ctx, s, frames, tracks, trials, opt, pr)
	if err != nil || law == nil {
		return res, engine, err
	}
	patched := *res
	sym, short := law.Intervals(res.Coverage)
	patched.Low, patched.High, patched.ShortLow, patched.ShortHigh = sym[0], sym[1], short[0], short[1]
	patched.Mean, patched.StdUnc = law.Mean(), law.StdUnc()
	return &patched, engine, nil
}

// runMCLaw is runMC without the replacement, also returning the exact law of the exact engine.
func runMCLaw(ctx context.Context, s Scenario, frames, tracks, trials int, opt PlanOptions, pr *progress) (*Result, string, *ExactLaw, error) {
	spec := TrialSpec{Scenario: s, Frames: frames, Tracks: tracks, Engine: opt.Engine}
	m, engine, law, err := trialModel(spec)
	if err != nil {
		return nil, "", nil, err
	}
	spec.Engine = engine
	mo := Options{Coverage: s.Coverage, Trials: trials, Seed: s.Seed, Workers: opt.Workers, Progress: pr.phase()}
	var res *Result
	if opt.Propagate != nil {
		res, err = opt.Propagate(ctx, spec, mo)
	} else {
		res, err = Propagate(ctx, m, mo)
	}
	pr.close()
	if err != nil {
		return nil, "", nil, err
	}
	return res, engine, law, nil
}

// progress accumulates the progress of successive propagations into one count.
type progress struct {
	fn                  func(done, planned int)
	doneBefore, current int
	plannedCurrent      int
}

func (p *progress) phase() func(done, planned int) {
	if p.fn == nil {
		return nil
	}
	return func(done, planned int) {
		p.current, p.plannedCurrent = done, planned
		p.fn(p.doneBefore+done, p.doneBefore+planned)
	}
}

func (p *progress) close() {
	p.doneBefore += p.current
	p.current, p.plannedCurrent = 0, 0
}

// warnings lists what a careful user should know about the settings and the result.
func (u *setup) warnings(res *PlanResult) []string {
	var w []string
	rho := u.s.ParticleDensity
	if rho == 0 {
		rho = 1050
	}
	if err := core.CheckInertia(core.MomentumRelaxation(rho, u.r0, u.eta0), u.dt, u.tE); err != nil {
		w = append(w, "inertia: "+err.Error())
	}
	if snr := math.Sqrt(u.D0*u.dt) / math.Sqrt(u.s2); u.s2 > 0 && snr < 1 {
		w = append(w, fmt.Sprintf("localisation: the step per frame √(DΔt) = %.3g nm is smaller than σ = %.3g nm (SNR %.2f); the estimate is dominated by noise", math.Sqrt(u.D0*u.dt)*1e9, math.Sqrt(u.s2)*1e9, snr))
	}
	if f := res.MonteCarlo.NonPositve; f > 0 {
		w = append(w, fmt.Sprintf("estimates: %.2g %% of the simulated estimates of D were ≤ 0; the lower end of the interval is not a physical radius — use more frames or tracks", 100*f))
	}
	if !res.GUM.Validated {
		w = append(w, fmt.Sprintf("GUM: the first-order GUM interval differs from the Monte Carlo one by more than the tolerance %.2g nm (JCGM 101 clause 8); report the Monte Carlo interval", res.GUM.ToleranceNM))
	}
	if res.MonteCarlo.Adaptive && !res.MonteCarlo.Converged {
		w = append(w, "Monte Carlo: the adaptive procedure stopped at its trial cap before reaching its tolerance")
	}
	if u.driftBias {
		w = append(w, "drift: residual drift is not removed; it biases D upwards and the radius downwards (included in the budget)")
	}
	return w
}

// histogram bins the values around the coverage interval (three interval half-widths either side, so
// far outliers do not flatten the picture); values outside fall into the end bins.
func histogram(sorted []float64, lo, hi float64, n int) Histogram {
	c := (lo + hi) / 2
	w := math.Max(hi-lo, 1e-300)
	a := math.Max(sorted[0], c-1.5*w)
	z := math.Min(sorted[len(sorted)-1], c+1.5*w)
	if !(z > a) {
		z = a + w
	}
	h := Histogram{EdgesNM: make([]float64, n+1), Counts: make([]int, n)}
	for i := range h.EdgesNM {
		h.EdgesNM[i] = a + (z-a)*float64(i)/float64(n)
	}
	for _, v := range sorted {
		k := int(float64(n) * (v - a) / (z - a))
		h.Counts[max(0, min(n-1, k))]++
	}
	return h
}
