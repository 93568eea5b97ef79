package uncertainty

import (
	"math"

	"sizebudget/core"
)

// setup holds a validated scenario in SI units, with the medium model and the nominal physics derived
// once: what both the GUM budget and the Monte Carlo model work from.
type setup struct {
	s         Scenario
	medium    core.Medium
	T0        float64 // nominal temperature, K
	eta0      float64 // viscosity at T0, Pa·s
	dlnEta    float64 // d ln η/dT at T0, 1/K
	r0        float64 // nominal radius, m
	D0        float64 // nominal diffusion coefficient, m²/s
	dt, tE    float64 // frame interval and exposure, s
	blur      float64 // R = t_E/(6Δt)
	s2        float64 // localisation variance per axis, m²
	dims      int
	frames    int           // positions per track (the longest, with track lengths)
	tracks    int           // number of tracks
	groups    []LengthGroup // tracks grouped by length: the scenario's track_lengths, or frames × tracks
	uT        float64       // standard uncertainty of the temperature, K
	uEta      float64       // relative standard uncertainty of the viscosity
	uPix      float64       // relative standard uncertainty of the pixel size
	drift     float64       // largest residual drift speed, m/s
	driftBias bool          // drift present and not removed
	p         float64       // coverage probability
}

// newSetup derives the setup of a scenario; s must have passed Validate.
func newSetup(s Scenario) (*setup, error) {
	m, err := s.MediumModel()
	if err != nil {
		return nil, err
	}
	u := &setup{s: s, medium: m, T0: s.TemperatureC + 273.15}
	if u.eta0, err = m.Viscosity(u.T0); err != nil {
		return nil, err
	}
	if u.dlnEta, err = m.DLnEtaDT(u.T0); err != nil {
		return nil, err
	}
	if s.RadiusNM != 0 {
		u.r0 = s.RadiusNM * 1e-9
		u.D0 = core.Diffusion(u.T0, u.eta0, u.r0)
	} else {
		u.D0 = s.DiffusionUM2PerS * 1e-12
		u.r0 = core.Radius(u.T0, u.eta0, u.D0)
	}
	u.dt, u.tE = s.FrameIntervalS, s.ExposureS
	u.blur = u.tE / (6 * u.dt)
	sig := s.LocalisationNM * 1e-9
	u.s2 = sig * sig
	u.dims, u.frames, u.tracks = s.Dims, s.Frames, s.Tracks
	u.groups = s.lengthGroups()
	u.uT = s.TemperatureUK
	if s.TemperatureDist == "rect" {
		u.uT = s.TemperatureUK / math.Sqrt(3)
	}
	u.uEta = s.viscosityRelU(m, u.T0)
	u.uPix = s.PixelRelU
	u.drift = s.DriftUMPerS * 1e-6
	u.driftBias = u.drift > 0 && !s.DriftRemoved
	u.p = s.Coverage
	return u, nil
}

// epsilon is the reduced localisation error ε = s2/(DΔt) − 2R of the nominal setting.
func (u *setup) epsilon() float64 { return u.s2/(u.D0*u.dt) - 2*u.blur }

// msdLags is the number of MSD lags the fit uses: the optimum from the exact covariance.
func (u *setup) msdLags(frames int) int {
	return core.OptimalLags(u.D0, u.dt, u.blur, u.s2, frames, u.dims)
}

// uniform is the grouping of tracks tracks of frames positions each.
func uniform(frames, tracks int) []LengthGroup { return []LengthGroup{{Frames: frames, Count: tracks}} }

// trackRelVar is the relative variance Var(D̂)/D² of the pooled estimate of D from tracks grouped by
// length, for the scenario's estimator, from the exact finite-N variances (core). Track estimates are
// pooled with weights N_i/ΣN (N_i displacements), so Var = Σ_g M_g·(N_g/ΣN)²·Var₁(N_g).
func (u *setup) trackRelVar(groups []LengthGroup) float64 {
	total := 0.0
	for _, g := range groups {
		total += float64(g.Count * (g.Frames - 1))
	}
	v := 0.0
	for _, g := range groups {
		w := float64(g.Frames-1) / total
		v += float64(g.Count) * w * w * u.trackVar1(g.Frames)
	}
	return v / (u.D0 * u.D0)
}

// trackVar1 is Var(D̂) in (m²/s)² of one track of frames positions.
func (u *setup) trackVar1(frames int) float64 {
	N := frames - 1
	switch u.s.Estimator {
	case "known-noise":
		return core.VarKnownNoiseExact(u.D0, u.dt, u.blur, u.s2, N, u.dims)
	case "msd":
		return core.VarMSDFit(u.D0, u.dt, u.blur, u.s2, frames, u.msdLags(frames), u.dims)
	default:
		return core.VarCVEExact(u.D0, u.dt, u.blur, u.s2, N, u.dims)
	}
}

// boundRelVar is the Cramér–Rao bound on the relative variance of any unbiased estimate of D from the
// same data (σ unknown, or known for the known-noise estimator). Over groups of tracks the Fisher
// information of D is added, 1/Var = Σ_g M_g/CRB(N_g) (exact for equal lengths; with mixed lengths it
// treats σ² as a nuisance per group, slightly looser than one shared σ²).
func (u *setup) boundRelVar(groups []LengthGroup) float64 {
	info := 0.0
	for _, g := range groups {
		N := g.Frames - 1
		var v float64
		if u.s.Estimator == "known-noise" {
			v = core.CRBKnownNoise(u.D0, u.dt, u.blur, u.s2, N, u.dims)
		} else {
			v = core.CRBExact(u.D0, u.dt, u.blur, u.s2, N, u.dims)
		}
		info += float64(g.Count) / v
	}
	return 1 / info / (u.D0 * u.D0)
}

// driftRelBias is the largest relative bias of D̂ that a residual drift of speed u.drift causes when
// it is not removed: the mean displacement vΔt adds (vΔt)²·1ᵀQ1 to each axis's quadratic form,
// which is 1.5·v²Δt for the CVE, v²Δt/(2(1−2R)) for the known-noise estimator and v²Δt·(L+1)/2 for an
// OLS fit of L MSD lags (the drift adds v²n²Δt² to MSD_n, whose fitted slope on n is (L+1)·v²Δt²);
// spread over d axes.
func (u *setup) driftRelBias(frames int) float64 {
	if !u.driftBias {
		return 0
	}
	v2dt := u.drift * u.drift * u.dt
	var b float64
	switch u.s.Estimator {
	case "known-noise":
		b = v2dt / (2 * (1 - 2*u.blur))
	case "msd":
		b = v2dt * float64(u.msdLags(frames)+1) / 2
	default:
		b = 1.5 * v2dt
	}
	return b / float64(u.dims) / u.D0
}
