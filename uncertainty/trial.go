package uncertainty

import (
	"math"
	"math/rand/v2"

	"sizebudget/core"
)

// Engines that sample the track statistics of a trial.
//
// EngineExact is opt-in only (PlanOptions.Engine; neither the command line nor the browser offers
// it): its law is built from many Imhof inversions, and for the known-noise estimator with σ > 0 on
// long tracks and many tracks (e.g. 162 positions × 180 tracks, 2-D, σ = 10 nm) building it takes
// minutes, where the spectral Monte Carlo takes a second. Until that is bounded, plans default to the
// spectral or direct Monte Carlo.
const (
	EngineDirect   = "direct"   // simulate every track, then estimate (any estimator, drift removal)
	EngineSpectral = "spectral" // exact DST-I sampler: one gamma draw per mode (cve, known-noise; no drift removal)
	EngineExact    = "exact"    // draws by inversion of the law computed without sampling (ExactLaw; as spectral, and no drift)
)

// TrialSpec names one Monte Carlo evaluation of a scenario: the scenario with its frames and tracks
// (which the planner varies) and the engine. It is plain data, so a browser worker can rebuild the
// same Model from it (TrialModel) and compute any of its chunks.
type TrialSpec struct {
	Scenario Scenario `json:"scenario"`
	Frames   int      `json:"frames"`
	Tracks   int      `json:"tracks"`
	Engine   string   `json:"engine"` // "" = the fastest exact engine for the scenario
}

// resolve applies the spec's frames and tracks to its scenario, validates it and derives its setup.
func (spec TrialSpec) resolve() (*setup, error) {
	s := spec.Scenario
	if spec.Frames != 0 || spec.Tracks != 0 {
		s.TrackLengths = nil
	}
	if spec.Frames != 0 {
		s.Frames = spec.Frames
	}
	if spec.Tracks != 0 {
		s.Tracks = spec.Tracks
	}
	if err := s.Validate(); err != nil {
		return nil, err
	}
	return newSetup(s)
}

// BestEngine returns the fastest engine that is exact for the scenario: spectral for the
// covariance-based and known-noise estimators without drift removal, direct otherwise.
func BestEngine(s Scenario) string {
	if (s.Estimator == "cve" || s.Estimator == "known-noise") && !(s.DriftRemoved && s.DriftUMPerS > 0) {
		return EngineSpectral
	}
	return EngineDirect
}

// TrialModel returns the Monte Carlo measurement model of a planned measurement, in nm, and the engine
// it uses. Each trial plays one whole experiment as it will really happen:
//
//	T ~ rect(T₀ ± a) or N(T₀, u_T);  η = η_medium(T)·(1 + u_η·Z₁);  δ = u_pix·Z₂
//	D = k_B·T/(6π·η·r₀)                 (the particle's true diffusion coefficient)
//	D̂ = estimator(tracks simulated at D, with noise, blur and a drift of speed ~ U(0, v) in a random direction)
//	D̂_a = D̂/(1 + δ)²                    (the analyst's pixel size is off by δ)
//	r̂ = k_B·T₀/(6π·η_medium(T₀)·D̂_a)    (converted with the nominal temperature and viscosity)
//	y = r₀²/r̂ = r₀·D̂_a/D₀
//
// r̂/r₀ is (to first order in the noise level, exactly without it) a pivot whose law does not depend on
// r₀, so y is distributed as the true radius given a measurement whose estimate equals r₀: its coverage
// interval is the one to report (JCGM 101 5.3).
//
// The engine "exact" draws y by inversion of its law computed without sampling (ExactLaw): one
// normal variate per trial, after a one-off computation (about 25 ms for the demo scenario natively,
// 0.2 s at 100 tracks × 1000 frames; see docs/benchmarks.md); it covers the scenarios of the spectral
// engine that have no drift.
func TrialModel(spec TrialSpec) (Model, string, error) {
	m, engine, _, err := trialModel(spec)
	return m, engine, err
}

// trialModel is TrialModel, also returning the exact law when the engine is "exact".
func trialModel(spec TrialSpec) (Model, string, *ExactLaw, error) {
	u, err := spec.resolve()
	if err != nil {
		return nil, "", nil, err
	}
	s := u.s
	engine := spec.Engine
	if engine == "" {
		engine = BestEngine(s)
	}
	switch engine {
	case EngineSpectral:
		if BestEngine(s) != EngineSpectral {
			return nil, "", nil, &FieldError{Field: "engine", Value: engine, Allowed: `"direct" for this estimator and drift setting`}
		}
	case EngineExact:
		if err := exactEligible(s); err != nil {
			return nil, "", nil, err
		}
		law, err := newExactLaw(u)
		if err != nil {
			return nil, "", nil, err
		}
		return law.model(), engine, law, nil
	case EngineDirect:
	default:
		return nil, "", nil, &FieldError{Field: "engine", Value: engine, Allowed: `"", "direct", "spectral" or "exact"`}
	}
	estimate, err := u.estimator(engine)
	if err != nil {
		return nil, "", nil, err
	}
	rnm := u.r0 * 1e9
	viscosity := u.viscosityAt()
	m := func(r *rand.Rand, y []float64) {
		drift := make([]float64, u.dims)
		for i := range y {
			T := u.drawTemperature(r)
			eta := viscosity(T) * (1 + u.uEta*clampNormal(r))
			delta := u.uPix * clampNormal(r)
			D := core.Boltzmann * T / (6 * math.Pi * eta * u.r0)
			d := u.drawDrift(r, drift)
			Dhat := estimate(r, D, d)
			Da := Dhat / ((1 + delta) * (1 + delta))
			y[i] = rnm * Da / u.D0
		}
	}
	return m, engine, nil, nil
}

// estimator returns the sampler of D̂ for the engine: given the true D and the drift velocity (m/s per
// axis, nil = none), one pooled estimate from the scenario's tracks (grouped by length; the track
// estimates pooled with weights N_i/ΣN, as core.CVE and core.KnownNoise pool them).
func (u *setup) estimator(engine string) (func(r *rand.Rand, D float64, drift []float64) float64, error) {
	if engine == EngineSpectral {
		total := 0
		for _, g := range u.groups {
			total += g.Count * (g.Frames - 1)
		}
		samplers := make([]*core.Spectral, len(u.groups))
		weights := make([]float64, len(u.groups))
		for i, g := range u.groups {
			N := g.Frames - 1
			form := core.CVEForm(u.dt, N)
			if u.s.Estimator == "known-noise" {
				form = core.KnownNoiseForm(u.dt, u.blur, u.s2, N)
			}
			samplers[i] = core.NewSpectral(form, u.dt, u.blur, u.s2, N, g.Count, u.dims)
			weights[i] = float64(g.Count*N) / float64(total)
		}
		if len(samplers) == 1 {
			return samplers[0].Sample, nil
		}
		return func(r *rand.Rand, D float64, drift []float64) float64 {
			sum := 0.0
			for i, sp := range samplers {
				sum += weights[i] * sp.Sample(r, D, drift)
			}
			return sum
		}, nil
	}
	lags := 0
	if u.s.Estimator == "msd" {
		shortest := u.frames
		for _, g := range u.groups {
			shortest = min(shortest, g.Frames)
		}
		lags = min(u.msdLags(u.frames), shortest-1)
	}
	sigma := math.Sqrt(u.s2)
	removeDrift := u.s.DriftRemoved
	return func(r *rand.Rand, D float64, drift []float64) float64 {
		rec := core.Recording{D: D, Dims: u.dims, Interval: u.dt, Exposure: u.tE, Sigma: sigma, Drift: drift}
		tracks := make([]core.Track, 0, u.tracks)
		// The tracks' variates come from a xoshiro256** generator seeded by one draw of the trial's
		// stream: still a function of that stream alone, and faster than drawing them from it
		// (about 1.3× natively and under WebAssembly; see core.BenchmarkNormal).
		src := core.NewXoshiro(r.Uint64())
		for _, g := range u.groups {
			for range g.Count {
				tracks = append(tracks, core.Simulate(src, rec, g.Frames))
			}
		}
		var e core.Estimate
		var err error
		switch u.s.Estimator {
		case "known-noise":
			e, err = core.KnownNoise(tracks, u.dt, u.blur, u.s2, removeDrift)
		case "msd":
			e, err = core.MSDFit(tracks, u.dt, u.blur, lags)
		default:
			e, err = core.CVE(tracks, u.dt, u.blur, removeDrift)
		}
		if err != nil {
			panic("uncertainty: estimator on simulated tracks: " + err.Error())
		}
		return e.D
	}, nil
}

// drawTemperature draws the true temperature (K).
func (u *setup) drawTemperature(r *rand.Rand) float64 {
	if u.uT == 0 {
		return u.T0
	}
	if u.s.TemperatureDist == "normal" {
		return u.T0 + u.uT*clampNormal(r)
	}
	return u.T0 + u.s.TemperatureUK*(2*r.Float64()-1)
}

// drawDrift fills v with a drift velocity of speed ~ U(0, v_max) in a direction uniform over the
// tracked axes, or returns nil when there is no residual drift.
func (u *setup) drawDrift(r *rand.Rand, v []float64) []float64 {
	if u.drift == 0 {
		return nil
	}
	norm := 0.0
	for a := range v {
		v[a] = r.NormFloat64()
		norm += v[a] * v[a]
	}
	speed := u.drift * r.Float64() / math.Sqrt(norm)
	for a := range v {
		v[a] *= speed
	}
	return v
}

// clampNormal draws a standard normal variate clamped to ±5 (probability 6e-7 of clamping), so that
// drawn temperatures stay within the range Validate checked and factors 1 + u·Z stay positive.
func clampNormal(r *rand.Rand) float64 {
	return math.Max(-5, math.Min(5, r.NormFloat64()))
}

// randSource adapts a *rand.Rand to the rand.Source the core simulator takes.
type randSource struct{ r *rand.Rand }

func (s randSource) Uint64() uint64 { return s.r.Uint64() }
