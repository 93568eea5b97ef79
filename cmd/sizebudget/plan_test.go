package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"sizebudget/core"
	"sizebudget/uncertainty"
)

// planIssueKeys are the keys that issue 3 (item 6) requires of plan -json.
var planIssueKeys = []string{"radius_nm", "diffusion_um2_per_s", "viscosity_mPa_s", "coverage", "interval_nm",
	"shortest_interval_nm", "relative_expanded_uncertainty", "gum", "budget", "monte_carlo",
	"recommended_min_frames", "target_reachable", "warnings", "curve"}

// planKeys are every key of plan -json for a scenario without focal depth whose target is reachable.
var planKeys = append(slices.Clone(planIssueKeys), "format", "scenario", "temperature_K", "reduced_localisation_error",
	"blur_coefficient", "target_relative_expanded_uncertainty", "dominant_source", "histogram")

// demoFlags are flags that state every setting of the demo scenario (uncertainty.Demo) explicitly.
var demoFlags = []string{"-radius", "50nm", "-medium", "water", "-temp", "25C", "-temp-u", "0.5K", "-temp-dist", "rect",
	"-dims", "2", "-fps", "30fps", "-exposure", "10ms", "-frames", "60", "-tracks", "100", "-sigma", "40nm",
	"-pixel-u", "0.5%", "-estimator", "cve", "-coverage", "95%", "-target", "5%", "-trials", "0", "-seed", "1"}

// demoFile is the demo scenario as a document.
var demoFile = filepath.Join("testdata", "demo.json")

// runJSON runs sizebudget with args, which must succeed, and decodes its one JSON object.
func runJSON(t *testing.T, args ...string) map[string]any {
	t.Helper()
	stdout, stderr, err := runArgs(args...)
	if err != nil || stderr != "" {
		t.Fatalf("%q: err %v, stderr %q", args, err, stderr)
	}
	return decodeObject(t, stdout)
}

// toObject marshals v and decodes it as a JSON object, as the command line writes it.
func toObject(t *testing.T, v any) map[string]any {
	t.Helper()
	var b bytes.Buffer
	if err := writeJSON(&b, v); err != nil {
		t.Fatal(err)
	}
	return decodeObject(t, b.String())
}

// hasKeys checks that obj has at least the keys want.
func hasKeys(t *testing.T, where string, obj map[string]any, want ...string) {
	t.Helper()
	for _, k := range want {
		if _, ok := obj[k]; !ok {
			t.Errorf("%s lacks the key %q", where, k)
		}
	}
}

// checkPlanObject checks the issue-3 keys of a plan object and the relations between its figures:
// U/r is the half-width of interval_nm over the radius, the budget shares add up to 1 (both identities
// to 1e-12), the budget names only the sources of issue 3.
func checkPlanObject(t *testing.T, obj map[string]any) {
	t.Helper()
	hasKeys(t, "plan", obj, planIssueKeys...)
	gum, _ := obj["gum"].(map[string]any)
	hasKeys(t, "gum", gum, "relative_standard_uncertainty", "coverage_factor", "effective_dof", "interval_nm", "validated")
	mc, _ := obj["monte_carlo"].(map[string]any)
	hasKeys(t, "monte_carlo", mc, "trials", "seed", "engine")
	iv, _ := obj["interval_nm"].([]any)
	r, _ := obj["radius_nm"].(float64)
	if len(iv) != 2 {
		t.Fatalf("interval_nm = %v", obj["interval_nm"])
	}
	lo, hi := iv[0].(float64), iv[1].(float64)
	if u, _ := obj["relative_expanded_uncertainty"].(float64); !(lo < hi) || !closeTo(u, (hi-lo)/(2*r)) {
		t.Errorf("relative_expanded_uncertainty %v, interval [%g, %g], radius %g", u, lo, hi, r)
	}
	budget, _ := obj["budget"].([]any)
	shares := 0.0
	for _, b := range budget {
		src, _ := b.(map[string]any)
		hasKeys(t, "budget entry", src, "source", "relative_standard_uncertainty", "share")
		if name, _ := src["source"].(string); !slices.Contains([]string{"tracks", "temperature", "viscosity", "calibration", "drift"}, name) {
			t.Errorf("budget source %q", name)
		}
		s, _ := src["share"].(float64)
		shares += s
	}
	if len(budget) == 0 || math.Abs(shares-1) > 1e-12 {
		t.Errorf("budget %v: shares add up to %g", budget, shares)
	}
	curve, _ := obj["curve"].([]any)
	for _, p := range curve {
		hasKeys(t, "curve point", p.(map[string]any), "frames", "relative_expanded_uncertainty")
	}
}

// TestPlanJSONDemo runs plan -json on the demo scenario three ways (the -scenario file, flags alone
// stating every setting, no flags at all): each has the keys of issue 3, and all three give exactly
// what uncertainty.Plan computes for uncertainty.Demo() (same seed, so the same trials), apart from
// the name and note of the scenario.
func TestPlanJSONDemo(t *testing.T) {
	res, err := uncertainty.Plan(context.Background(), uncertainty.Demo(), uncertainty.PlanOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := toObject(t, res)
	for _, args := range [][]string{
		{"plan", "-json", "-scenario", demoFile},
		append([]string{"plan", "-json"}, demoFlags...),
		{"plan", "-json"},
	} {
		obj := runJSON(t, args...)
		checkKeys(t, obj, planKeys...)
		checkPlanObject(t, obj)
		if obj["target_reachable"] != true || obj["recommended_min_frames"] == nil {
			t.Errorf("%q: target_reachable %v, recommended_min_frames %v", args, obj["target_reachable"], obj["recommended_min_frames"])
		}
		got, wantScenario := obj["scenario"].(map[string]any), want["scenario"].(map[string]any)
		for _, k := range []string{"name", "note"} {
			if s, _ := got[k].(string); !strings.Contains(strings.ToLower(s), "invented") {
				t.Errorf("%q: scenario %s %q does not say it is invented", args, k, s)
			}
			delete(got, k)
		}
		delete(wantScenario, "name")
		delete(wantScenario, "note")
		if !reflect.DeepEqual(obj, want) {
			t.Errorf("%q: the output differs from uncertainty.Plan(Demo())", args)
		}
		want["scenario"] = wantScenario
	}
}

// TestPlanFlagsOverrideFile checks that flags change the fields of the -scenario file they set, and
// only those.
func TestPlanFlagsOverrideFile(t *testing.T) {
	path := filepath.Join("testdata", "scenarios", "custom-medium.json")
	obj := runJSON(t, "plan", "-json", "-scenario", path, "-frames", "25", "-temp", "30C", "-sigma", "30nm", "-trials", "1000", "-target", "0")
	checkPlanObject(t, obj)
	want := readScenario(t, "scenarios/custom-medium.json")
	want.Frames, want.TemperatureC, want.LocalisationNM, want.Trials, want.TargetRelU = 25, 30, 30, 1000, 0
	if got := obj["scenario"]; !reflect.DeepEqual(got, toObject(t, want)) {
		t.Errorf("scenario\n got %v\nwant %v", got, toObject(t, want))
	}
	if obj["target_reachable"] != nil || obj["recommended_min_frames"] != nil {
		t.Errorf("no target: target_reachable %v, recommended_min_frames %v", obj["target_reachable"], obj["recommended_min_frames"])
	}
}

// budgetEntry returns the budget line of the named source, or nil.
func budgetEntry(obj map[string]any, source string) map[string]any {
	for _, b := range obj["budget"].([]any) {
		if e := b.(map[string]any); e["source"] == source {
			return e
		}
	}
	return nil
}

// TestPlanViscosityUncertainty checks -visc-u with a modelled medium: not given, the water model's own
// relative uncertainty is in the budget; -visc-u 0 leaves the viscosity out of the budget while its
// temperature dependence stays in the temperature's sensitivity, c_T = 1/T − d ln η/dT (JCGM 100
// 5.1.3 applied to r = k_B·T/(6π·η(T)·D)); -visc-u 2% replaces the model's value.
func TestPlanViscosityUncertainty(t *testing.T) {
	const T = 298.15 // K, 25 °C by the definition of the degree Celsius
	water := core.Water{}
	dln, err := water.DLnEtaDT(T)
	if err != nil {
		t.Fatal(err)
	}
	cT := 1/T - dln
	base := []string{"plan", "-json", "-trials", "1000", "-target", "0"}
	for _, c := range []struct {
		args  []string
		relU  float64 // viscosity line of the budget; 0 = absent
		inDoc any     // viscosity_relative_u in the effective scenario
	}{
		{nil, water.RelativeUncertainty(T), nil},
		{[]string{"-visc-u", "0"}, 0, 0.0},
		{[]string{"-visc-u", "2%"}, 0.02, 0.02},
	} {
		obj := runJSON(t, append(base, c.args...)...)
		v := budgetEntry(obj, "viscosity")
		switch {
		case c.relU == 0 && v != nil:
			t.Errorf("%q: the budget has a viscosity line %v", c.args, v)
		case c.relU != 0 && (v == nil || !closeTo(v["relative_standard_uncertainty"].(float64), c.relU)):
			t.Errorf("%q: viscosity line %v, want relative u %g", c.args, v, c.relU)
		}
		if temp := budgetEntry(obj, "temperature"); temp == nil || !closeTo(temp["sensitivity"].(float64), cT) {
			t.Errorf("%q: temperature line %v, want sensitivity %g /K", c.args, temp, cT)
		}
		if got := obj["scenario"].(map[string]any)["viscosity_relative_u"]; got != c.inDoc {
			t.Errorf("%q: viscosity_relative_u = %v, want %v", c.args, got, c.inDoc)
		}
	}
}

// checkDataReport checks the report of a data error: status 1 and exactly one line on stderr that
// contains text.
func checkDataReport(t *testing.T, err error, text string) {
	t.Helper()
	var ue *usageError
	if err == nil || errors.As(err, &ue) || errors.Is(err, flag.ErrHelp) {
		t.Fatalf("error %v (%T), want a data error", err, err)
	}
	var errb bytes.Buffer
	status := exitStatus(err, &errb)
	msg := errb.String()
	if status != 1 || strings.Count(msg, "\n") != 1 || !strings.HasPrefix(msg, "sizebudget: ") || !strings.Contains(msg, text) {
		t.Errorf("status %d, stderr %q; want 1 and one line containing %q", status, msg, text)
	}
	if strings.Contains(msg, "panic") || strings.Contains(msg, "goroutine") {
		t.Errorf("stderr looks like a panic: %q", msg)
	}
}

// checkFieldReport checks a data error that names a scenario field: a *uncertainty.FieldError or a
// *core.RangeError whose Field is field, reported on one line as "field = value …".
func checkFieldReport(t *testing.T, err error, field string) {
	t.Helper()
	var fe *uncertainty.FieldError
	var re *core.RangeError
	switch {
	case errors.As(err, &fe):
		if fe.Field != field || fe.Allowed == "" {
			t.Errorf("FieldError %+v, want field %s", *fe, field)
		}
	case errors.As(err, &re):
		if re.Field != field {
			t.Errorf("RangeError %+v, want field %s", *re, field)
		}
	default:
		t.Errorf("error %v (%T) names no field", err, err)
	}
	checkDataReport(t, err, field+" = ")
}

// TestPlanBadInput runs plan on bad input of every kind: each is refused with status 2 (usage) or 1
// (data) and a message naming the flag or field, nothing on stdout, no panic.
func TestPlanBadInput(t *testing.T) {
	scenario := func(name string) string { return filepath.Join("testdata", "scenarios", name) }
	for _, c := range []struct {
		args  []string
		usage string // the usage message contains this; "" for a data error
		field string // the field a data error names; "" for a file error
		text  string // a data error's message contains this
	}{
		{args: []string{"-temp", "25F"}, usage: `invalid value "25F" for flag -temp: unknown unit "F"`},
		{args: []string{"-sigma", "40"}, usage: `invalid value "40" for flag -sigma: "40" has no unit`},
		{args: []string{"-frames", "many"}, usage: `invalid value "many" for flag -frames`},
		{args: []string{"-estimator", "mle"}, usage: `invalid value "mle" for flag -estimator: want one of cve, known-noise, msd`},
		{args: []string{"-engine", "fast"}, usage: `invalid value "fast" for flag -engine`},
		{args: []string{"-radius", "50nm", "-diffusion", "4.9um2/s"}, usage: "give one of -radius and -diffusion, not both"},
		{args: []string{"-interval", "20ms", "-fps", "50fps"}, usage: "give one of -interval and -fps, not both"},
		{args: []string{"-medium", "glycerol"}, usage: "-medium glycerol needs -glycerol"},
		{args: []string{"-workers", "-2"}, usage: "-workers -2"},
		{args: []string{"-svg", "a.svg", "-curve-svg", "a.svg"}, usage: "name the same file"},
		{args: []string{"-svg"}, usage: "flag needs an argument: -svg"},
		{args: []string{"extra"}, usage: `unexpected argument "extra"`},
		{args: []string{"-temp", "400C"}, field: "temperature_C", text: "allowed: [-50, 300]"},
		{args: []string{"-temp", "120C", "-temp-u", "0K"}, field: "temperature_K", text: "outside the allowed range [273.15, "},
		{args: []string{"-exposure", "50ms"}, field: "exposure_s", text: "the exposure cannot exceed the frame interval"},
		{args: []string{"-frames", "2"}, field: "frames", text: "3 to 100000 positions per track"},
		{args: []string{"-frames", "3", "-estimator", "msd"}, field: "frames", text: "MSD fit"},
		{args: []string{"-tracks", "0"}, field: "tracks", text: "tracks = 0"},
		{args: []string{"-dims", "4"}, field: "dims", text: "1, 2 or 3"},
		{args: []string{"-trials", "999"}, field: "trials", text: "trials = 999"},
		{args: []string{"-coverage", "100%"}, field: "coverage", text: "coverage = 1 "},
		{args: []string{"-target", "150%"}, field: "target_relative_expanded_uncertainty", text: "= 1.5"},
		{args: []string{"-visc-u", "50%"}, field: "viscosity_relative_u", text: "[0, 0.15]"},
		{args: []string{"-temp-u", "25K"}, field: "temperature_u_K", text: "[0, 20]"},
		{args: []string{"-radius", "-5nm"}, field: "radius_nm", text: "radius_nm = -5"},
		{args: []string{"-pressure", "0bar"}, field: "pressure_MPa", text: "pressure_MPa = 0"},
		{args: []string{"-medium", "glycerol", "-glycerol", "1.5"}, field: "glycerol_mass_fraction", text: "= 1.5"},
		{args: []string{"-estimator", "msd", "-engine", "spectral"}, field: "engine", text: `engine = "spectral"`},
		{args: []string{"-scenario", scenario("bad-json.json")}, text: "bad-json.json: scenario: not a JSON object"},
		{args: []string{"-scenario", scenario("unknown-field.json")}, text: `unknown field "colour"`},
		{args: []string{"-scenario", scenario("future-version.json")}, text: `format = "sizebudget/scenario/9" is newer than this version reads`},
		{args: []string{"-scenario", scenario("no-format.json")}, text: `field "format" is missing`},
		{args: []string{"-scenario", scenario("exposure-too-long.json")}, field: "exposure_s", text: "exposure-too-long.json: exposure_s = 0.05"},
		{args: []string{"-scenario", scenario("does-not-exist.json")}, text: "reading the scenario"},
	} {
		stdout, _, err := runArgs(append([]string{"plan"}, c.args...)...)
		if stdout != "" {
			t.Errorf("%q: wrote %q on stdout on failure", c.args, stdout)
		}
		switch {
		case c.usage != "":
			checkUsageReport(t, err, "sizebudget plan", c.usage)
		case c.field != "":
			checkFieldReport(t, err, c.field)
			checkDataReport(t, err, c.text)
		default:
			checkDataReport(t, err, c.text)
		}
	}
}

// TestPlanReport checks the readable report against golden files (keys, labels and layout; the
// figures are those of the JSON, checked above): the demo, an unreachable target and a focal depth.
func TestPlanReport(t *testing.T) {
	for _, c := range []struct {
		golden string
		args   []string
	}{
		{"plan_demo.txt", []string{"-scenario", demoFile}},
		{"plan_unreachable.txt", []string{"-target", "2%", "-trials", "1000"}},
		{"plan_focus.txt", []string{"-focus-depth", "1um", "-frames", "20", "-target", "10%", "-trials", "1000"}},
	} {
		stdout, stderr, err := runArgs(append([]string{"plan"}, c.args...)...)
		if err != nil || stderr != "" {
			t.Fatalf("%q: err %v, stderr %q", c.args, err, stderr)
		}
		for line := range strings.Lines(stdout) {
			if strings.HasSuffix(strings.TrimSuffix(line, "\n"), " ") {
				t.Errorf("%s: trailing space in %q", c.golden, line)
			}
		}
		checkGolden(t, c.golden, stdout)
	}
	stdout, _, _ := runArgs("plan", "-target", "2%", "-trials", "1000")
	if !strings.Contains(stdout, "unreachable: the sources that do not shrink with frames") {
		t.Errorf("the unreachable report does not say why:\n%s", stdout)
	}
}

// TestPlanCharts checks -svg and -curve-svg: two SVG documents with their titles; a curve that cannot
// be drawn (recorded track lengths: no planner) is a data error that writes no file.
func TestPlanCharts(t *testing.T) {
	dir := t.TempDir()
	hist, curve := filepath.Join(dir, "hist.svg"), filepath.Join(dir, "curve.svg")
	if _, _, err := runArgs("plan", "-trials", "1000", "-svg", hist, "-curve-svg", curve); err != nil {
		t.Fatal(err)
	}
	for path, title := range map[string]string{hist: "Monte Carlo distribution of the radius (1000 trials)", curve: "Relative expanded uncertainty with 100 tracks"} {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if s := string(b); !strings.HasPrefix(s, "<svg") || !strings.Contains(s, "<title>"+title+"</title>") {
			t.Errorf("%s: %.120q… lacks the title %q", filepath.Base(path), s, title)
		}
	}
	none := filepath.Join(dir, "none.svg")
	stdout, _, err := runArgs("plan", "-scenario", filepath.Join("testdata", "scenarios", "track-lengths.json"), "-curve-svg", none)
	checkDataReport(t, err, "no frames curve")
	if _, serr := os.Stat(none); stdout != "" || !errors.Is(serr, os.ErrNotExist) {
		t.Errorf("stdout %q, file: %v", stdout, serr)
	}
}

// TestPlanInterrupted checks that a cancelled context (Ctrl-C) stops the Monte Carlo with a data error
// and writes nothing.
func TestPlanInterrupted(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out, errb bytes.Buffer
	err := planCommand(ctx, []string{"-json"}, &out, &errb)
	checkDataReport(t, err, "interrupted")
	if out.Len() != 0 {
		t.Errorf("wrote %q", out.String())
	}
}

// TestPlanBinaryInterrupt runs the built command on a long adaptive Monte Carlo (1000 positions per
// track, about a minute) and interrupts it as Ctrl-C would: it must stop, exit with status 1 and say
// so on one line, with nothing on stdout.
func TestPlanBinaryInterrupt(t *testing.T) {
	bin := builtBinary(t)
	cmd := exec.Command(bin, "plan", "-frames", "1000", "-target", "0", "-json")
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(time.Second) // long enough for the signal handler to be installed, far shorter than the run
	if err := cmd.Process.Signal(os.Interrupt); err != nil {
		t.Fatal(err)
	}
	err := cmd.Wait()
	var exit *exec.ExitError
	if !errors.As(err, &exit) || exit.ExitCode() != 1 || out.Len() != 0 ||
		errb.String() != "sizebudget: interrupted: the Monte Carlo was stopped before it finished; nothing was written\n" {
		t.Errorf("err %v, stdout %d bytes, stderr %q", err, out.Len(), errb.String())
	}
}

// TestPlanHelp checks that -h names every flag, says where the defaults come from and lists the JSON
// keys of issue 3.
func TestPlanHelp(t *testing.T) {
	stdout, stderr, err := runArgs("plan", "-h")
	if !errors.Is(err, flag.ErrHelp) || stdout != "" {
		t.Fatalf("err %v, stdout %q", err, stdout)
	}
	want := []string{"usage: sizebudget plan ", "the fields not given are those of the", "invented demo scenario",
		"(demo 25C)", "(demo 50nm)", "exit status:", TemperatureDifference.Accepted}
	for _, f := range []string{"scenario", "radius", "diffusion", "medium", "glycerol", "visc", "visc-u", "temp", "temp-u",
		"temp-dist", "dims", "interval", "fps", "exposure", "frames", "tracks", "sigma", "pixel-u", "drift", "drift-removed",
		"focus-depth", "estimator", "coverage", "target", "trials", "seed", "engine", "workers", "json", "svg", "curve-svg"} {
		want = append(want, "\n  -"+f+" ")
	}
	want = append(want, planIssueKeys...)
	for _, w := range want {
		if !strings.Contains(stderr, w) && !strings.Contains(stderr, strings.TrimSuffix(w, " ")+"\n") {
			t.Errorf("plan -h lacks %q", w)
		}
	}
}

// checkEngineOutcome runs sizebudget cmd args and checks the outcome against the rules of every
// subcommand (see checkOutcome), where a data error may also be a *uncertainty.FieldError or a file
// error on one line, and a -json success is one object of the subcommand's format.
func checkEngineOutcome(t *testing.T, cmd string, args []string) {
	t.Helper()
	stdout, stderr, err := runArgs(append([]string{cmd}, args...)...)
	var ue *usageError
	var re *core.RangeError
	var fe *uncertainty.FieldError
	switch {
	case errors.Is(err, flag.ErrHelp):
		if stdout != "" || !strings.HasPrefix(stderr, "usage: sizebudget "+cmd) {
			t.Fatalf("%q: help, but stdout %q, stderr %.40q", args, stdout, stderr)
		}
	case err == nil:
		if stdout == "" || stderr != "" {
			t.Fatalf("%q: success, but stdout %q, stderr %q", args, stdout, stderr)
		}
		var obj map[string]any
		if json.Unmarshal([]byte(stdout), &obj) == nil && obj["format"] != "sizebudget/"+cmd+"/1" {
			t.Fatalf("%q: JSON output of format %v", args, obj["format"])
		}
	case errors.As(err, &ue):
		checkUsageReport(t, err, "sizebudget "+cmd, "")
	case errors.As(err, &fe):
		checkFieldReport(t, err, fe.Field)
	case errors.As(err, &re):
		checkFieldReport(t, err, re.Field)
	default:
		checkDataReport(t, err, "")
	}
	if err != nil && stdout != "" {
		t.Fatalf("%q: wrote %q on stdout on failure", args, stdout)
	}
}

// FuzzPlanArgs runs plan on command lines made of fuzzed flag values (an empty value leaves the flag
// out) and fuzzed extra arguments; see checkEngineOutcome for the rules. To keep every run short the
// Monte Carlo has 1000 trials on the spectral engine, frames and tracks stay below 256 and a valid
// target is replaced by 0 (no planner search); extra arguments that write files are skipped.
func FuzzPlanArgs(f *testing.F) {
	f.Add("50nm", "", "25C", "0.5K", "33ms", "10ms", "40nm", "20%", "cve", uint8(60), uint8(100), "", true)
	f.Add("", "4.9um2/s", "20C", "0K", "20ms", "0s", "0nm", "0", "known-noise", uint8(10), uint8(5), "-temp-dist normal", true)
	f.Add("0.1um", "", "300K", "1C", "50ms", "50ms", "100nm", "25%", "cve", uint8(5), uint8(2), "-medium glycerol -glycerol 60%", false)
	f.Add("50nm", "", "25C", "0.2K", "10ms", "20ms", "40nm", "", "msd", uint8(2), uint8(0), "-dims 3", true)
	f.Add("50nm", "4.9um2/s", "25", "-1K", "0s", "", "NaNnm", "150%", "mle", uint8(255), uint8(255), "-h", false)
	f.Add("1e308m", "", "1e9K", "30K", "1e-300s", "1ms", "1e5nm", "0.2", "cve", uint8(4), uint8(2), "-visc-u 0 -focus-depth 1um", true)
	f.Add("50nm", "", "25C", "0.5K", "33ms", "10ms", "40nm", "", "cve", uint8(20), uint8(20), "-scenario testdata/demo.json -json=false", false)
	f.Fuzz(func(t *testing.T, radius, diff, temp, tempU, interval, exposure, sigma, target, estimator string, frames, tracks uint8, extra string, asJSON bool) {
		var args []string
		for _, fv := range [][2]string{{"radius", radius}, {"diffusion", diff}, {"temp", temp}, {"temp-u", tempU},
			{"interval", interval}, {"exposure", exposure}, {"sigma", sigma}, {"target", target}, {"estimator", estimator}} {
			if fv[1] != "" {
				args = append(args, "-"+fv[0], fv[1])
			}
		}
		fields := strings.Fields(extra)
		for _, a := range fields {
			if strings.Contains(a, "svg") || strings.Contains(a, "target") || strings.Contains(a, "engine") ||
				strings.Contains(a, "trials") || strings.Contains(a, "frames") || strings.Contains(a, "tracks") {
				t.Skip("extra arguments that write files or change the cost")
			}
		}
		args = append(args, fields...)
		if asJSON {
			args = append(args, "-json")
		}
		// Last, so that they hold whatever came before (a flag given twice keeps its last value).
		args = append(args, "-frames", strconv.Itoa(int(frames)), "-tracks", strconv.Itoa(int(tracks)), "-trials", "1000", "-engine", "spectral")
		if x, err := Fraction.Parse(target); err == nil && x > 0 {
			// A valid target is parsed, then turned off: the planner's search can need seconds when
			// noise dominates (its own tests are in TestPlanJSONDemo and package uncertainty).
			args = append(args, "-target", "0")
		}
		checkEngineOutcome(t, "plan", args)
	})
}
