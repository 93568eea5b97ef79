package uncertainty

import (
	"errors"
	"fmt"
	"reflect"
	"strings"
	"testing"

	"sizebudget/core"
)

func ptrTo(x float64) *float64 { return &x }

// TestScenarioValidateFields changes one field of the demo scenario at a time to a value outside its
// range: Validate must return a *FieldError (or the medium model's *core.RangeError) whose Field is
// that field's JSON key, and whose message names the value and the allowed range. The ranges are the
// ones Validate documents (scenario_validate.go) and, for the media, core's own (IAPWS liquid range,
// Cheng 2008 0–100 °C), read from core rather than copied.
func TestScenarioValidateFields(t *testing.T) {
	_, waterMax, err := core.Water{}.TemperatureRange()
	if err != nil {
		t.Fatal(err)
	}
	glycerol := func(s *Scenario) { s.Medium, s.GlycerolMassFraction = "glycerol", 0.5 }
	custom := func(s *Scenario) {
		s.Medium, s.ViscosityMPaS, s.ViscosityRelU = "custom", 1.2, ptrTo(0.02)
	}
	for _, c := range []struct {
		name    string
		change  func(s *Scenario)
		field   string
		value   string // as the message writes it
		allowed string // the message contains it
	}{
		{"format", func(s *Scenario) { s.Format = "other" }, "format", `"other"`, `"sizebudget/scenario/1"`},
		{"radius negative", func(s *Scenario) { s.RadiusNM = -1 }, "radius_nm", "-1", "(0, 100000]"},
		{"radius too large", func(s *Scenario) { s.RadiusNM = 2e5 }, "radius_nm", "200000", "(0, 100000]"},
		{"no particle", func(s *Scenario) { s.RadiusNM = 0 }, "radius_nm", "0", "or give diffusion_um2_per_s"},
		{"both particle", func(s *Scenario) { s.DiffusionUM2PerS = 4.9 }, "radius_nm", "50", "exactly one of radius_nm and diffusion_um2_per_s"},
		{"diffusion", func(s *Scenario) { s.RadiusNM, s.DiffusionUM2PerS = 0, -4.9 }, "diffusion_um2_per_s", "-4.9", "(0, 100000]"},
		{"medium", func(s *Scenario) { s.Medium = "oil" }, "medium", `"oil"`, `"water", "glycerol" or "custom"`},
		{"glycerol with water", func(s *Scenario) { s.GlycerolMassFraction = 0.5 }, "glycerol_mass_fraction", "0.5", `unless medium is "glycerol"`},
		{"glycerol fraction", func(s *Scenario) { glycerol(s); s.GlycerolMassFraction = 1.5 }, "glycerol_mass_fraction", "1.5", "[0, 1]"},
		{"pressure", func(s *Scenario) { s.PressureMPa = 200 }, "pressure_MPa", "200", "(0, 100]"},
		{"pressure negative", func(s *Scenario) { s.PressureMPa = -1 }, "pressure_MPa", "-1", "(0, 100]"},
		{"custom viscosity", func(s *Scenario) { custom(s); s.ViscosityMPaS = 0 }, "viscosity_mPa_s", "0", "(0, 1e+07]"},
		{"custom reference", func(s *Scenario) { custom(s); s.ViscosityRefC = ptrTo(400) }, "viscosity_reference_C", "400", "[-50, 300]"},
		{"custom coefficient", func(s *Scenario) { custom(s); s.ViscosityTempCoeff = -2 }, "viscosity_temp_coeff_per_K", "-2", "[-1, 1]"},
		{"custom without u", func(s *Scenario) { custom(s); s.ViscosityRelU = nil }, "viscosity_relative_u", `"missing"`, "a custom medium needs its stated uncertainty"},
		{"viscosity with water", func(s *Scenario) { s.ViscosityMPaS = 1 }, "viscosity_mPa_s", "1", `only with medium "custom"`},
		{"viscosity u", func(s *Scenario) { s.ViscosityRelU = ptrTo(0.2) }, "viscosity_relative_u", "0.2", "[0, 0.15]"},
		{"viscosity u negative", func(s *Scenario) { s.ViscosityRelU = ptrTo(-0.01) }, "viscosity_relative_u", "-0.01", "[0, 0.15]"},
		{"temperature", func(s *Scenario) { s.TemperatureC = 400 }, "temperature_C", "400", "[-50, 300]"},
		{"temperature of water", func(s *Scenario) { s.TemperatureC, s.TemperatureUK = 120, 0 }, "temperature_K", "393.15",
			fmt.Sprintf("[273.15, %s]", fmtG(waterMax))},
		{"temperature u", func(s *Scenario) { s.TemperatureUK = 25 }, "temperature_u_K", "25", "[0, 20]"},
		{"temperature u negative", func(s *Scenario) { s.TemperatureUK = -0.1 }, "temperature_u_K", "-0.1", "[0, 20]"},
		{"temperature u leaves glycerol range", func(s *Scenario) { glycerol(s); s.TemperatureC = 99.8 }, "temperature_u_K", "0.5",
			"temperature_K = 373.45 is outside the allowed range [273.15, 373.15]"},
		{"normal temperature u leaves range", func(s *Scenario) { glycerol(s); s.TemperatureC, s.TemperatureDist = 98, "normal" }, "temperature_u_K", "0.5",
			"temperature_K = 373.65"}, // 5u either side of the nominal (scenario_validate.go, tempHalfRange)
		{"temperature distribution", func(s *Scenario) { s.TemperatureDist = "uniform" }, "temperature_distribution", `"uniform"`, `"rect" or "normal"`},
		{"dims 0", func(s *Scenario) { s.Dims = 0 }, "dims", "0", "1, 2 or 3"},
		{"dims 4", func(s *Scenario) { s.Dims = 4 }, "dims", "4", "1, 2 or 3"},
		{"interval", func(s *Scenario) { s.FrameIntervalS = 0 }, "frame_interval_s", "0", "(0, 100]"},
		{"interval long", func(s *Scenario) { s.FrameIntervalS = 200 }, "frame_interval_s", "200", "(0, 100]"},
		{"exposure", func(s *Scenario) { s.ExposureS = 0.05 }, "exposure_s", "0.05", "the exposure cannot exceed the frame interval"},
		{"exposure negative", func(s *Scenario) { s.ExposureS = -0.001 }, "exposure_s", "-0.001", "[0, 0.0333333"},
		{"frames 2", func(s *Scenario) { s.Frames = 2 }, "frames", "2", "3 to 100000 positions per track"},
		{"frames many", func(s *Scenario) { s.Frames = MaxFrames + 1 }, "frames", "100001", "3 to 100000"},
		{"frames msd", func(s *Scenario) { s.Frames, s.Estimator = 3, "msd" }, "frames", "3", "4 to 100000 positions per track for the MSD fit"},
		{"tracks", func(s *Scenario) { s.Tracks = 0 }, "tracks", "0", "1 to 100000"},
		{"track length", func(s *Scenario) { s.TrackLengths = []LengthGroup{{Frames: 2, Count: 5}} }, "track_lengths[0].frames", "2", "3 to 100000"},
		{"track count", func(s *Scenario) { s.TrackLengths = []LengthGroup{{Frames: 60, Count: 0}} }, "track_lengths[0].count", "0", "1 to 100000"},
		{"track totals", func(s *Scenario) { s.TrackLengths = []LengthGroup{{Frames: 60, Count: 50}} }, "frames", "60", "with tracks = 50 (their total)"},
		{"localisation", func(s *Scenario) { s.LocalisationNM = -1 }, "localisation_nm", "-1", "[0, 100000]"},
		{"pixel", func(s *Scenario) { s.PixelRelU = 0.2 }, "pixel_relative_u", "0.2", "[0, 0.15]"},
		{"drift", func(s *Scenario) { s.DriftUMPerS = -1 }, "drift_um_per_s", "-1", "[0, 1000]"},
		{"focus", func(s *Scenario) { s.FocusDepthUM = -1 }, "focus_depth_um", "-1", "[0, 10000]"},
		{"estimator", func(s *Scenario) { s.Estimator = "mle" }, "estimator", `"mle"`, `"cve", "known-noise" or "msd"`},
		{"coverage low", func(s *Scenario) { s.Coverage = 0.5 }, "coverage", "0.5", "(0.5, 1)"},
		{"coverage high", func(s *Scenario) { s.Coverage = 0.99995 }, "coverage", "0.99995", "(0.5, 0.9999]"},
		{"target", func(s *Scenario) { s.TargetRelU = 1.5 }, "target_relative_expanded_uncertainty", "1.5", "[0, 1]"},
		{"trials", func(s *Scenario) { s.Trials = 999 }, "trials", "999", "0 (adaptive) or 1000 to 10000000"},
		{"trials negative", func(s *Scenario) { s.Trials = -1 }, "trials", "-1", "0 (adaptive) or 1000"},
		{"density", func(s *Scenario) { s.ParticleDensity = -1 }, "particle_density_kg_per_m3", "-1", "[0, 30000]"},
		{"reported radius", func(s *Scenario) { s.ReportedUNM = 1 }, "reported_radius_nm", "0", "(0, 100000]"},
		{"reported u", func(s *Scenario) { s.ReportedRadiusNM = 82 }, "reported_u_nm", "0", "(0, 100000]"},
		{"reported k and coverage", func(s *Scenario) { s.ReportedRadiusNM, s.ReportedUNM, s.ReportedK, s.ReportedCoverage = 82, 1, 2, 0.95 },
			"reported_k", "2", "one of reported_k and reported_coverage"},
		{"reported k", func(s *Scenario) { s.ReportedRadiusNM, s.ReportedUNM, s.ReportedK = 82, 1, 20 }, "reported_k", "20", "[0.5, 10]"},
		{"reported coverage", func(s *Scenario) { s.ReportedRadiusNM, s.ReportedUNM, s.ReportedCoverage = 82, 1, 1.2 }, "reported_coverage", "1.2", "(0.5, 1)"},
	} {
		s := Demo()
		c.change(&s)
		err := s.Validate()
		var fe *FieldError
		var re *core.RangeError
		switch {
		case errors.As(err, &fe):
			if fe.Field != c.field {
				t.Errorf("%s: FieldError on %s, want %s (%v)", c.name, fe.Field, c.field, err)
			}
		case errors.As(err, &re):
			if re.Field != c.field {
				t.Errorf("%s: RangeError on %s, want %s (%v)", c.name, re.Field, c.field, err)
			}
		default:
			t.Errorf("%s: Validate = %v (%T), want a field error on %s", c.name, err, err, c.field)
			continue
		}
		msg := err.Error()
		if !strings.HasPrefix(msg, c.field+" = "+c.value+" ") || !strings.Contains(msg, c.allowed) {
			t.Errorf("%s: message %q; want %q and the range %q", c.name, msg, c.field+" = "+c.value, c.allowed)
		}
	}
}

func fmtG(x float64) string { return fmt.Sprintf("%.6g", x) }

// TestScenarioValidAtEdges checks values at the ends of their ranges, which Validate must accept:
// every uncertainty zero (an exactly known input), the exposure equal to the frame interval, the
// fewest frames, one track, and a custom medium with viscosity_relative_u 0.
func TestScenarioValidAtEdges(t *testing.T) {
	for _, change := range []func(s *Scenario){
		func(s *Scenario) { s.TemperatureUK, s.PixelRelU, s.LocalisationNM, s.ViscosityRelU = 0, 0, 0, ptrTo(0) },
		func(s *Scenario) { s.ExposureS = s.FrameIntervalS },
		func(s *Scenario) { s.ExposureS = 0 },
		func(s *Scenario) { s.Frames, s.Tracks = MinFrames, 1 },
		func(s *Scenario) { s.Frames, s.Tracks = MaxFrames, MaxTracks },
		func(s *Scenario) { s.RadiusNM, s.DiffusionUM2PerS = 0, 4.9 },
		func(s *Scenario) { s.Medium, s.GlycerolMassFraction = "glycerol", 0 },
		func(s *Scenario) { s.Medium, s.ViscosityMPaS, s.ViscosityRelU = "custom", 1.2, ptrTo(0) },
		func(s *Scenario) { s.Coverage, s.TargetRelU, s.Trials = 0.9999, 0, MaxTrials },
		func(s *Scenario) { s.TrackLengths, s.Frames, s.Tracks = []LengthGroup{{20, 50}, {60, 30}}, 60, 80 },
		func(s *Scenario) { s.ReportedRadiusNM, s.ReportedUNM = 82, 1 },
	} {
		s := Demo()
		change(&s)
		if err := s.Validate(); err != nil {
			t.Errorf("%+v: %v", s, err)
		}
	}
}

// TestParseScenarioRefuses checks that ParseScenario refuses what is not a scenario document of this
// version, each with a message that says what is wrong.
func TestParseScenarioRefuses(t *testing.T) {
	demo, err := Demo().Marshal()
	if err != nil {
		t.Fatal(err)
	}
	with := func(old, new string) string { return strings.Replace(string(demo), old, new, 1) }
	for _, c := range []struct {
		name, doc, text string
	}{
		{"not JSON", "radius 50 nm", "scenario: not a JSON object"},
		{"an array", "[1, 2]", "scenario: not a JSON object"},
		{"no format", `{"radius_nm": 50}`, `field "format" is missing; expected "sizebudget/scenario/1"`},
		{"other format", with(Format, "othertool/settings/1"), `format = "othertool/settings/1" is not a sizebudget scenario`},
		{"a plan, not a scenario", with(Format, PlanFormat), `format = "sizebudget/plan/1" is not a sizebudget scenario`},
		{"newer version", with(Format, "sizebudget/scenario/9"), `format = "sizebudget/scenario/9" is newer than this version reads ("sizebudget/scenario/1")`},
		{"format not a string", `{"format": 1}`, "scenario: not a JSON object"},
		{"unknown field", with(`"medium"`, `"colour": "blue", "medium"`), `scenario: json: unknown field "colour"`},
		{"wrong type", with(`"frames": 60`, `"frames": "sixty"`), "scenario: json: cannot unmarshal string"},
		{"fractional frames", with(`"frames": 60`, `"frames": 60.5`), "scenario: json: cannot unmarshal number 60.5"},
		{"trailing data", string(demo) + `{"format": "` + Format + `"}`, "not a JSON object"},
		{"invalid value", with(`"frames": 60`, `"frames": 2`), "frames = 2 is not allowed"},
	} {
		_, err := ParseScenario([]byte(c.doc))
		if err == nil || !strings.Contains(err.Error(), c.text) {
			t.Errorf("%s: %v; want an error containing %q", c.name, err, c.text)
		}
	}
}

// TestScenarioDefaults checks that Defaults fills exactly what its comment lists, and nothing it was
// given.
func TestScenarioDefaults(t *testing.T) {
	got := Scenario{}.Defaults()
	want := Scenario{Format: Format, Medium: "water", TemperatureDist: "rect", Dims: 2, Estimator: "cve", Coverage: 0.95}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("Defaults of an empty document:\n got %+v\nwant %+v", got, want)
	}
	given := Scenario{Format: "x", Medium: "glycerol", TemperatureDist: "normal", Dims: 3, Estimator: "msd", Coverage: 0.99}
	if d := given.Defaults(); !reflect.DeepEqual(d, given) {
		t.Errorf("Defaults changed given fields: %+v", d)
	}
	groups := Scenario{TrackLengths: []LengthGroup{{Frames: 20, Count: 50}, {Frames: 60, Count: 30}, {Frames: 40, Count: 1}}}.Defaults()
	if groups.Frames != 60 || groups.Tracks != 81 {
		t.Errorf("track_lengths: frames %d, tracks %d; want the longest 60 and the total 81", groups.Frames, groups.Tracks)
	}
	if d := Demo(); !reflect.DeepEqual(d.Defaults(), d) {
		t.Errorf("the demo scenario is not complete: Defaults changed it")
	}
}

// TestScenarioRoundTrip checks Marshal → ParseScenario for documents that use every kind of field.
func TestScenarioRoundTrip(t *testing.T) {
	demo := Demo()
	custom := demo
	custom.RadiusNM, custom.DiffusionUM2PerS = 0, 1.1
	custom.Medium, custom.ViscosityMPaS, custom.ViscosityRefC, custom.ViscosityTempCoeff, custom.ViscosityRelU = "custom", 1.02, ptrTo(20), -0.024, ptrTo(0)
	custom.TemperatureDist, custom.DriftUMPerS, custom.DriftRemoved, custom.FocusDepthUM = "normal", 0.02, true, 2
	custom.Estimator, custom.Trials, custom.Seed, custom.ParticleDensity = "msd", 20000, 1<<63+12345, 1050
	custom.ReportedRadiusNM, custom.ReportedUNM, custom.ReportedCoverage = 82, 1, 0.95
	mixed := demo
	mixed.Medium, mixed.GlycerolMassFraction = "glycerol", 0.3
	mixed.TrackLengths, mixed.Frames, mixed.Tracks = []LengthGroup{{20, 50}, {60, 30}}, 60, 80
	mixed.ReportedRadiusNM, mixed.ReportedUNM, mixed.ReportedK = 100, 6, 2
	for _, s := range []Scenario{demo, custom, mixed} {
		b, err := s.Marshal()
		if err != nil {
			t.Fatal(err)
		}
		got, err := ParseScenario(b)
		if err != nil {
			t.Fatalf("%s\n%v", b, err)
		}
		if !reflect.DeepEqual(got, s) {
			t.Errorf("round trip:\n got %+v\nwant %+v", got, s)
		}
	}
}

// TestDemoIsInvented checks that the demo scenario says it is invented and is valid.
func TestDemoIsInvented(t *testing.T) {
	d := Demo()
	if !strings.Contains(d.Name, "invented") || !strings.Contains(d.Note, "invented") {
		t.Errorf("name %q, note %q: the demo must say it is invented", d.Name, d.Note)
	}
	if err := d.Validate(); err != nil {
		t.Error(err)
	}
}
