package uncertainty

import (
	"errors"
	"fmt"
	"math"

	"sizebudget/core"
)

// Limits of the scenario fields. They bound what the engine can compute sensibly; physics limits of a
// medium (the liquid range of water, say) are checked by its model as well.
const (
	MaxFrames     = 100000 // positions per track
	MaxTracks     = 100000
	MaxTrials     = 10000000
	MinFrames     = 3 // the covariance-based estimator needs a lag-1 pair
	maxRadiusNM   = 1e5
	maxDiffusion  = 1e5 // µm²/s
	maxIntervalS  = 100.0
	maxSigmaNM    = 1e5
	maxDriftUMPS  = 1e3
	maxFocusUM    = 1e4
	maxTempUK     = 20.0
	maxRelU       = 0.15
	maxViscMPaS   = 1e7
	maxTempCoeffK = 1.0
)

// Validate checks every field and returns the first problem as a *FieldError (or the medium model's
// *core.RangeError, which also names field, value and range). It checks the document as given: call
// Defaults first to fill the optional fields.
func (s Scenario) Validate() error {
	if s.Format != Format {
		return &FieldError{Field: "format", Value: s.Format, Allowed: fmt.Sprintf("%q", Format)}
	}
	switch {
	case s.RadiusNM != 0 && s.DiffusionUM2PerS != 0:
		return &FieldError{Field: "radius_nm", Value: s.RadiusNM, Allowed: "exactly one of radius_nm and diffusion_um2_per_s", Why: "diffusion_um2_per_s is given too"}
	case s.RadiusNM == 0 && s.DiffusionUM2PerS == 0:
		return &FieldError{Field: "radius_nm", Value: 0, Allowed: fmt.Sprintf("(0, %g] (or give diffusion_um2_per_s)", maxRadiusNM)}
	case s.RadiusNM != 0:
		if err := openClosed("radius_nm", s.RadiusNM, 0, maxRadiusNM); err != nil {
			return err
		}
	default:
		if err := openClosed("diffusion_um2_per_s", s.DiffusionUM2PerS, 0, maxDiffusion); err != nil {
			return err
		}
	}
	switch s.Medium {
	case "water":
		if s.GlycerolMassFraction != 0 {
			return &FieldError{Field: "glycerol_mass_fraction", Value: s.GlycerolMassFraction, Allowed: "0 unless medium is \"glycerol\""}
		}
		if s.PressureMPa != 0 {
			if err := openClosed("pressure_MPa", s.PressureMPa, 0, 100); err != nil {
				return err
			}
		}
	case "glycerol":
		if err := closed("glycerol_mass_fraction", s.GlycerolMassFraction, 0, 1); err != nil {
			return err
		}
	case "custom":
		if err := openClosed("viscosity_mPa_s", s.ViscosityMPaS, 0, maxViscMPaS); err != nil {
			return err
		}
		if s.ViscosityRefC != nil {
			if err := closed("viscosity_reference_C", *s.ViscosityRefC, -50, 300); err != nil {
				return err
			}
		}
		if err := closed("viscosity_temp_coeff_per_K", s.ViscosityTempCoeff, -maxTempCoeffK, maxTempCoeffK); err != nil {
			return err
		}
		if s.ViscosityRelU == nil {
			return &FieldError{Field: "viscosity_relative_u", Value: "missing", Allowed: fmt.Sprintf("[0, %g]", maxRelU), Why: "a custom medium needs its stated uncertainty"}
		}
	default:
		return &FieldError{Field: "medium", Value: s.Medium, Allowed: `"water", "glycerol" or "custom"`}
	}
	if s.Medium != "custom" && (s.ViscosityMPaS != 0 || s.ViscosityTempCoeff != 0 || s.ViscosityRefC != nil) {
		return &FieldError{Field: "viscosity_mPa_s", Value: s.ViscosityMPaS, Allowed: "only with medium \"custom\""}
	}
	if s.ViscosityRelU != nil {
		if err := closed("viscosity_relative_u", *s.ViscosityRelU, 0, maxRelU); err != nil {
			return err
		}
	}
	if err := closed("temperature_C", s.TemperatureC, -50, 300); err != nil {
		return err
	}
	if err := closed("temperature_u_K", s.TemperatureUK, 0, maxTempUK); err != nil {
		return err
	}
	if s.TemperatureDist != "rect" && s.TemperatureDist != "normal" {
		return &FieldError{Field: "temperature_distribution", Value: s.TemperatureDist, Allowed: `"rect" or "normal"`}
	}
	if s.Dims < 1 || s.Dims > 3 {
		return &FieldError{Field: "dims", Value: s.Dims, Allowed: "1, 2 or 3"}
	}
	if err := openClosed("frame_interval_s", s.FrameIntervalS, 0, maxIntervalS); err != nil {
		return err
	}
	if err := closed("exposure_s", s.ExposureS, 0, s.FrameIntervalS); err != nil {
		return withWhy(err, "the exposure cannot exceed the frame interval")
	}
	if s.Frames < MinFrames || s.Frames > MaxFrames {
		return &FieldError{Field: "frames", Value: s.Frames, Allowed: fmt.Sprintf("%d to %d positions per track", MinFrames, MaxFrames)}
	}
	if s.Tracks < 1 || s.Tracks > MaxTracks {
		return &FieldError{Field: "tracks", Value: s.Tracks, Allowed: fmt.Sprintf("1 to %d", MaxTracks)}
	}
	if len(s.TrackLengths) > 0 {
		longest, total := 0, 0
		for i, g := range s.TrackLengths {
			if g.Frames < MinFrames || g.Frames > MaxFrames {
				return &FieldError{Field: fmt.Sprintf("track_lengths[%d].frames", i), Value: g.Frames, Allowed: fmt.Sprintf("%d to %d", MinFrames, MaxFrames)}
			}
			if g.Count < 1 || g.Count > MaxTracks {
				return &FieldError{Field: fmt.Sprintf("track_lengths[%d].count", i), Value: g.Count, Allowed: fmt.Sprintf("1 to %d", MaxTracks)}
			}
			longest, total = max(longest, g.Frames), total+g.Count
		}
		if s.Frames != longest || s.Tracks != total {
			return &FieldError{Field: "frames", Value: s.Frames, Allowed: fmt.Sprintf("%d (the longest of track_lengths) with tracks = %d (their total)", longest, total)}
		}
	}
	if err := closed("localisation_nm", s.LocalisationNM, 0, maxSigmaNM); err != nil {
		return err
	}
	if err := closed("pixel_relative_u", s.PixelRelU, 0, maxRelU); err != nil {
		return err
	}
	if err := closed("drift_um_per_s", s.DriftUMPerS, 0, maxDriftUMPS); err != nil {
		return err
	}
	if err := closed("focus_depth_um", s.FocusDepthUM, 0, maxFocusUM); err != nil {
		return err
	}
	switch s.Estimator {
	case "cve", "known-noise", "msd":
	default:
		return &FieldError{Field: "estimator", Value: s.Estimator, Allowed: `"cve", "known-noise" or "msd"`}
	}
	if s.Estimator == "msd" && s.Frames < 4 {
		return &FieldError{Field: "frames", Value: s.Frames, Allowed: fmt.Sprintf("4 to %d positions per track for the MSD fit", MaxFrames)}
	}
	if err := openOpen("coverage", s.Coverage, 0.5, 1); err != nil {
		return err
	}
	if s.Coverage > 0.9999 {
		return &FieldError{Field: "coverage", Value: s.Coverage, Allowed: "(0.5, 0.9999]"}
	}
	if err := closed("target_relative_expanded_uncertainty", s.TargetRelU, 0, 1); err != nil {
		return err
	}
	if least := max(1000, MinTrials(s.Coverage)); s.Trials != 0 && (s.Trials < least || s.Trials > MaxTrials) {
		return &FieldError{Field: "trials", Value: s.Trials, Allowed: fmt.Sprintf("0 (adaptive) or %d to %d", least, MaxTrials),
			Why: fmt.Sprintf("JCGM 101 7.2.2 asks for at least 1/(1 − p) × 100 trials at coverage %g", s.Coverage)}
	}
	if err := closed("particle_density_kg_per_m3", s.ParticleDensity, 0, 30000); err != nil {
		return err
	}
	if err := s.validateReview(); err != nil {
		return err
	}
	// The medium model itself: its valid range at the nominal temperature, and a margin of the
	// temperature uncertainty either side (the Monte Carlo draws temperatures there).
	m, err := s.MediumModel()
	if err != nil {
		return err
	}
	T := s.TemperatureC + 273.15
	for _, t := range []float64{T, T - s.tempHalfRange(), T + s.tempHalfRange()} {
		if _, err := m.Viscosity(t); err != nil {
			var re *core.RangeError
			if errors.As(err, &re) && t != T {
				return &FieldError{Field: "temperature_u_K", Value: s.TemperatureUK, Allowed: "a range that stays inside the medium's valid temperatures",
					Why: re.Error()}
			}
			return err
		}
	}
	return nil
}

func (s Scenario) validateReview() error {
	if s.ReportedRadiusNM == 0 && s.ReportedUNM == 0 && s.ReportedK == 0 && s.ReportedCoverage == 0 {
		return nil
	}
	if err := openClosed("reported_radius_nm", s.ReportedRadiusNM, 0, maxRadiusNM); err != nil {
		return err
	}
	if err := openClosed("reported_u_nm", s.ReportedUNM, 0, maxRadiusNM); err != nil {
		return err
	}
	if s.ReportedK != 0 && s.ReportedCoverage != 0 {
		return &FieldError{Field: "reported_k", Value: s.ReportedK, Allowed: "one of reported_k and reported_coverage", Why: "both given"}
	}
	if s.ReportedK != 0 {
		return closed("reported_k", s.ReportedK, 0.5, 10)
	}
	if s.ReportedCoverage != 0 {
		return openOpen("reported_coverage", s.ReportedCoverage, 0.5, 1)
	}
	return nil
}

// tempHalfRange is how far from nominal the temperature draws reach: a for rect, 5u for normal (a
// normal draw beyond 5u has probability 6e-7 and is clamped to the medium's range in sampling).
func (s Scenario) tempHalfRange() float64 {
	if s.TemperatureDist == "normal" {
		return 5 * s.TemperatureUK
	}
	return s.TemperatureUK
}

func closed(field string, x, lo, hi float64) error {
	if !(x >= lo && x <= hi) {
		return &FieldError{Field: field, Value: x, Allowed: fmt.Sprintf("[%g, %g]", lo, hi)}
	}
	return nil
}

func openClosed(field string, x, lo, hi float64) error {
	if !(x > lo && x <= hi) {
		return &FieldError{Field: field, Value: x, Allowed: fmt.Sprintf("(%g, %g]", lo, hi)}
	}
	return nil
}

func openOpen(field string, x, lo, hi float64) error {
	if !(x > lo && x < hi) {
		return &FieldError{Field: field, Value: x, Allowed: fmt.Sprintf("(%g, %g)", lo, hi)}
	}
	return nil
}

func withWhy(err error, why string) error {
	var fe *FieldError
	if errors.As(err, &fe) {
		fe.Why = why
	}
	return err
}

// isFinite reports whether x is neither NaN nor infinite.
func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
