package uncertainty

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// Format is the format identifier of the scenario document this version writes.
const Format = "sizebudget/scenario/1"

// formatVersion is the version number in Format.
const formatVersion = 1

// formatPrefix is what every version of the scenario document starts its "format" with.
const formatPrefix = "sizebudget/scenario/"

// Scenario is the one document that describes a session everywhere: the command line's -scenario file,
// the browser's saved session and the export file. Physical quantities carry their unit in the JSON
// key. Zero-valued optional fields mean "not given"; Validate states every allowed range.
type Scenario struct {
	Format string `json:"format"`
	Name   string `json:"name,omitempty"`
	Note   string `json:"note,omitempty"`

	// Particle: exactly one of the two.
	RadiusNM         float64 `json:"radius_nm,omitempty"`           // nominal hydrodynamic radius
	DiffusionUM2PerS float64 `json:"diffusion_um2_per_s,omitempty"` // or the nominal diffusion coefficient

	// Medium.
	Medium               string   `json:"medium"`                               // "water", "glycerol" or "custom"
	GlycerolMassFraction float64  `json:"glycerol_mass_fraction,omitempty"`     // glycerol only, 0–1
	PressureMPa          float64  `json:"pressure_MPa,omitempty"`               // water only; 0 = 0.101325 MPa
	ViscosityMPaS        float64  `json:"viscosity_mPa_s,omitempty"`            // custom only, at ViscosityRefC
	ViscosityRefC        *float64 `json:"viscosity_reference_C,omitempty"`      // custom only; nil = 25 °C
	ViscosityTempCoeff   float64  `json:"viscosity_temp_coeff_per_K,omitempty"` // custom only, d ln η/dT
	ViscosityRelU        *float64 `json:"viscosity_relative_u,omitempty"`       // nil = the medium model's own; 0 = leave out
	TemperatureC         float64  `json:"temperature_C"`                        // nominal temperature
	TemperatureUK        float64  `json:"temperature_u_K"`                      // half-width (rect) or standard uncertainty (normal)
	TemperatureDist      string   `json:"temperature_distribution,omitempty"`   // "rect" (default) or "normal"
	Dims                 int      `json:"dims"`                                 // axes tracked, 1–3
	FrameIntervalS       float64  `json:"frame_interval_s"`                     // Δt
	ExposureS            float64  `json:"exposure_s"`                           // t_E, 0 ≤ t_E ≤ Δt (0 = stroboscopic)
	Frames               int      `json:"frames"`                               // positions per track
	Tracks               int      `json:"tracks"`                               // number of tracks
	// TrackLengths, when given, describes tracks of different lengths (recorded data); Frames and Tracks
	// are then the longest and the total (Defaults fills them).
	TrackLengths    []LengthGroup `json:"track_lengths,omitempty"`
	LocalisationNM  float64       `json:"localisation_nm"`                      // localisation precision σ per axis
	PixelRelU       float64       `json:"pixel_relative_u,omitempty"`           // relative standard uncertainty of the pixel size
	DriftUMPerS     float64       `json:"drift_um_per_s,omitempty"`             // largest residual drift speed
	DriftRemoved    bool          `json:"drift_removed,omitempty"`              // mean displacement subtracted per track
	FocusDepthUM    float64       `json:"focus_depth_um,omitempty"`             // depth of the focal slab; 0 = not limited
	Estimator       string        `json:"estimator"`                            // "cve", "known-noise" or "msd"
	Coverage        float64       `json:"coverage"`                             // coverage probability p
	TargetRelU      float64       `json:"target_relative_expanded_uncertainty"` // planner target U/r
	Trials          int           `json:"trials,omitempty"`                     // 0 = adaptive (JCGM 101 7.9)
	Seed            uint64        `json:"seed"`                                 // random seed, recorded with results
	ParticleDensity float64       `json:"particle_density_kg_per_m3,omitempty"` // for the inertia check; 0 = 1050

	// Review check (sizebudget check).
	ReportedRadiusNM float64 `json:"reported_radius_nm,omitempty"`
	ReportedUNM      float64 `json:"reported_u_nm,omitempty"`     // reported expanded uncertainty
	ReportedK        float64 `json:"reported_k,omitempty"`        // its coverage factor (0 = use ReportedCoverage)
	ReportedCoverage float64 `json:"reported_coverage,omitempty"` // or its coverage probability
}

// LengthGroup is a number of tracks with the same number of positions.
type LengthGroup struct {
	Frames int `json:"frames"` // positions per track
	Count  int `json:"count"`  // tracks of that length
}

// lengthGroups returns the tracks grouped by length.
func (s Scenario) lengthGroups() []LengthGroup {
	if len(s.TrackLengths) > 0 {
		return s.TrackLengths
	}
	return []LengthGroup{{Frames: s.Frames, Count: s.Tracks}}
}

// Demo returns the invented demonstration scenario: beads of 50 nm radius (100 nm diameter) in water at
// 25 °C, 30 frames/s.
// INVENTED: it describes no real sample, laboratory or instrument.
func Demo() Scenario {
	return Scenario{
		Format:          Format,
		Name:            "Demo (invented): 100 nm beads in water",
		Note:            "An invented scenario for trying the tool: it describes no real sample or instrument.",
		RadiusNM:        50,
		Medium:          "water",
		TemperatureC:    25,
		TemperatureUK:   0.5,
		TemperatureDist: "rect",
		Dims:            2,
		FrameIntervalS:  1.0 / 30,
		ExposureS:       0.01,
		Frames:          60,
		Tracks:          100,
		LocalisationNM:  40,
		PixelRelU:       0.005,
		Estimator:       "cve",
		Coverage:        0.95,
		TargetRelU:      0.05,
		Seed:            1,
	}
}

// ParseScenario reads a scenario document. It refuses unknown fields, documents of an unknown (newer)
// format version and anything Validate refuses; defaults are filled in first (see Defaults).
func ParseScenario(data []byte) (Scenario, error) {
	var probe struct {
		Format *string `json:"format"`
	}
	if err := json.Unmarshal(data, &probe); err != nil {
		return Scenario{}, fmt.Errorf("scenario: not a JSON object: %v", err)
	}
	if probe.Format == nil {
		return Scenario{}, errors.New(`scenario: field "format" is missing; expected "` + Format + `"`)
	}
	f := *probe.Format
	if !strings.HasPrefix(f, formatPrefix) {
		return Scenario{}, fmt.Errorf("scenario: format = %q is not a sizebudget scenario; expected %q", f, Format)
	}
	if f != Format {
		v, err := strconv.Atoi(strings.TrimPrefix(f, formatPrefix))
		if err == nil && v > formatVersion {
			return Scenario{}, fmt.Errorf("scenario: format = %q is newer than this version reads (%q); update sizebudget", f, Format)
		}
		return Scenario{}, fmt.Errorf("scenario: format = %q is not a version of the scenario document; expected %q", f, Format)
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var s Scenario
	if err := dec.Decode(&s); err != nil {
		return Scenario{}, fmt.Errorf("scenario: %v", err)
	}
	if dec.More() {
		return Scenario{}, errors.New("scenario: trailing data after the JSON object")
	}
	s = s.Defaults()
	if err := s.Validate(); err != nil {
		return Scenario{}, err
	}
	return s, nil
}

// Defaults returns s with the documented defaults filled into fields left empty: format, medium
// "water", rect temperature distribution, 2 axes, estimator "cve", coverage 0.95.
func (s Scenario) Defaults() Scenario {
	if s.Format == "" {
		s.Format = Format
	}
	if s.Medium == "" {
		s.Medium = "water"
	}
	if s.TemperatureDist == "" {
		s.TemperatureDist = "rect"
	}
	if s.Dims == 0 {
		s.Dims = 2
	}
	if s.Estimator == "" {
		s.Estimator = "cve"
	}
	if s.Coverage == 0 {
		s.Coverage = 0.95
	}
	if len(s.TrackLengths) > 0 && s.Frames == 0 && s.Tracks == 0 {
		for _, g := range s.TrackLengths {
			s.Frames = max(s.Frames, g.Frames)
			s.Tracks += g.Count
		}
	}
	return s
}

// Marshal writes the document as indented JSON.
func (s Scenario) Marshal() ([]byte, error) {
	return json.MarshalIndent(s, "", "  ")
}
