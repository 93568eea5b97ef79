package main

import (
	"errors"
	"flag"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"sizebudget/core"
	"sizebudget/uncertainty"
)

// scenarioFlagSet returns a flag set with the scenario flags (and the review flags) parsed from args.
func scenarioFlagSet(t *testing.T, args ...string) (*flag.FlagSet, *scenarioFlags) {
	t.Helper()
	fs := newFlagSet("test", "", "", io.Discard)
	sf := defineScenarioFlags(fs)
	sf.defineReviewFlags(fs)
	if err := parseFlags(fs, args); err != nil {
		t.Fatalf("%q: %v", args, err)
	}
	return fs, sf
}

// readScenario reads a scenario document of testdata.
func readScenario(t *testing.T, name string) uncertainty.Scenario {
	t.Helper()
	data, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	s, err := uncertainty.ParseScenario(data)
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	return s
}

func ptr(x float64) *float64 { return &x }

// TestApplyEachFlag applies one flag at a time to a base document and checks that exactly its field
// changed, to the value typed converted to the unit of the key. The conversions are exact decimal
// shifts of the SI prefixes (SI brochure, 9th edition, 2019); °C = K − 273.15 by definition.
func TestApplyEachFlag(t *testing.T) {
	demo := uncertainty.Demo()
	custom := readScenario(t, "scenarios/custom-medium.json")
	glycerol := demo
	glycerol.Medium, glycerol.GlycerolMassFraction = "glycerol", 0.4
	for _, c := range []struct {
		base uncertainty.Scenario
		args []string
		want func(s *uncertainty.Scenario)
	}{
		{demo, []string{"-radius", "0.1um"}, func(s *uncertainty.Scenario) { s.RadiusNM = 100 }},
		{custom, []string{"-radius", "80nm"}, func(s *uncertainty.Scenario) { s.RadiusNM, s.DiffusionUM2PerS = 80, 0 }},
		{demo, []string{"-diffusion", "4.9µm²/s"}, func(s *uncertainty.Scenario) { s.RadiusNM, s.DiffusionUM2PerS = 0, 4.9 }},
		{demo, []string{"-temp", "36.6C"}, func(s *uncertainty.Scenario) { s.TemperatureC = 36.6 }},
		{demo, []string{"-temp", "310.15K"}, func(s *uncertainty.Scenario) { s.TemperatureC = 310.15 - 273.15 }},
		{demo, []string{"-temp-u", "200mK"}, func(s *uncertainty.Scenario) { s.TemperatureUK = 0.2 }},
		{demo, []string{"-temp-u", "0.3C"}, func(s *uncertainty.Scenario) { s.TemperatureUK = 0.3 }},
		{demo, []string{"-temp-u", "0K"}, func(s *uncertainty.Scenario) { s.TemperatureUK = 0 }},
		{demo, []string{"-temp-dist", "normal"}, func(s *uncertainty.Scenario) { s.TemperatureDist = "normal" }},
		{demo, []string{"-dims", "3"}, func(s *uncertainty.Scenario) { s.Dims = 3 }},
		{demo, []string{"-interval", "20ms"}, func(s *uncertainty.Scenario) { s.FrameIntervalS = 0.02 }},
		{demo, []string{"-fps", "50fps"}, func(s *uncertainty.Scenario) { s.FrameIntervalS = 1.0 / 50 }},
		{demo, []string{"-exposure", "500us"}, func(s *uncertainty.Scenario) { s.ExposureS = 0.0005 }},
		{demo, []string{"-frames", "31"}, func(s *uncertainty.Scenario) { s.Frames = 31 }},
		{demo, []string{"-tracks", "7"}, func(s *uncertainty.Scenario) { s.Tracks = 7 }},
		{demo, []string{"-sigma", "0.025um"}, func(s *uncertainty.Scenario) { s.LocalisationNM = 25 }},
		{demo, []string{"-pixel-u", "1%"}, func(s *uncertainty.Scenario) { s.PixelRelU = 0.01 }},
		{demo, []string{"-drift", "20nm/s"}, func(s *uncertainty.Scenario) { s.DriftUMPerS = 0.02 }},
		{demo, []string{"-drift-removed"}, func(s *uncertainty.Scenario) { s.DriftRemoved = true }},
		{demo, []string{"-focus-depth", "1500nm"}, func(s *uncertainty.Scenario) { s.FocusDepthUM = 1.5 }},
		{demo, []string{"-density", "1.05g/cm3"}, func(s *uncertainty.Scenario) { s.ParticleDensity = 1050 }},
		{demo, []string{"-estimator", "known-noise"}, func(s *uncertainty.Scenario) { s.Estimator = "known-noise" }},
		{demo, []string{"-coverage", "99%"}, func(s *uncertainty.Scenario) { s.Coverage = 0.99 }},
		{demo, []string{"-target", "0.1"}, func(s *uncertainty.Scenario) { s.TargetRelU = 0.1 }},
		{demo, []string{"-trials", "5000"}, func(s *uncertainty.Scenario) { s.Trials = 5000 }},
		{demo, []string{"-seed", "18446744073709551615"}, func(s *uncertainty.Scenario) { s.Seed = 1<<64 - 1 }},
		{demo, []string{"-visc-u", "0"}, func(s *uncertainty.Scenario) { s.ViscosityRelU = ptr(0) }},
		{demo, []string{"-visc-u", "2%"}, func(s *uncertainty.Scenario) { s.ViscosityRelU = ptr(0.02) }},
		{demo, []string{"-pressure", "10bar"}, func(s *uncertainty.Scenario) { s.PressureMPa = 1 }},
		{glycerol, []string{"-glycerol", "60%"}, func(s *uncertainty.Scenario) { s.GlycerolMassFraction = 0.6 }},
		{custom, []string{"-visc", "1.5cP"}, func(s *uncertainty.Scenario) { s.ViscosityMPaS = 1.5 }},
		{custom, []string{"-visc-tref", "30C"}, func(s *uncertainty.Scenario) { s.ViscosityRefC = ptr(30) }},
		{custom, []string{"-visc-tcoeff", "-2%/K"}, func(s *uncertainty.Scenario) { s.ViscosityTempCoeff = -0.02 }},
		{custom, []string{"-visc-u", "0"}, func(s *uncertainty.Scenario) { s.ViscosityRelU = ptr(0) }},
		{demo, []string{"-reported-radius", "82nm"}, func(s *uncertainty.Scenario) { s.ReportedRadiusNM = 82 }},
		{demo, []string{"-reported-u", "1.5nm"}, func(s *uncertainty.Scenario) { s.ReportedUNM = 1.5 }},
		{demo, []string{"-reported-k", "2"}, func(s *uncertainty.Scenario) { s.ReportedK = 2 }},
		{demo, []string{"-reported-coverage", "95%"}, func(s *uncertainty.Scenario) { s.ReportedCoverage = 0.95 }},
		// Given but equal to the base: nothing changes; -drift-removed=false clears a true.
		{demo, []string{"-medium", "water"}, func(*uncertainty.Scenario) {}},
		{func() uncertainty.Scenario { s := demo; s.DriftRemoved = true; return s }(), []string{"-drift-removed=false"},
			func(s *uncertainty.Scenario) { s.DriftRemoved = false }},
	} {
		fs, sf := scenarioFlagSet(t, c.args...)
		got, err := sf.Apply(fs, c.base)
		if err != nil {
			t.Errorf("%q: %v", c.args, err)
			continue
		}
		want := c.base.Defaults()
		c.want(&want)
		if !reflect.DeepEqual(got, want) {
			t.Errorf("%q:\n got %+v\nwant %+v", c.args, got, want)
		}
	}
}

// TestApplyMediumChange checks that changing the medium drops the parameters of the old one and needs
// those of the new one.
func TestApplyMediumChange(t *testing.T) {
	custom := readScenario(t, "scenarios/custom-medium.json")
	fs, sf := scenarioFlagSet(t, "-medium", "water")
	got, err := sf.Apply(fs, custom)
	if err != nil {
		t.Fatal(err)
	}
	want := custom
	want.Medium, want.ViscosityMPaS, want.ViscosityRefC, want.ViscosityTempCoeff, want.ViscosityRelU = "water", 0, nil, 0, nil
	if !reflect.DeepEqual(got, want) {
		t.Errorf("custom → water:\n got %+v\nwant %+v", got, want)
	}
	if err := got.Validate(); err != nil {
		t.Errorf("custom → water: %v", err)
	}

	fs, sf = scenarioFlagSet(t, "-medium", "custom", "-visc", "1.2mPas", "-visc-u", "3%", "-visc-tref", "20C")
	got, err = sf.Apply(fs, uncertainty.Demo())
	if err != nil {
		t.Fatal(err)
	}
	if got.Medium != "custom" || got.ViscosityMPaS != 1.2 || got.ViscosityRelU == nil || *got.ViscosityRelU != 0.03 ||
		got.ViscosityRefC == nil || *got.ViscosityRefC != 20 {
		t.Errorf("water → custom: %+v", got)
	}

	for _, c := range []struct {
		base uncertainty.Scenario
		args []string
		text string
	}{
		{uncertainty.Demo(), []string{"-medium", "glycerol"}, "-medium glycerol needs -glycerol"},
		{uncertainty.Demo(), []string{"-medium", "custom", "-visc", "1mPas"}, "-medium custom needs -visc-u"},
		{uncertainty.Demo(), []string{"-medium", "custom", "-visc-u", "1%"}, "-medium custom needs -visc,"},
		{uncertainty.Demo(), []string{"-glycerol", "0.5"}, "-glycerol applies only to -medium glycerol (the medium is water)"},
		{uncertainty.Demo(), []string{"-visc-tref", "20C"}, "-visc-tref applies only to -medium custom"},
		{custom, []string{"-pressure", "1bar"}, "-pressure applies only to -medium water (the medium is custom)"},
		{custom, []string{"-medium", "glycerol", "-glycerol", "0.2", "-visc", "1mPas"}, "-visc applies only to -medium custom"},
		{uncertainty.Demo(), []string{"-radius", "50nm", "-diffusion", "4um2/s"}, "give one of -radius and -diffusion, not both"},
		{uncertainty.Demo(), []string{"-interval", "20ms", "-fps", "50fps"}, "give one of -interval and -fps"},
		{uncertainty.Demo(), []string{"-reported-k", "2", "-reported-coverage", "95%"}, "give one of -reported-k and -reported-coverage"},
	} {
		fs, sf := scenarioFlagSet(t, c.args...)
		_, err := sf.Apply(fs, c.base)
		checkUsageReport(t, err, "sizebudget test", c.text)
	}
}

// TestApplyGlycerolStays checks that a glycerol document keeps its mass fraction when -medium glycerol
// is given again without -glycerol.
func TestApplyGlycerolStays(t *testing.T) {
	base := uncertainty.Demo()
	base.Medium, base.GlycerolMassFraction = "glycerol", 0.3
	fs, sf := scenarioFlagSet(t, "-medium", "glycerol")
	got, err := sf.Apply(fs, base)
	if err != nil || got.GlycerolMassFraction != 0.3 {
		t.Errorf("err %v, fraction %g", err, got.GlycerolMassFraction)
	}
}

// TestApplyTrackLengths checks that -frames or -tracks replace the length groups of a document by
// tracks of one length, the other number kept from the document (the longest, the total).
func TestApplyTrackLengths(t *testing.T) {
	base := readScenario(t, "scenarios/track-lengths.json") // 50 tracks of 20 and 30 of 60 positions
	for _, c := range []struct {
		args           []string
		frames, tracks int
	}{
		{[]string{"-frames", "30"}, 30, 80},
		{[]string{"-tracks", "10"}, 60, 10},
		{[]string{"-frames", "30", "-tracks", "10"}, 30, 10},
	} {
		fs, sf := scenarioFlagSet(t, c.args...)
		got, err := sf.Apply(fs, base)
		if err != nil {
			t.Fatal(err)
		}
		if got.TrackLengths != nil || got.Frames != c.frames || got.Tracks != c.tracks {
			t.Errorf("%q: track_lengths %v, frames %d, tracks %d; want none, %d, %d", c.args, got.TrackLengths, got.Frames, got.Tracks, c.frames, c.tracks)
		}
		if err := got.Validate(); err != nil {
			t.Errorf("%q: %v", c.args, err)
		}
	}
	fs, sf := scenarioFlagSet(t, "-sigma", "20nm")
	got, err := sf.Apply(fs, base)
	if err != nil || !reflect.DeepEqual(got.TrackLengths, base.TrackLengths) {
		t.Errorf("-sigma alone changed the track lengths: %v, %v", got.TrackLengths, err)
	}
}

// TestLoadBase checks the base of Load: the demo scenario as it is without flags, renamed (and still
// marked as invented) once a setting is changed by a flag, and the file with -scenario.
func TestLoadBase(t *testing.T) {
	fs, sf := scenarioFlagSet(t)
	got, err := sf.Load(fs)
	if err != nil || !reflect.DeepEqual(got, uncertainty.Demo().Defaults()) {
		t.Errorf("no flags: %+v, %v; want the demo scenario", got, err)
	}
	fs, sf = scenarioFlagSet(t, "-trials", "2000", "-seed", "5")
	got, err = sf.Load(fs)
	if err != nil || got.Name != uncertainty.Demo().Name {
		t.Errorf("-trials and -seed only: name %q, %v; want the demo's", got.Name, err)
	}
	fs, sf = scenarioFlagSet(t, "-temp", "20C")
	got, err = sf.Load(fs)
	if err != nil || got.Name == uncertainty.Demo().Name || !strings.Contains(got.Name, "invented demo") || !strings.Contains(got.Note, "INVENTED") {
		t.Errorf("-temp: name %q, note %q, %v", got.Name, got.Note, err)
	}
	path := filepath.Join("testdata", "scenarios", "custom-medium.json")
	fs, sf = scenarioFlagSet(t, "-scenario", path, "-frames", "25")
	got, err = sf.Load(fs)
	want := readScenario(t, "scenarios/custom-medium.json")
	want.Frames = 25
	if err != nil || !reflect.DeepEqual(got, want) {
		t.Errorf("-scenario with -frames:\n got %+v\nwant %+v (%v)", got, want, err)
	}
}

// TestLoadErrorsSayWhere checks the note that Load adds to a value out of range: which flag set it,
// or that it came from the file or from the demo scenario; the error keeps its type.
func TestLoadErrorsSayWhere(t *testing.T) {
	file := filepath.Join("testdata", "scenarios", "custom-medium.json") // 20 ms frame interval, 5 ms exposure
	for _, c := range []struct {
		args  []string
		field string
		note  string
	}{
		{[]string{"-temp", "400C"}, "temperature_C", "[set by -temp]"},
		{[]string{"-fps", "0.001Hz"}, "frame_interval_s", "[set by -fps]"},
		{[]string{"-interval", "5ms"}, "exposure_s", "[-exposure not given: the demo scenario's value]"},
		{[]string{"-scenario", file, "-interval", "2ms"}, "exposure_s", "[from " + file + "]"},
		// core's water model: a *core.RangeError (with -temp-u 0, see the report of the validation order).
		{[]string{"-temp", "120C", "-temp-u", "0K"}, "temperature_K", "[set by -temp]"},
		{[]string{"-temp", "99.9C"}, "temperature_u_K", "[-temp-u not given: the demo scenario's value]"},
	} {
		fs, sf := scenarioFlagSet(t, c.args...)
		_, err := sf.Load(fs)
		var fe *uncertainty.FieldError
		var re *core.RangeError
		field := ""
		switch {
		case errors.As(err, &fe):
			field = fe.Field
		case errors.As(err, &re):
			field = re.Field
		}
		if field != c.field || !strings.HasSuffix(err.Error(), c.note) {
			t.Errorf("%q: %v; want field %s and the note %q", c.args, err, c.field, c.note)
		}
	}
}

// TestTemperatureDifference checks that a temperature difference in °C has no offset.
func TestTemperatureDifference(t *testing.T) {
	for _, c := range []struct {
		in   string
		want float64
	}{{"0.5K", 0.5}, {"0.5C", 0.5}, {"0.5°C", 0.5}, {"500mK", 0.5}, {"0K", 0}} {
		if got, err := TemperatureDifference.Parse(c.in); err != nil || got != c.want {
			t.Errorf("%q: %g, %v; want %g K", c.in, got, err, c.want)
		}
	}
	// g/cm³ = 1000 kg/m³ (SI brochure, table 8: the litre is 1 dm³).
	if got, err := MassDensity.Parse("1.05g/mL"); err != nil || got != 1050 {
		t.Errorf("1.05g/mL: %g, %v", got, err)
	}
}
