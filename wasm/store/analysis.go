package store

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"regexp"
	"strings"
	"time"
	"unicode/utf8"

	"sizebudget/core"
	"sizebudget/trackfile"
	"sizebudget/uncertainty"
)

// Analysis is what a session keeps of the analysis of a recorded track file: a summary of the file,
// the settings it was analysed with and the result. The rows of the file are not kept (a file of a
// million rows would not fit a session, and the result does not need them): to recompute, open the
// file again; its SHA-256 tells whether it is the same file.
type Analysis struct {
	File     TrackFile        `json:"file"`
	Settings AnalysisSettings `json:"settings"`
	// Result is the JSON of the uncertainty.Analysis, format uncertainty.AnalysisFormat, kept as
	// written so that it comes back to the last digit.
	Result   json.RawMessage `json:"result"`
	Analysed time.Time       `json:"analysed"` // when it was computed
}

// TrackFile is the summary of a track file as it was read: where it came from and what the reader
// found in it (see trackfile.Stats).
type TrackFile struct {
	Name     string     `json:"name"`               // the file's name, without its folder
	Size     int64      `json:"size_bytes"`         // bytes
	Modified *time.Time `json:"modified,omitempty"` // the file's modification time, when known
	// SHA256 is the SHA-256 digest of the file's bytes, 64 lower-case hexadecimal digits, or "" when the
	// browser offered no way to compute it.
	SHA256           string   `json:"sha256"`
	Lines            int      `json:"lines"`
	Rows             int      `json:"rows"`
	Names            int      `json:"names"`  // distinct track names
	Tracks           int      `json:"tracks"` // tracks kept (after splitting at gaps and dropping short ones)
	Positions        int      `json:"positions"`
	Dropped          int      `json:"dropped"`
	DroppedPositions int      `json:"dropped_positions"`
	Gaps             int      `json:"gaps"`
	Dims             int      `json:"dims"`
	Unit             string   `json:"unit"`
	Delimiter        string   `json:"delimiter"`
	Ignored          []string `json:"ignored_columns"`
	Notes            []string `json:"notes"` // comment lines before the header, each cut to MaxNoteRunes
}

// Limits of a TrackFile summary.
const (
	MaxFileNameLen = 1000 // characters of TrackFile.Name
	MaxNoteRunes   = 300  // characters kept of each comment line in TrackFile.Notes
)

// NewTrackFile returns the summary of a file called name, of size bytes, modified at modified (zero:
// unknown), with SHA-256 digest sha (hex, or ""), that a reader has read to the end with the stats st.
// The name loses any folder, and the comment lines are cut to MaxNoteRunes characters.
func NewTrackFile(name string, size int64, modified time.Time, sha string, st trackfile.Stats) TrackFile {
	if i := strings.LastIndexAny(name, `/\`); i >= 0 {
		name = name[i+1:]
	}
	f := TrackFile{Name: name, Size: size, SHA256: strings.ToLower(sha), Lines: st.Lines, Rows: st.Rows, Names: st.Names,
		Tracks: st.Tracks, Positions: st.Positions, Dropped: st.Dropped, DroppedPositions: st.DroppedPositions, Gaps: st.Gaps,
		Dims: st.Dims, Unit: st.Unit, Delimiter: st.Delimiter, Ignored: append([]string{}, st.Ignored...), Notes: []string{}}
	if !modified.IsZero() {
		m := modified.UTC()
		f.Modified = &m
	}
	for _, n := range st.Notes {
		if utf8.RuneCountInString(n) > MaxNoteRunes {
			n = string([]rune(n)[:MaxNoteRunes-1]) + "…"
		}
		f.Notes = append(f.Notes, n)
	}
	return f
}

var hexDigest = regexp.MustCompile(`^[0-9a-f]{64}$`)

// Validate checks the summary: a name, sizes and counts that are not negative, a digest that is
// empty or 64 hex digits.
func (f TrackFile) Validate() error {
	switch n := utf8.RuneCountInString(f.Name); {
	case strings.TrimSpace(f.Name) == "":
		return errors.New(`file: field "name" is missing or empty`)
	case n > MaxFileNameLen:
		return fmt.Errorf("file: the name has %d characters; at most %d", n, MaxFileNameLen)
	}
	if f.SHA256 != "" && !hexDigest.MatchString(f.SHA256) {
		return fmt.Errorf("file: sha256 = %q is not 64 lower-case hexadecimal digits", f.SHA256)
	}
	for _, c := range []struct {
		name string
		v    int64
	}{{"size_bytes", f.Size}, {"lines", int64(f.Lines)}, {"rows", int64(f.Rows)}, {"names", int64(f.Names)},
		{"tracks", int64(f.Tracks)}, {"positions", int64(f.Positions)}, {"dropped", int64(f.Dropped)},
		{"dropped_positions", int64(f.DroppedPositions)}, {"gaps", int64(f.Gaps)}} {
		if c.v < 0 {
			return fmt.Errorf("file: %s = %d is negative", c.name, c.v)
		}
	}
	return nil
}

// AnalysisSettings are the settings of an analysis of recorded tracks: how the file is read, and the
// conditions of the recording that uncertainty.Analyze takes from its settings scenario. The JSON keys
// of the conditions are those of the scenario document, so the engine's messages (which name the
// key) point at the setting.
type AnalysisSettings struct {
	// Reading the file (trackfile.Options).
	Unit         string  `json:"unit,omitempty"`          // unit of position columns without a suffix: nm, um, µm, μm, mm, m, px; "" = from the header
	PixelSizeNM  float64 `json:"pixel_size_nm,omitempty"` // for positions in px
	MinPositions int     `json:"min_positions,omitempty"` // 0 = trackfile.DefaultMinPositions
	Order        string  `json:"order,omitempty"`         // "track" (default), "frame" or "any"

	// Conditions of the recording (fields of uncertainty.Scenario, same keys and meaning).
	Medium               string   `json:"medium"`
	GlycerolMassFraction float64  `json:"glycerol_mass_fraction,omitempty"`
	PressureMPa          float64  `json:"pressure_MPa,omitempty"`
	ViscosityMPaS        float64  `json:"viscosity_mPa_s,omitempty"`
	ViscosityRefC        *float64 `json:"viscosity_reference_C,omitempty"`
	ViscosityTempCoeff   float64  `json:"viscosity_temp_coeff_per_K,omitempty"`
	ViscosityRelU        *float64 `json:"viscosity_relative_u,omitempty"`
	TemperatureC         float64  `json:"temperature_C"`
	TemperatureUK        float64  `json:"temperature_u_K"`
	TemperatureDist      string   `json:"temperature_distribution,omitempty"`
	FrameIntervalS       float64  `json:"frame_interval_s"`
	ExposureS            float64  `json:"exposure_s"`
	PixelRelU            float64  `json:"pixel_relative_u,omitempty"`
	ParticleDensity      float64  `json:"particle_density_kg_per_m3,omitempty"`
	Coverage             float64  `json:"coverage,omitempty"` // 0 = 0.95
	Trials               int      `json:"trials,omitempty"`   // 0 = adaptive
	Seed                 uint64   `json:"seed"`
}

// Limits of the reading settings.
const maxPixelSizeNM = 1e6 // 1 mm

// ignoredKeys are the keys of a scenario document that the data determine (or that name the
// document); ParseAnalysisSettings accepts and ignores them, so a whole scenario document can serve
// as the settings of an analysis.
var ignoredKeys = []string{"format", "name", "note", "radius_nm", "diffusion_um2_per_s", "dims", "frames", "tracks",
	"track_lengths", "localisation_nm", "drift_um_per_s", "drift_removed", "focus_depth_um", "estimator",
	"target_relative_expanded_uncertainty", "reported_radius_nm", "reported_u_nm", "reported_k", "reported_coverage"}

// ParseAnalysisSettings reads the JSON of analysis settings and validates them. Besides the keys of
// AnalysisSettings it accepts, and ignores, the keys of a scenario document that the data determine
// (radius_nm, frames, tracks, dims, localisation_nm, estimator, the drift and focus fields, the target
// and the reported result) and format, name and note; any other key is an error.
func ParseAnalysisSettings(data []byte) (AnalysisSettings, error) {
	var keys map[string]json.RawMessage
	if err := json.Unmarshal(data, &keys); err != nil {
		return AnalysisSettings{}, fmt.Errorf("analysis settings: not a JSON object: %v", err)
	}
	if keys == nil {
		return AnalysisSettings{}, errors.New("analysis settings: not a JSON object: null")
	}
	for _, k := range ignoredKeys {
		delete(keys, k)
	}
	rest, err := json.Marshal(keys)
	if err != nil {
		return AnalysisSettings{}, err
	}
	dec := json.NewDecoder(bytes.NewReader(rest))
	dec.DisallowUnknownFields()
	var s AnalysisSettings
	if err := dec.Decode(&s); err != nil {
		return AnalysisSettings{}, fmt.Errorf("analysis settings: %v", err)
	}
	return s, s.Validate()
}

// Validate checks the settings as the engine will: the conditions through the scenario that
// Scenario builds (a *uncertainty.FieldError or *core.RangeError naming the key), then the reading
// settings (a *core.RangeError or *uncertainty.FieldError on unit, pixel_size_nm, min_positions or
// order).
func (s AnalysisSettings) Validate() error {
	if err := s.Scenario().Validate(); err != nil {
		return err
	}
	switch s.Unit {
	case "", "nm", "um", "µm", "μm", "mm", "m", "px":
	default:
		return &uncertainty.FieldError{Field: "unit", Value: s.Unit, Allowed: `"" (the header's), "nm", "um", "mm", "m" or "px"`}
	}
	if s.PixelSizeNM != 0 && !(s.PixelSizeNM > 0 && s.PixelSizeNM <= maxPixelSizeNM) {
		return &core.RangeError{Field: "pixel_size_nm", Value: s.PixelSizeNM, Min: 0, Max: maxPixelSizeNM, Why: "the length of one pixel; 0 = not given"}
	}
	if s.Unit == "px" && s.PixelSizeNM == 0 {
		return &uncertainty.FieldError{Field: "pixel_size_nm", Value: 0, Allowed: fmt.Sprintf("(0, %g]", float64(maxPixelSizeNM)), Why: "positions in px need the pixel size"}
	}
	if s.MinPositions != 0 && (s.MinPositions < trackfile.LeastPositions || s.MinPositions > uncertainty.MaxFrames) {
		return &core.RangeError{Field: "min_positions", Value: float64(s.MinPositions), Min: trackfile.LeastPositions, Max: uncertainty.MaxFrames,
			Why: "the covariance-based estimator needs two displacements; 0 = the default of 5"}
	}
	if s.Order != "" {
		if _, err := trackfile.ParseOrder(s.Order); err != nil {
			return &uncertainty.FieldError{Field: "order", Value: s.Order, Allowed: `"track", "frame" or "any"`}
		}
	}
	return nil
}

// Scenario returns the settings scenario for uncertainty.Analyze: the conditions, with the documented
// defaults filled in, and placeholders (radius 1 nm, MinFrames positions, one track, two axes, the
// covariance-based estimator) for what Analyze takes from the data.
func (s AnalysisSettings) Scenario() uncertainty.Scenario {
	return uncertainty.Scenario{
		Format:   uncertainty.Format,
		RadiusNM: 1, Frames: uncertainty.MinFrames, Tracks: 1, Dims: 2, Estimator: "cve", // placeholders
		Medium: s.Medium, GlycerolMassFraction: s.GlycerolMassFraction, PressureMPa: s.PressureMPa,
		ViscosityMPaS: s.ViscosityMPaS, ViscosityRefC: s.ViscosityRefC, ViscosityTempCoeff: s.ViscosityTempCoeff,
		ViscosityRelU: s.ViscosityRelU, TemperatureC: s.TemperatureC, TemperatureUK: s.TemperatureUK,
		TemperatureDist: s.TemperatureDist, FrameIntervalS: s.FrameIntervalS, ExposureS: s.ExposureS,
		PixelRelU: s.PixelRelU, ParticleDensity: s.ParticleDensity, Coverage: s.Coverage, Trials: s.Trials, Seed: s.Seed,
	}.Defaults()
}

// ReadOptions returns the options of the track-file reader: unit, pixel size (in m), the frame
// interval (for files that give times), the minimum track length and the order of the rows.
func (s AnalysisSettings) ReadOptions() trackfile.Options {
	ord := trackfile.ByTrack
	if s.Order != "" {
		ord, _ = trackfile.ParseOrder(s.Order) // Validate refuses other names
	}
	return trackfile.Options{Unit: s.Unit, PixelSize: s.PixelSizeNM * 1e-9, Interval: s.FrameIntervalS, MinPositions: s.MinPositions, Order: ord}
}

// analysisProbe is the part of an uncertainty.Analysis that Validate checks.
type analysisProbe struct {
	Format     *string    `json:"format"`
	RadiusNM   float64    `json:"radius_nm"`
	IntervalNM [2]float64 `json:"interval_nm"`
	TracksUsed int        `json:"tracks_used"`
}

const analysisPrefix = "sizebudget/analysis/"

// Validate checks a stored analysis: the file summary, the settings, and that the result is the
// JSON of an uncertainty.Analysis of the version this build reads, with a positive radius inside its
// interval.
func (a *Analysis) Validate() error {
	if err := a.File.Validate(); err != nil {
		return err
	}
	if err := a.Settings.Validate(); err != nil {
		return fmt.Errorf("settings: %w", err)
	}
	if a.Analysed.IsZero() {
		return errors.New(`field "analysed" must be an RFC 3339 time`)
	}
	var p analysisProbe
	if err := json.Unmarshal(a.Result, &p); err != nil {
		return fmt.Errorf("result: not the JSON of an analysis: %v", err)
	}
	switch {
	case p.Format == nil:
		return fmt.Errorf("result: field \"format\" is missing; expected %q", uncertainty.AnalysisFormat)
	case !strings.HasPrefix(*p.Format, analysisPrefix):
		return fmt.Errorf("result: format = %q is not an analysis; expected %q", *p.Format, uncertainty.AnalysisFormat)
	case *p.Format != uncertainty.AnalysisFormat:
		return fmt.Errorf("result: format = %q is not one this version reads (%q); update the app", *p.Format, uncertainty.AnalysisFormat)
	case !(p.RadiusNM > 0) || math.IsInf(p.RadiusNM, 0) || !(p.IntervalNM[0] <= p.RadiusNM && p.RadiusNM <= p.IntervalNM[1]):
		return fmt.Errorf("result: radius_nm = %v with interval_nm = %v is not a radius inside its interval", p.RadiusNM, p.IntervalNM)
	case p.TracksUsed < 1:
		return fmt.Errorf("result: tracks_used = %d; an analysis has at least one track", p.TracksUsed)
	}
	return nil
}

// ParseAnalysis reads the JSON of a stored Analysis (strictly: unknown keys outside the result are
// errors) and validates it.
func ParseAnalysis(data []byte) (*Analysis, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var a Analysis
	if err := dec.Decode(&a); err != nil {
		return nil, fmt.Errorf("analysis: %v", err)
	}
	if dec.More() {
		return nil, errors.New("analysis: trailing data after the JSON object")
	}
	if err := a.Validate(); err != nil {
		return nil, fmt.Errorf("analysis: %w", err)
	}
	a.Analysed = a.Analysed.UTC()
	return &a, nil
}

// NewAnalysis returns the Analysis of file analysed with settings into result at time t.
func NewAnalysis(file TrackFile, settings AnalysisSettings, result *uncertainty.Analysis, t time.Time) (*Analysis, error) {
	raw, err := json.Marshal(result)
	if err != nil {
		return nil, err
	}
	a := &Analysis{File: file, Settings: settings, Result: raw, Analysed: t.UTC()}
	if err := a.Validate(); err != nil {
		return nil, fmt.Errorf("analysis: %w", err)
	}
	return a, nil
}

// canonical returns the JSON of a with the result re-encoded by encoding/json, so that two analyses
// that differ only in how their numbers were written (by JavaScript, say) compare equal.
func (a *Analysis) canonical() ([]byte, error) {
	if a == nil {
		return []byte("null"), nil
	}
	var v any
	if err := json.Unmarshal(a.Result, &v); err != nil {
		return nil, err
	}
	res, err := json.Marshal(v)
	if err != nil {
		return nil, err
	}
	c := *a
	c.Result = res
	return json.Marshal(c)
}
