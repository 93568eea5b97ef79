package uncertainty

import (
	"context"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"slices"

	"sizebudget/core"
)

// AnalysisFormat identifies the JSON of an Analysis.
const AnalysisFormat = "sizebudget/analysis/1"

// Thresholds of the analysis of recorded tracks (our choices, documented on Analyze).
const (
	// FreeDiffusionZ is the |z| above which a covariance of displacements at lag ≥ 2 is reported as a
	// departure from free diffusion: under the model |z| > 4 has probability 6e-5 per lag.
	FreeDiffusionZ = 4
	// DriftAlpha is the significance level of the test for a common drift.
	DriftAlpha = 0.001
	// DriftShare is the fraction of the track-statistics relative uncertainty of D̂ above which the
	// bias of a significant drift is corrected.
	DriftShare = 0.1
)

// Limits of the analysis' own computations.
const (
	exactLengths   = 32      // track lengths up to this many positions are passed to the engine exactly
	lengthBinRatio = 1.25    // above it, lengths are grouped in bins this wide (upper/lower)
	monoMinTracks  = 4000    // the monodisperse reference simulates at least this many tracks…
	monoMaxDraws   = 4000000 // …within this many gamma draws (one per mode of each track)
	monoStream     = 0x6d6f6e6f64697370
)

// TrackSource is a stream of recorded tracks, as a track-file reader delivers them. Next returns the
// next track (positions in m, equally spaced in time by the frame interval, at least MinFrames
// positions) or io.EOF after the last; Dropped returns the number of tracks the source has left out
// (as too short), which Analyze reports.
type TrackSource interface {
	Next() (core.Track, error)
	Dropped() int
}

// Tracks returns a TrackSource of tracks held in memory, which drops none.
func Tracks(tracks []core.Track) TrackSource { return &sliceSource{tracks: tracks} }

type sliceSource struct {
	tracks []core.Track
	i      int
}

func (s *sliceSource) Next() (core.Track, error) {
	if s.i == len(s.tracks) {
		return core.Track{}, io.EOF
	}
	s.i++
	return s.tracks[s.i-1], nil
}

func (s *sliceSource) Dropped() int { return 0 }

// Analysis is what recorded tracks say about the particles: the radius with its coverage interval,
// the estimates it rests on and the checks of the model behind them. Radii in nm, diffusion
// coefficients in µm²/s, velocities in µm/s.
type Analysis struct {
	Format             string     `json:"format"`
	RadiusNM           float64    `json:"radius_nm"`
	IntervalNM         [2]float64 `json:"interval_nm"`          // probabilistically symmetric
	ShortestIntervalNM [2]float64 `json:"shortest_interval_nm"` // shortest
	Coverage           float64    `json:"coverage"`
	RelExpanded        float64    `json:"relative_expanded_uncertainty"`
	// DiffusionUM2PerS is the pooled covariance-based D̂, corrected for drift when Drift.Corrected.
	DiffusionUM2PerS    float64 `json:"diffusion_um2_per_s"`
	DiffusionRawUM2PerS float64 `json:"diffusion_uncorrected_um2_per_s"`
	// LocalisationNM is √max(σ̂², 0) from the pooled σ̂² (LocalisationVarNM2, which may be negative),
	// both corrected for drift when Drift.Corrected.
	LocalisationNM     float64 `json:"localisation_nm"`
	LocalisationVarNM2 float64 `json:"localisation_variance_nm2"`
	// LocalisationVarSENM2 is the standard error of σ̂² (see Analyze).
	LocalisationVarSENM2 float64 `json:"localisation_variance_standard_error_nm2"`
	Dims                 int     `json:"dims"`
	TracksUsed           int     `json:"tracks_used"`
	TracksDropped        int     `json:"tracks_dropped"`
	Displacements        int     `json:"displacements"` // per axis, summed over the tracks
	Positions            struct {
		Min  int     `json:"min"`
		Mean float64 `json:"mean"`
		Max  int     `json:"max"`
	} `json:"positions_per_track"`
	DriftUMPerS   float64            `json:"drift_um_per_s"` // speed of the mean velocity
	Drift         DriftEstimate      `json:"drift"`
	FreeDiffusion []LagCheck         `json:"free_diffusion"`
	Radii         RadiusDistribution `json:"track_radii"`
	Plan          *PlanResult        `json:"plan"` // the engine's evaluation of the scenario built from the data
	Warnings      []string           `json:"warnings"`
}

// DriftEstimate is the common drift of the tracks: their mean velocity, its standard error under free
// diffusion, and whether its bias of D̂ matters.
type DriftEstimate struct {
	VelocityUMPerS []float64 `json:"velocity_um_per_s"`       // per axis
	StdErrUMPerS   []float64 `json:"standard_error_um_per_s"` // per axis
	ChiSquare      float64   `json:"chi_square"`              // Σ_a (v_a/SE_a)², χ²(d) without drift
	PValue         float64   `json:"p_value"`
	RelBias        float64   `json:"relative_bias"`    // bias of D̂ by the drift, relative to D̂
	TrackRelU      float64   `json:"track_relative_u"` // relative standard uncertainty of D̂ from the tracks
	Matters        bool      `json:"matters"`          // significant and RelBias > DriftShare·TrackRelU
	Corrected      bool      `json:"corrected"`        // D̂ corrected for RelBias

	speed2 float64 // |v̂|², (m/s)²
}

// LagCheck is the free-diffusion check at one lag: the normalised covariance of displacements k
// frames apart, pooled over tracks and axes, which is zero for free diffusion with white noise.
type LagCheck struct {
	Lag         int     `json:"lag"`
	Pairs       int     `json:"pairs"`
	Correlation float64 `json:"correlation"`
	StdErr      float64 `json:"standard_error"`
	Z           float64 `json:"z"`
}

// RadiusDistribution is the histogram of the per-track radii (each track's D̂ converted at the nominal
// temperature and viscosity) beside the expected histogram of a perfectly monodisperse sample of the
// pooled radius recorded with the same track lengths and noise: Counts and Monodisperse share the
// edges. Values outside the edges are counted in Below and Above; tracks whose D̂ ≤ 0 have no radius
// and are counted in NonPositive.
type RadiusDistribution struct {
	EdgesNM         []float64 `json:"edges_nm"`
	Counts          []int     `json:"counts"`
	Below           int       `json:"below"`
	Above           int       `json:"above"`
	NonPositive     int       `json:"nonpositive"`
	Monodisperse    []float64 `json:"monodisperse_counts"`
	MonoBelow       float64   `json:"monodisperse_below"`
	MonoAbove       float64   `json:"monodisperse_above"`
	MonoNonPositive float64   `json:"monodisperse_nonpositive"`
	SimulatedTracks int       `json:"simulated_tracks"`
}

// Analyze analyses recorded tracks read once from src, with settings stating how they were recorded
// and what is known of the conditions, and returns the radius with its coverage interval.
//
// From settings it takes: the medium and its parameters, temperature_C, temperature_u_K and
// temperature_distribution, viscosity_relative_u, frame_interval_s, exposure_s, pixel_relative_u (the
// relative standard uncertainty of the length calibration), coverage, trials, seed,
// particle_density_kg_per_m3, name and note. The particle, the number and lengths of the tracks,
// the localisation precision, the axes and the estimator come from the data (the covariance-based
// estimator); the other fields are ignored. opt is passed to Plan (NoPlanner is set).
//
// Per track i of N_i displacements per axis, the covariance-based D̂_i and σ̂²_i (core.CVETrack); pooled
// with weights N_i/ΣN (as core.CVE pools them):
//
//	D̂ = Σ N_i·D̂_i / ΣN,   σ̂² = Σ N_i·σ̂²_i / ΣN
//
// The standard error of σ̂² is that of the pooled quadratic form at D̂ and max(σ̂², 0) (see varS2).
//
// Drift: the mean velocity per axis, from the end-to-end displacements e_i = x_last − x_first,
// with its standard error under free diffusion (variogram of Berglund 2010, at D̂ and σ̂²):
//
//	v̂ = Σ e_i / (Δt·ΣN),   SE² = [2D̂Δt·ΣN + 2M(σ̂² − 2RD̂Δt)] / (Δt·ΣN)²
//
// A common drift v biases every track's D̂ by 1.5·|v|²Δt/d (the CVE quadratic form, 1ᵀQ1 = 1.5/Δt
// per axis). It matters when it is significant (χ² = Σ(v̂_a/SE_a)² beyond the χ²(d) quantile at
// 1 − DriftAlpha) and its estimated bias, from the unbiased |v|² = Σ(v̂_a² − SE_a²), exceeds
// DriftShare (a tenth) of the relative standard uncertainty of D̂ from the track statistics. Then D̂
// and every D̂_i are corrected by that bias, and σ̂² by its own, (3R − 1)·|v|²Δt²/d (which assumes the
// drift is common to all tracks), and a warning says so; the uncertainty of the correction itself is
// not propagated.
//
// Radius and interval: a scenario with diffusion_um2_per_s = D̂, localisation_nm = √max(σ̂², 0) (the
// data's own ε), track_lengths = the recorded lengths (exact up to 32 positions, above that grouped
// in bins 25 % wide at their mean length, which keeps the pooled variance, nearly linear in the
// length there, to a relative 1e-3), and the user's temperature, viscosity and calibration, is
// evaluated by Plan: its Monte Carlo coverage interval is the interval for the true radius.
//
// Free diffusion with white localisation noise has no covariance of displacements beyond lag 1. At
// lags k = 2 and 3 the displacements are centred on the drift, and
//
//	ρ_k = Σ (dx_j − μ)(dx_{j+k} − μ) / ΣK_k  ÷  Σ (dx_j − μ)² / ΣN
//	Var Σ_j dx_j·dx_{j+k} = K·a² + 2(K − 1)·b²   per track and axis (K = N − k pairs)
//
// the second an exact result for Gaussian displacements with tridiagonal covariance (a, b), taken
// with each track's own moments (so tracks of different D do not make it too small). A lag with
// |z| = |ρ_k|/SE > FreeDiffusionZ is named in a warning.
//
// The monodisperse reference simulates per-track CVE estimates at the pooled D̂ and σ̂² for the
// recorded lengths (exactly, with core.Spectral; at least 4000 tracks in the proportions of the
// recorded lengths, seeded from settings.seed) and scales them to the number of tracks used.
//
// The tracks are read once; Analyze keeps a few numbers per track (memory proportional to the number
// of tracks, not of positions).
//
// Errors: the settings' *FieldError or *core.RangeError, the source's errors, core.ErrNoTracks (no
// tracks), core.ErrDimsDiffer, core.ErrNonFinite, a *core.RangeError on "points" for a track with
// fewer than MinFrames positions, an error when D̂ ≤ 0, and those of Plan.
//
// References:
//   - Vestergaard C.L., Blainey P.C., Flyvbjerg H. (2014) Optimal estimation of diffusion coefficients
//     from single-particle trajectories. Phys. Rev. E 89, 022726.
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
//   - Isserlis L. (1918) Biometrika 12, 134 (fourth moments of Gaussian variables, for the variance of
//     the lag products; from memory).
func Analyze(ctx context.Context, src TrackSource, settings Scenario, opt PlanOptions) (*Analysis, error) {
	s := analysisScenario(settings)
	probe := s
	probe.DiffusionUM2PerS, probe.Frames, probe.Tracks = 1, MinFrames, 1
	if err := probe.Validate(); err != nil {
		return nil, err
	}
	medium, _ := probe.MediumModel() // Validate built it
	T0 := s.TemperatureC + 273.15
	eta0, err := medium.Viscosity(T0)
	if err != nil {
		return nil, err
	}
	acc := accumulator{dt: s.FrameIntervalS, blur: s.ExposureS / (6 * s.FrameIntervalS), lengths: map[int]int{}}
	for {
		if acc.m%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		tr, err := src.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		if err := acc.add(tr); err != nil {
			return nil, err
		}
	}
	if acc.m == 0 {
		return nil, fmt.Errorf("analysis: %w to analyse (%d dropped as too short)", core.ErrNoTracks, src.Dropped())
	}

	a := &Analysis{Format: AnalysisFormat, Dims: acc.dims, TracksUsed: acc.m, TracksDropped: src.Dropped(),
		Displacements: acc.sumN, Warnings: []string{}}
	a.Positions.Min, a.Positions.Max = acc.minLen, acc.maxLen
	a.Positions.Mean = float64(acc.sumN+acc.m) / float64(acc.m)
	D := acc.sumND / float64(acc.sumN)
	s2 := acc.sumNS2 / float64(acc.sumN)
	a.DiffusionRawUM2PerS = D * 1e12
	if !(D > 0) {
		return nil, fmt.Errorf("analysis: the pooled diffusion coefficient D̂ = %.3g µm²/s is not positive: the displacements are dominated by localisation noise (σ̂ ≈ %.3g nm), so no radius can be computed",
			D*1e12, math.Sqrt(math.Max(s2, 0))*1e9)
	}
	s2c := math.Max(s2, 0)

	// Drift.
	dr, mu := acc.drift(D, s2c)
	a.Drift = dr
	a.DriftUMPerS = math.Sqrt(dr.speed2) * 1e6
	corr := 0.0 // subtracted from every D̂
	if dr.Matters {
		if dr.RelBias >= 1 {
			return nil, fmt.Errorf("analysis: the drift (%.3g µm/s) accounts for all the spread of the displacements: the tracks show directed motion, not diffusion", a.DriftUMPerS)
		}
		var ds2 float64
		corr, ds2 = dr.bias(D, acc.dt, acc.blur)
		s2 -= ds2
		s2c = math.Max(s2, 0)
		a.Drift.Corrected = true
		a.Warnings = append(a.Warnings, fmt.Sprintf("drift: the tracks share a mean velocity of %.3g ± %.2g µm/s (p = %.2g), which biases D̂ by +%.2g %% (more than a tenth of its %.2g %% track-statistics uncertainty); D̂ and the per-track values are corrected for it, assuming the drift is common to all tracks",
			a.DriftUMPerS, dr.StdErrUMPerS[0], dr.PValue, 100*dr.RelBias, 100*dr.TrackRelU))
	}
	Dc := D - corr
	a.DiffusionUM2PerS, a.LocalisationNM, a.LocalisationVarNM2 = Dc*1e12, math.Sqrt(s2c)*1e9, s2*1e18
	a.LocalisationVarSENM2 = math.Sqrt(core.PooledVariance(acc.ns, func(N int) float64 {
		return varS2(Dc, acc.dt, acc.blur, s2c, N, acc.dims)
	})) * 1e18
	if s2 < 0 {
		a.Warnings = append(a.Warnings, fmt.Sprintf("localisation: the estimated σ² is negative (%.3g nm²): the noise is below what these tracks resolve, or the exposure (motion blur) is overstated; σ = 0 is used for the interval", s2*1e18))
	}

	// Free diffusion: covariances at lags 2 and 3.
	a.FreeDiffusion = acc.lagChecks(mu)
	for _, c := range a.FreeDiffusion {
		if math.Abs(c.Z) > FreeDiffusionZ {
			hint := "displacements that tend to reverse: confinement, sticking, or tracks that jump between particles"
			if c.Z > 0 {
				hint = "displacements that persist: directed motion or a drift that varies"
			}
			a.Warnings = append(a.Warnings, fmt.Sprintf("free diffusion: displacements %d frames apart are correlated (ρ = %.3g ± %.2g, z = %.1f); free diffusion with white localisation noise has none beyond one frame — %s", c.Lag, c.Correlation, c.StdErr, c.Z, hint))
		}
	}
	if d := a.TracksDropped; d > 0 && 10*d >= a.TracksUsed+d {
		a.Warnings = append(a.Warnings, fmt.Sprintf("tracks: %d of %d tracks (%.0f %%) were left out as too short; the fastest particles leave the focus soonest, so leaving them out can bias the radius upwards", d, a.TracksUsed+d, 100*float64(d)/float64(a.TracksUsed+d)))
	}

	// Radius and its interval.
	s.DiffusionUM2PerS = Dc * 1e12
	s.LocalisationNM = a.LocalisationNM
	s.Dims = acc.dims
	s.TrackLengths = engineLengths(acc.lengths)
	s = s.Defaults()
	if len(s.TrackLengths) == 1 {
		s.Frames, s.Tracks, s.TrackLengths = s.TrackLengths[0].Frames, s.TrackLengths[0].Count, nil
	}
	opt.NoPlanner = true
	pr, err := Plan(ctx, s, opt)
	if err != nil {
		return nil, err
	}
	a.Plan = pr
	a.RadiusNM, a.IntervalNM, a.ShortestIntervalNM = pr.RadiusNM, pr.IntervalNM, pr.ShortestIntervalNM
	a.Coverage, a.RelExpanded = pr.Coverage, pr.RelExpanded
	a.Warnings = append(a.Warnings, pr.Warnings...)

	a.Radii = acc.radii(T0, eta0, Dc, corr, s2c, s.Seed)
	return a, nil
}

// analysisScenario copies the fields of settings that Analyze uses.
func analysisScenario(in Scenario) Scenario {
	return Scenario{
		Format: in.Format, Name: in.Name, Note: in.Note,
		Medium: in.Medium, GlycerolMassFraction: in.GlycerolMassFraction, PressureMPa: in.PressureMPa,
		ViscosityMPaS: in.ViscosityMPaS, ViscosityRefC: in.ViscosityRefC, ViscosityTempCoeff: in.ViscosityTempCoeff,
		ViscosityRelU: in.ViscosityRelU, TemperatureC: in.TemperatureC, TemperatureUK: in.TemperatureUK,
		TemperatureDist: in.TemperatureDist, FrameIntervalS: in.FrameIntervalS, ExposureS: in.ExposureS,
		PixelRelU: in.PixelRelU, Estimator: "cve", Coverage: in.Coverage, Trials: in.Trials, Seed: in.Seed,
		ParticleDensity: in.ParticleDensity,
	}.Defaults()
}

// varS2 is the exact variance, in m⁴, of the covariance-based σ̂² of one track of N ≥ 2 displacements
// per axis averaged over dims axes, for free diffusion (D, s2) with frame interval dt and blur R.
// σ̂² = R⟨dx²⟩ + (2R − 1)⟨dx dx₊₁⟩ is the quadratic form dxᵀ·Q·dx with Q = tridiag(q1, q0, q1),
// q0 = R/N and q1 = (2R − 1)/(2(N − 1)), and the displacements have covariance tridiag(b, a, b),
// a = 2DΔt(1 − 2R) + 2s2, b = −(s2 − 2RDΔt); both share the DST-I eigenvectors, so (as for
// core.VarCVEExact, whose closed form is the same with the CVE's q0 and q1)
//
//	Var = 2·[N·q0²a² + 2(N−1)(q0²b² + 4q0q1·ab + q1²a²) + 2(3N−5)·q1²b²] / dims
func varS2(D, dt, R, s2 float64, N, dims int) float64 {
	return varTridiagForm(R/float64(N), (2*R-1)/(2*float64(N-1)), 2*D*dt*(1-2*R)+2*s2, -(s2-2*R*D*dt), N) / float64(dims)
}

// varTridiagForm is 2·tr(QΣQΣ) for N×N symmetric tridiagonal Toeplitz Q = tridiag(q1, q0, q1) and
// Σ = tridiag(b, a, b), N ≥ 2, in closed form (see varS2).
func varTridiagForm(q0, q1, a, b float64, N int) float64 {
	n := float64(N)
	return 2 * (n*q0*q0*a*a + 2*(n-1)*(q0*q0*b*b+4*q0*q1*a*b+q1*q1*a*a) + 2*(3*n-5)*q1*q1*b*b)
}

// engineLengths turns the histogram of track lengths (positions → tracks) into the scenario's length
// groups: exact up to exactLengths positions, above that one group per bin [L, ⌈1.25·L⌉) at the
// bin's mean length (rounded), with the bin's count.
func engineLengths(hist map[int]int) []LengthGroup {
	lengths := make([]int, 0, len(hist))
	for n := range hist {
		lengths = append(lengths, n)
	}
	slices.Sort(lengths)
	var groups []LengthGroup
	lo, hi, count, sum := 0, 0, 0, 0
	flush := func() {
		if count > 0 {
			groups = append(groups, LengthGroup{Frames: int(math.Round(float64(sum) / float64(count))), Count: count})
		}
		count, sum = 0, 0
	}
	for _, n := range lengths {
		if n <= exactLengths {
			groups = append(groups, LengthGroup{Frames: n, Count: hist[n]})
			continue
		}
		if n >= hi {
			flush()
			lo = n
			hi = int(math.Ceil(lengthBinRatio * float64(lo)))
		}
		count += hist[n]
		sum += n * hist[n]
	}
	flush()
	return groups
}

// accumulator gathers, in one pass, what the analysis needs of each track.
type accumulator struct {
	dt, blur float64
	dims     int
	m        int // tracks
	sumN     int // displacements per axis
	sumND    float64
	sumNS2   float64
	ends     [3]float64 // Σ e_i per axis
	minLen   int
	maxLen   int
	lengths  map[int]int // positions → tracks
	ns       []int       // N_i
	ds       []float64   // D̂_i
	moments  []axisMoments
	lag      [2][3]lagSums // lags 2 and 3, per axis
}

// axisMoments are one track's sums along one axis, for the centred moments of the lag check.
type axisMoments struct {
	n      int     // displacements
	s0, s1 float64 // Σ dx², Σ dx_j·dx_{j+1}
	e      float64 // Σ dx
	ends   float64 // dx_first + dx_last
}

// lagSums pool, along one axis, the lag-k products and the sums needed to centre them.
type lagSums struct {
	pairs int
	s     float64 // Σ dx_j·dx_{j+k}
	fg    float64 // Σ dx_j + Σ dx_{j+k} over the pairs
}

var lags = [2]int{2, 3}

// add takes one track.
func (acc *accumulator) add(tr core.Track) error {
	i := acc.m
	d, n := tr.Dims(), tr.Len()
	switch {
	case d < 1 || d > 3:
		return fmt.Errorf("analysis: track %d has %d axes (1 to 3 allowed)", i, d)
	case acc.m > 0 && d != acc.dims:
		return fmt.Errorf("analysis: track %d: %w (%d, the first had %d)", i, core.ErrDimsDiffer, d, acc.dims)
	case n < MinFrames:
		return fmt.Errorf("analysis: track %d: %w", i, &core.RangeError{Field: "points", Value: float64(n), Min: MinFrames, Max: math.Inf(1),
			Why: "the covariance-based estimator needs two displacements"})
	}
	for _, p := range tr.Pos {
		if len(p) != n {
			return fmt.Errorf("analysis: track %d: %w", i, core.ErrRagged)
		}
	}
	D, s2, N := core.CVETrack(tr, acc.dt, acc.blur)
	var mom [3]axisMoments
	var lag [2][3]lagSums
	ok := isFinite(D) && isFinite(s2)
	for ax, p := range tr.Pos {
		m := axisMoments{n: N, e: p[n-1] - p[0], ends: p[1] - p[0] + p[n-1] - p[n-2]}
		for j := range N {
			dx := p[j+1] - p[j]
			m.s0 += dx * dx
			if j+1 < N {
				m.s1 += dx * (p[j+2] - p[j+1])
			}
			for li, k := range lags {
				if j+k < N {
					dy := p[j+k+1] - p[j+k]
					lag[li][ax].pairs++
					lag[li][ax].s += dx * dy
					lag[li][ax].fg += dx + dy
				}
			}
		}
		ok = ok && isFinite(m.s0) && isFinite(m.s1) && isFinite(m.e)
		mom[ax] = m
	}
	if !ok {
		return fmt.Errorf("analysis: track %d: %w", i, core.ErrNonFinite)
	}
	if acc.m == 0 {
		acc.dims, acc.minLen = d, n
	}
	acc.m++
	acc.sumN += N
	acc.sumND += float64(N) * D
	acc.sumNS2 += float64(N) * s2
	acc.minLen, acc.maxLen = min(acc.minLen, n), max(acc.maxLen, n)
	acc.lengths[n]++
	acc.ns = append(acc.ns, N)
	acc.ds = append(acc.ds, D)
	for ax := range d {
		acc.ends[ax] += mom[ax].e
		acc.moments = append(acc.moments, mom[ax])
		for li := range lags {
			acc.lag[li][ax].pairs += lag[li][ax].pairs
			acc.lag[li][ax].s += lag[li][ax].s
			acc.lag[li][ax].fg += lag[li][ax].fg
		}
	}
	return nil
}

// drift estimates the common drift from the pooled end-to-end displacements, at the pooled D and s2
// (≥ 0), and returns it with the mean displacement per frame per axis (m).
func (acc *accumulator) drift(D, s2 float64) (DriftEstimate, []float64) {
	var dr DriftEstimate
	dr.TrackRelU = math.Sqrt(core.PooledVariance(acc.ns, func(N int) float64 {
		return core.VarCVEExact(D, acc.dt, acc.blur, s2, N, acc.dims)
	})) / D
	T := acc.dt * float64(acc.sumN) // total duration of the displacements, s
	se2 := (2*D*T + 2*float64(acc.m)*(s2-2*acc.blur*D*acc.dt)) / (T * T)
	v2 := 0.0
	mu := make([]float64, acc.dims)
	for ax := range acc.dims {
		v := acc.ends[ax] / T
		mu[ax] = v * acc.dt
		dr.VelocityUMPerS = append(dr.VelocityUMPerS, v*1e6)
		dr.StdErrUMPerS = append(dr.StdErrUMPerS, math.Sqrt(se2)*1e6)
		dr.ChiSquare += v * v / se2
		dr.speed2 += v * v
		v2 += v*v - se2
	}
	dr.PValue = 1 - chiSquaredCDF(float64(acc.dims), dr.ChiSquare)
	dr.RelBias = 1.5 * acc.dt * math.Max(v2, 0) / float64(acc.dims) / D
	dr.Matters = dr.PValue < DriftAlpha && dr.RelBias > DriftShare*dr.TrackRelU
	return dr, mu
}

// bias returns the biases of the pooled D̂ (m²/s) and σ̂² (m²) by the drift, for a pooled D̂ = D,
// frame interval dt and blur coefficient R. A mean displacement μ per frame adds μ² to every product
// of displacements, so per axis D̂ = ⟨dx²⟩/(2Δt) + ⟨dx dx₊₁⟩/Δt gains 1.5·μ²/Δt and
// σ̂² = R⟨dx²⟩ + (2R − 1)⟨dx dx₊₁⟩ gains (3R − 1)·μ²; averaged over d axes, with |μ|² = |v|²Δt² from
// the unbiased |v|² behind RelBias.
func (dr DriftEstimate) bias(D, dt, blur float64) (dD, ds2 float64) {
	dD = dr.RelBias * D // 1.5·|v|²Δt/d
	return dD, (3*blur - 1) * dD * dt / 1.5
}

// lagChecks computes the free-diffusion checks at lags 2 and 3 with the displacements centred on mu
// (m per frame, per axis); lags without pairs are left out.
func (acc *accumulator) lagChecks(mu []float64) []LagCheck {
	// Pooled centred variance of the displacements, and per-track centred moments.
	var c0 float64
	for i, m := range acc.moments {
		u := mu[i%acc.dims]
		c0 += m.s0 - 2*u*m.e + float64(m.n)*u*u
	}
	c0 /= float64(acc.sumN * acc.dims)
	var out []LagCheck
	for li, k := range lags {
		var s, v float64
		pairs := 0
		for ax := range acc.dims {
			u := mu[ax]
			l := acc.lag[li][ax]
			s += l.s - u*l.fg + float64(l.pairs)*u*u
			pairs += l.pairs
		}
		if pairs == 0 {
			continue
		}
		for i, m := range acc.moments {
			K := m.n - k
			if K < 1 {
				continue
			}
			u := mu[i%acc.dims]
			a := (m.s0 - 2*u*m.e + float64(m.n)*u*u) / float64(m.n)
			b := (m.s1 - u*(2*m.e-m.ends) + float64(m.n-1)*u*u) / float64(m.n-1)
			v += float64(K)*a*a + 2*float64(K-1)*b*b
		}
		c := LagCheck{Lag: k, Pairs: pairs, Correlation: s / float64(pairs) / c0}
		c.StdErr = math.Sqrt(v) / float64(pairs) / c0
		if v > 0 {
			c.Z = s / math.Sqrt(v)
		}
		out = append(out, c)
	}
	return out
}

// radii builds the per-track radius histogram and its monodisperse reference. corr is subtracted
// from each D̂_i (the drift correction); Dc and s2 are the pooled values the reference is simulated at.
func (acc *accumulator) radii(T0, eta0, Dc, corr, s2 float64, seed uint64) RadiusDistribution {
	var rd RadiusDistribution
	radius := func(D float64) float64 { return core.Radius(T0, eta0, D) * 1e9 }
	data := make([]float64, 0, acc.m)
	for _, D := range acc.ds {
		if D-corr > 0 {
			data = append(data, radius(D-corr))
		} else {
			rd.NonPositive++
		}
	}

	// The reference: s_g simulated tracks for the c_g recorded tracks of each length, each weighing
	// c_g/s_g, within the budget of gamma draws.
	lengths := make([]int, 0, len(acc.lengths))
	for n := range acc.lengths {
		lengths = append(lengths, n)
	}
	slices.Sort(lengths)
	alloc := func(total float64) ([]int, int) {
		s, draws := make([]int, len(lengths)), 0
		for i, n := range lengths {
			s[i] = max(1, int(math.Ceil(float64(acc.lengths[n])*total/float64(acc.m))))
			draws += s[i] * (n - 1)
		}
		return s, draws
	}
	target := float64(max(acc.m, monoMinTracks))
	sims, draws := alloc(target)
	if draws > monoMaxDraws {
		sims, _ = alloc(target * monoMaxDraws / float64(draws))
	}
	r := rand.New(rand.NewPCG(seed, monoStream))
	type simulated struct {
		radius, weight float64
	}
	var sim []simulated
	sorted := make([]float64, 0)
	for i, n := range lengths {
		N := n - 1
		sp := core.NewSpectral(core.CVEForm(acc.dt, N), acc.dt, acc.blur, s2, N, 1, acc.dims)
		w := float64(acc.lengths[n]) / float64(sims[i])
		for range sims[i] {
			rd.SimulatedTracks++
			D := sp.Sample(r, Dc, nil)
			if D > 0 {
				sim = append(sim, simulated{radius(D), w})
				sorted = append(sorted, radius(D))
			} else {
				rd.MonoNonPositive += w
			}
		}
	}

	// Edges: from the 1 % to the 99 % quantile of data and reference together; bins by the Rice rule.
	slices.Sort(data)
	slices.Sort(sorted)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range [][]float64{data, sorted} {
		if len(v) > 0 {
			lo = math.Min(lo, quantileSorted(v, 0.01))
			hi = math.Max(hi, quantileSorted(v, 0.99))
		}
	}
	if !(hi > lo) {
		c := lo
		if math.IsInf(c, 0) {
			c = radius(Dc)
		}
		lo, hi = 0.9*c, 1.1*c
	}
	bins := max(10, min(40, int(math.Ceil(2*math.Cbrt(float64(acc.m))))))
	rd.EdgesNM = make([]float64, bins+1)
	for i := range rd.EdgesNM {
		rd.EdgesNM[i] = lo + (hi-lo)*float64(i)/float64(bins)
	}
	rd.Counts = make([]int, bins)
	rd.Monodisperse = make([]float64, bins)
	bin := func(x float64) int {
		switch {
		case x < lo:
			return -1
		case x > hi:
			return bins
		}
		return min(bins-1, int(float64(bins)*(x-lo)/(hi-lo)))
	}
	for _, x := range data {
		switch k := bin(x); {
		case k < 0:
			rd.Below++
		case k == bins:
			rd.Above++
		default:
			rd.Counts[k]++
		}
	}
	for _, x := range sim {
		switch k := bin(x.radius); {
		case k < 0:
			rd.MonoBelow += x.weight
		case k == bins:
			rd.MonoAbove += x.weight
		default:
			rd.Monodisperse[k] += x.weight
		}
	}
	return rd
}

// quantileSorted is the p-quantile of ascending values by linear interpolation between order
// statistics (the sample quantile of type 7 of Hyndman & Fan 1996).
func quantileSorted(v []float64, p float64) float64 {
	h := p * float64(len(v)-1)
	i := int(h)
	if i+1 >= len(v) {
		return v[len(v)-1]
	}
	return v[i] + (h-float64(i))*(v[i+1]-v[i])
}
