package main

import (
	"encoding/json"
	"errors"
	"flag"
	"maps"
	"slices"
	"strings"
	"testing"

	"sizebudget/core"
)

// decodeObject decodes out as exactly one JSON object.
func decodeObject(t *testing.T, out string) map[string]any {
	t.Helper()
	dec := json.NewDecoder(strings.NewReader(out))
	var obj map[string]any
	if err := dec.Decode(&obj); err != nil {
		t.Fatalf("output is not a JSON object: %v\n%s", err, out)
	}
	if dec.More() {
		t.Fatalf("more than one JSON value in the output:\n%s", out)
	}
	return obj
}

// checkKeys checks that obj has exactly the keys want.
func checkKeys(t *testing.T, obj map[string]any, want ...string) {
	t.Helper()
	got := slices.Sorted(maps.Keys(obj))
	slices.Sort(want)
	if !slices.Equal(got, want) {
		t.Errorf("keys %v, want %v", got, want)
	}
}

// checkNumbers checks that each key of want is a number in obj equal to the value to 1e-12.
func checkNumbers(t *testing.T, obj map[string]any, want map[string]float64) {
	t.Helper()
	for _, k := range slices.Sorted(maps.Keys(want)) {
		x, ok := obj[k].(float64)
		if !ok || !closeTo(x, want[k]) {
			t.Errorf("%s = %v, want %.17g (from core)", k, obj[k], want[k])
		}
	}
}

// viscosityKeys are the keys of every viscosity report.
var viscosityKeys = []string{"medium", "temperature_K", "temperature_C", "viscosity_mPa_s", "relative_uncertainty",
	"viscosity_standard_uncertainty_mPa_s", "dlneta_dT_per_K"}

func TestViscosityJSON(t *testing.T) {
	for _, c := range []struct {
		golden string
		args   []string
		medium core.Medium // what the command must have built
		T      float64     // K, from the definition of °C (SI brochure) where given in °C
		extra  map[string]float64
	}{
		{"viscosity_water.json", []string{"-temp", "25C"}, core.Water{}, 298.15,
			map[string]float64{"pressure_MPa": 0.101325}},
		{"viscosity_water_pressure.json", []string{"-temp", "293.15K", "-pressure", "100bar"}, core.Water{PressureMPa: 10}, 293.15,
			map[string]float64{"pressure_MPa": 10}},
		{"viscosity_glycerol.json", []string{"-medium", "glycerol", "-glycerol", "50%", "-temp", "20C"}, core.GlycerolWater{MassFraction: 0.5}, 293.15,
			map[string]float64{"glycerol_mass_fraction": 0.5}},
		{"viscosity_custom.json", []string{"-medium", "custom", "-visc", "1.2cP", "-visc-u", "2%", "-visc-tref", "20C", "-visc-tcoeff", "-2%/K", "-temp", "30C"},
			core.CustomMedium{ViscosityRef: 1.2e-3, TRef: 293.15, RelU: 0.02, TempCoeff: -0.02}, 303.15,
			map[string]float64{"reference_viscosity_mPa_s": 1.2, "reference_temperature_K": 293.15, "viscosity_temperature_coefficient_per_K": -0.02}},
	} {
		t.Run(c.golden, func(t *testing.T) {
			stdout, stderr, err := runArgs(append([]string{"viscosity", "-json"}, c.args...)...)
			if err != nil || stderr != "" {
				t.Fatalf("err %v, stderr %q", err, stderr)
			}
			checkGolden(t, c.golden, stdout)
			obj := decodeObject(t, stdout)
			checkKeys(t, obj, append(slices.Clone(viscosityKeys), slices.Collect(maps.Keys(c.extra))...)...)
			if obj["medium"] != c.medium.Name() {
				t.Errorf("medium %v, want %s", obj["medium"], c.medium.Name())
			}
			eta, err1 := c.medium.Viscosity(c.T)
			dln, err2 := c.medium.DLnEtaDT(c.T)
			if err1 != nil || err2 != nil {
				t.Fatal(err1, err2)
			}
			u := c.medium.RelativeUncertainty(c.T)
			want := map[string]float64{
				"temperature_K": c.T, "temperature_C": c.T - 273.15, "viscosity_mPa_s": eta * 1e3,
				"relative_uncertainty": u, "viscosity_standard_uncertainty_mPa_s": u * eta * 1e3, "dlneta_dT_per_K": dln,
			}
			maps.Copy(want, c.extra)
			checkNumbers(t, obj, want)
		})
	}
}

func TestViscosityTable(t *testing.T) {
	stdout, stderr, err := runArgs("viscosity", "-temp", "25C")
	if err != nil || stderr != "" {
		t.Fatalf("err %v, stderr %q", err, stderr)
	}
	checkGolden(t, "viscosity_water.txt", stdout)
	eta, _ := core.Water{}.Viscosity(298.15)
	dln, _ := core.Water{}.DLnEtaDT(298.15)
	checkRows(t, stdout, "medium water", "pressure 0.101325 MPa", "temperature 298.15 K", "25 °C",
		"viscosity "+formatNumber(eta*1e3)+" mPa·s", "d ln η/dT "+formatNumber(dln)+" 1/K")
	for line := range strings.Lines(stdout) {
		if strings.HasSuffix(strings.TrimSuffix(line, "\n"), " ") {
			t.Errorf("trailing space in %q", line)
		}
	}
}

// checkRows checks that the table out has the rows want, each written with single spaces.
func checkRows(t *testing.T, out string, want ...string) {
	t.Helper()
	var rows []string
	for line := range strings.Lines(out) {
		rows = append(rows, strings.Join(strings.Fields(line), " "))
	}
	for _, w := range want {
		if !slices.Contains(rows, w) {
			t.Errorf("table lacks the row %q:\n%s", w, out)
		}
	}
}

func TestViscosityHelp(t *testing.T) {
	stdout, stderr, err := runArgs("viscosity", "-h")
	if !errors.Is(err, flag.ErrHelp) || stdout != "" {
		t.Fatalf("err %v, stdout %q", err, stdout)
	}
	for _, want := range []string{"-temp temperature", "-medium liquid", "(default water)", "-pressure", "(default 0.101325MPa)",
		"-glycerol", "-visc viscosity", "-visc-u", "-visc-tref temperature", "(default 25C)", "-visc-tcoeff", "(default 0/K)", "-json",
		"dlneta_dT_per_K", Viscosity.Accepted, TemperatureCoefficient.Accepted} {
		if !strings.Contains(stderr, want) {
			t.Errorf("viscosity -h lacks %q", want)
		}
	}
}

func TestViscosityUsageErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		text string
	}{
		{[]string{}, "missing -temp"},
		{[]string{"-temp", "25"}, `invalid value "25" for flag -temp: "25" has no unit: a temperature needs one: ` + Temperature.Accepted},
		{[]string{"-temp", "25F"}, `unknown unit "F"`},
		{[]string{"-temp"}, "flag needs an argument: -temp"},
		{[]string{"-temp", "25C", "-nope"}, "flag provided but not defined: -nope"},
		{[]string{"-temp", "25C", "extra"}, `unexpected argument "extra"`},
		{[]string{"-temp", "25C", "-json=maybe"}, "-json"},
		{[]string{"-temp", "25C", "-medium", "oil"}, "want one of water, glycerol, custom"},
		{[]string{"-temp", "25C", "-medium", "glycerol"}, "-medium glycerol needs -glycerol"},
		{[]string{"-temp", "25C", "-medium", "custom"}, "-medium custom needs -visc"},
		{[]string{"-temp", "25C", "-glycerol", "0.5"}, "-glycerol applies only to -medium glycerol"},
		{[]string{"-temp", "25C", "-visc", "1mPas"}, "-visc applies only to -medium custom"},
		{[]string{"-temp", "25C", "-medium", "glycerol", "-glycerol", "0.5", "-visc-tref", "20C"}, "-visc-tref applies only to -medium custom"},
		{[]string{"-temp", "25C", "-medium", "custom", "-visc", "1mPas", "-pressure", "1bar"}, "-pressure applies only to -medium water"},
		{[]string{"-temp", "25C", "-medium", "custom", "-visc", "1MPas"}, `unknown unit "MPas"`},
		{[]string{"-temp", "25C", "-medium", "custom", "-visc", "1mPas", "-visc-tcoeff", "-0.02"}, "has no unit"},
		// A usage error is reported before a value out of range.
		{[]string{"-temp", "500K", "-medium", "glycerol"}, "-medium glycerol needs -glycerol"},
	} {
		_, _, err := runArgs(append([]string{"viscosity"}, c.args...)...)
		checkUsageReport(t, err, "sizebudget viscosity", c.text)
	}
}

func TestViscosityRangeErrors(t *testing.T) {
	// The ranges are core's own (core.Water.TemperatureRange, the pressure limits of core.Water, the
	// limits of core.CustomMedium.Validate), read from core so that this test checks the reporting.
	_, tmax, err := core.Water{}.TemperatureRange()
	if err != nil {
		t.Fatal(err)
	}
	var pr *core.RangeError
	_, _, err = core.Water{PressureMPa: 1000}.TemperatureRange()
	if !errors.As(err, &pr) {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args              []string
		field             string
		value, min, max   float64
		customTemperature bool
	}{
		{[]string{"-temp", "400K"}, "temperature_K", 400, 273.15, tmax, false},
		{[]string{"-temp", "-300C"}, "temperature_K", -300 + 273.15, 273.15, tmax, false},
		{[]string{"-temp", "25C", "-pressure", "200MPa"}, "pressure_MPa", 200, pr.Min, pr.Max, false},
		{[]string{"-temp", "25C", "-pressure", "0bar"}, "pressure_MPa", 0, pr.Min, pr.Max, false},
		{[]string{"-temp", "25C", "-pressure", "-1atm"}, "pressure_MPa", -0.101325, pr.Min, pr.Max, false},
		// Cheng (2008) correlation ranges as core states them: 0 ≤ Cm ≤ 1, 0–100 °C.
		{[]string{"-temp", "25C", "-medium", "glycerol", "-glycerol", "150%"}, "glycerol_mass_fraction", 1.5, 0, 1, false},
		{[]string{"-temp", "110C", "-medium", "glycerol", "-glycerol", "0.5"}, "temperature_K", 383.15, 273.15, 373.15, false},
		// core.CustomMedium: within 25 K of the reference temperature (default 25 °C), 0.001 to 1e7
		// mPa·s, relative uncertainty ≤ 0.5, |d ln η/dT| ≤ 0.3 1/K.
		{[]string{"-temp", "60C", "-medium", "custom", "-visc", "1.2mPas"}, "temperature_K", 333.15, 298.15 - 25, 298.15 + 25, true},
		{[]string{"-temp", "25C", "-medium", "custom", "-visc", "0mPas"}, "viscosity_mPa_s", 0, 0.001, 1e7, false},
		{[]string{"-temp", "25C", "-medium", "custom", "-visc", "1mPas", "-visc-u", "80%"}, "viscosity_relative_uncertainty", 0.8, 0, 0.5, false},
		{[]string{"-temp", "25C", "-medium", "custom", "-visc", "1mPas", "-visc-tcoeff", "-0.5/K"}, "viscosity_temperature_coefficient_per_K", -0.5, -0.3, 0.3, false},
	} {
		stdout, _, err := runArgs(append([]string{"viscosity", "-json"}, c.args...)...)
		if stdout != "" {
			t.Errorf("%v: wrote %q on failure", c.args, stdout)
		}
		checkRangeReport(t, err, c.field, c.value, c.min, c.max)
	}
}

// FuzzViscosityArgs runs the viscosity subcommand on command lines made of fuzzed flag values (an
// empty value leaves the flag out) and fuzzed extra arguments. Whatever they are, run must not
// panic, must end in one of the three outcomes (success, usage error, range error) and must report
// it in the documented form.
func FuzzViscosityArgs(f *testing.F) {
	f.Add("25C", "water", "", "", "", "", "", "", "", true)
	f.Add("20C", "glycerol", "", "50%", "", "", "", "", "", false)
	f.Add("30C", "custom", "", "", "1.2mPas", "2%", "20C", "-0.02/K", "", true)
	f.Add("400K", "water", "1bar", "", "", "", "", "", "-h", false)
	f.Add("25", "oil", "0MPa", "1.5", "0cP", "90%", "1000K", "1/K", "-json=x extra", true)
	for _, c := range readUnitCases(f) {
		f.Add(c.input, "water", c.input, "", "", "", "", "", "", true)
		f.Add("25C", "custom", "", "", c.input, c.input, c.input, c.input, "", false)
	}
	f.Fuzz(func(t *testing.T, temp, medium, pressure, glycerol, visc, viscU, tref, tcoeff, extra string, asJSON bool) {
		var args []string
		for _, fv := range [][2]string{{"temp", temp}, {"medium", medium}, {"pressure", pressure}, {"glycerol", glycerol},
			{"visc", visc}, {"visc-u", viscU}, {"visc-tref", tref}, {"visc-tcoeff", tcoeff}} {
			if fv[1] != "" {
				args = append(args, "-"+fv[0], fv[1])
			}
		}
		if asJSON {
			args = append(args, "-json")
		}
		args = append(args, strings.Fields(extra)...)
		checkOutcome(t, "viscosity", args)
	})
}

// checkOutcome runs sizebudget cmd args and checks the outcome against the rules of every
// subcommand: on success something on stdout (one JSON object with -json) and nothing on stderr;
// for -h the usage on stderr; a usage error on two lines; a data error a *core.RangeError on one
// line; never anything on stdout on failure.
func checkOutcome(t *testing.T, cmd string, args []string) {
	t.Helper()
	stdout, stderr, err := runArgs(append([]string{cmd}, args...)...)
	var ue *usageError
	var re *core.RangeError
	switch {
	case errors.Is(err, flag.ErrHelp):
		if stdout != "" || !strings.HasPrefix(stderr, "usage: sizebudget "+cmd) {
			t.Fatalf("%q: help, but stdout %q, stderr %.40q", args, stdout, stderr)
		}
	case err == nil:
		if stdout == "" || stderr != "" {
			t.Fatalf("%q: success, but stdout %q, stderr %q", args, stdout, stderr)
		}
		if slices.Contains(args, "-json") && !slices.Contains(args, "-json=false") {
			var obj map[string]any
			if err := json.Unmarshal([]byte(stdout), &obj); err != nil || obj["medium"] == nil {
				t.Fatalf("%q: -json output %q: %v", args, stdout, err)
			}
		}
	case errors.As(err, &ue):
		checkUsageReport(t, err, "sizebudget "+cmd, "")
	case errors.As(err, &re):
		checkRangeReport(t, err, re.Field, re.Value, re.Min, re.Max)
	default:
		t.Fatalf("%q: error %v (%T) is neither a usage nor a range error", args, err, err)
	}
	if err != nil && stdout != "" {
		t.Fatalf("%q: wrote %q on stdout on failure", args, stdout)
	}
}
