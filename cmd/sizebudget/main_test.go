package main

import (
	"bytes"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"

	"sizebudget/core"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/golden")

// runArgs runs the command line args (without the program name) and returns what it wrote.
func runArgs(args ...string) (stdout, stderr string, err error) {
	var out, errb bytes.Buffer
	err = run(args, &out, &errb)
	return out.String(), errb.String(), err
}

// numberPattern matches a number as written in JSON or in a table.
var numberPattern = regexp.MustCompile(`[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?`)

// skeleton replaces every number of s by # and every run of spaces by one space: the layout, keys,
// labels and units of an output, without the physics values (which core's tests check, and which
// the tests here compare with core directly).
func skeleton(s string) string {
	return strings.Join(strings.Fields(numberPattern.ReplaceAllString(s, "#")), " ")
}

// checkGolden compares the skeleton of got with that of testdata/golden/name; with -update it
// rewrites the file instead. The golden files keep the full output, as an example for readers.
func checkGolden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", "golden", name)
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if skeleton(got) != skeleton(string(want)) {
		t.Errorf("output differs from %s in its keys, labels or layout (go test -update rewrites it)\ngot:\n%s\nwant:\n%s", path, got, want)
	}
}

// closeTo reports whether got agrees with want to 1e-12 relative (the tolerance of analytic
// identities: the command line must print exactly what core computes, up to unit scaling).
func closeTo(got, want float64) bool { return closeRel(got, want, 1e-12) }

// checkRangeReport checks the report of a data error: exactly one line, "sizebudget: " and the
// *core.RangeError's message, naming its field, the value and the allowed range.
func checkRangeReport(t *testing.T, err error, field string, value, lo, hi float64) {
	t.Helper()
	var re *core.RangeError
	if !errors.As(err, &re) {
		t.Fatalf("error %v (%T) is not a *core.RangeError", err, err)
	}
	same := func(x, y float64) bool { return x == y || closeTo(x, y) }
	if re.Field != field || !same(re.Value, value) || !same(re.Min, lo) || !same(re.Max, hi) {
		t.Errorf("RangeError %+v, want field %s, value %g, range [%g, %g]", *re, field, value, lo, hi)
	}
	var errb bytes.Buffer
	if status := exitStatus(err, &errb); status != 1 {
		t.Errorf("exit status %d for %v, want 1", status, err)
	}
	msg := errb.String()
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }
	if strings.Count(msg, "\n") != 1 || !strings.HasSuffix(msg, "\n") || !strings.HasPrefix(msg, "sizebudget: "+field+" = "+g(value)+" is outside the allowed range ["+g(lo)+", "+g(hi)+"]") {
		t.Errorf("stderr %q is not one line naming %s = %s and the range [%s, %s]", msg, field, g(value), g(lo), g(hi))
	}
}

// checkUsageReport checks that err is a usage error of cmd whose message contains text, reported
// with exit status 2 on two lines (the message and a pointer to -h).
func checkUsageReport(t *testing.T, err error, cmd, text string) {
	t.Helper()
	var ue *usageError
	if !errors.As(err, &ue) {
		t.Fatalf("error %v (%T) is not a usage error", err, err)
	}
	var errb bytes.Buffer
	if status := exitStatus(err, &errb); status != 2 {
		t.Errorf("exit status %d, want 2", status)
	}
	lines := strings.Split(strings.TrimSuffix(errb.String(), "\n"), "\n")
	if len(lines) != 2 || !strings.HasPrefix(lines[0], cmd+": ") || !strings.Contains(lines[0], text) || lines[1] != "run '"+cmd+" -h' for usage" {
		t.Errorf("stderr %q: want %q… containing %q, then the -h hint", errb.String(), cmd+": ", text)
	}
}

func TestRunDispatch(t *testing.T) {
	_, _, err := runArgs()
	checkUsageReport(t, err, "sizebudget", "missing command: one of "+commandList())
	_, _, err = runArgs("sizes")
	checkUsageReport(t, err, "sizebudget", `unknown command "sizes"`)

	for _, h := range [][]string{{"-h"}, {"help"}, {"--help"}} {
		stdout, stderr, err := runArgs(h...)
		if !errors.Is(err, flag.ErrHelp) || stdout != "" {
			t.Errorf("%v: err %v, stdout %q", h, err, stdout)
		}
		for name, c := range commands {
			if !strings.Contains(stderr, "  "+name) || !strings.Contains(stderr, c.help) {
				t.Errorf("%v: the list of commands lacks %s: %q", h, name, stderr)
			}
		}
	}
	_, stderr, err := runArgs("help", "viscosity")
	if !errors.Is(err, flag.ErrHelp) || !strings.HasPrefix(stderr, "usage: sizebudget viscosity ") {
		t.Errorf("help viscosity: err %v, stderr starts %.40q", err, stderr)
	}
	stdout, _, err := runArgs("viscosity", "-temp", "25C")
	if err != nil || !strings.Contains(stdout, "mPa·s") {
		t.Errorf("viscosity -temp 25C: err %v, stdout %q", err, stdout)
	}
}

// TestEveryCommandHelps runs "-h" on every command of the table, those added later included: each
// must print its usage on stderr, nothing on stdout, and exit 0.
func TestEveryCommandHelps(t *testing.T) {
	if len(commands) < 2 {
		t.Fatalf("only %d commands", len(commands))
	}
	for name, c := range commands {
		if c.help == "" || strings.Contains(c.help, "\n") {
			t.Errorf("%s: help %q is not one line", name, c.help)
		}
		for _, h := range []string{"-h", "-help"} {
			var out, errb bytes.Buffer
			status := runMain([]string{name, h}, &out, &errb)
			if status != 0 || out.Len() != 0 || !strings.HasPrefix(errb.String(), "usage: sizebudget "+name+" ") ||
				!strings.Contains(errb.String(), "exit status:") {
				t.Errorf("%s %s: status %d, stdout %q, stderr starts %.60q", name, h, status, out.String(), errb.String())
			}
		}
	}
}

func TestExitStatus(t *testing.T) {
	var errb bytes.Buffer
	if s := exitStatus(nil, &errb); s != 0 || errb.Len() != 0 {
		t.Errorf("nil: status %d, stderr %q", s, errb.String())
	}
	if s := exitStatus(flag.ErrHelp, &errb); s != 0 || errb.Len() != 0 {
		t.Errorf("ErrHelp: status %d, stderr %q", s, errb.String())
	}
	ue := &usageError{Cmd: "sizebudget plan", Err: errors.New("missing -target")}
	checkUsageReport(t, ue, "sizebudget plan", "missing -target")
	checkUsageReport(t, errors.Join(errors.New("context"), ue), "sizebudget plan", "missing -target")
	// A range error, as core builds it (the example of the task: water's boiling point at ambient
	// pressure, 373.124 K, IAPWS-IF97 region 4 as computed by core).
	checkRangeReport(t, &core.RangeError{Field: "temperature_K", Value: 400, Min: 273.15, Max: 373.124, Why: "liquid water"},
		"temperature_K", 400, 273.15, 373.124)
	// Any other error is a data error, on one line even if its text has several.
	errb.Reset()
	if s := exitStatus(errors.New("first\nsecond"), &errb); s != 1 || errb.String() != "sizebudget: first second\n" {
		t.Errorf("plain error: status %d, stderr %q", s, errb.String())
	}
}

func TestRunMainRecoversPanic(t *testing.T) {
	commands["explode"] = command{func([]string, io.Writer, io.Writer) error { panic("boom\nat line two") }, "test only"}
	defer delete(commands, "explode")
	var out, errb bytes.Buffer
	status := runMain([]string{"explode"}, &out, &errb)
	if status != 3 || errb.String() != "sizebudget: internal error (please report it): boom at line two\n" {
		t.Errorf("status %d, stderr %q", status, errb.String())
	}
}

func TestQuantityFlag(t *testing.T) {
	fs := newFlagSet("test", "[flags]", "A test.", io.Discard)
	temp := defineQuantity(fs, "temp", Temperature, "25C", "`temperature`")
	size := defineQuantity(fs, "size", Length, "", "`size`")
	if temp.IsSet() || temp.SI() != 298.15 || temp.String() != "25C" || size.IsSet() || size.SI() != 0 {
		t.Errorf("defaults: temp %v %g %q, size %v %g", temp.IsSet(), temp.SI(), temp.String(), size.IsSet(), size.SI())
	}
	if err := parseFlags(fs, []string{"-size", " 50 nm "}); err != nil {
		t.Fatal(err)
	}
	// 50 nm = 5e-8 m exactly by the prefix (SI brochure); Get returns the SI value.
	if !size.IsSet() || size.SI() != 5e-8 || size.String() != "50 nm" || size.Get().(float64) != 5e-8 || temp.IsSet() {
		t.Errorf("after -size: %v %g %q", size.IsSet(), size.SI(), size.String())
	}
	if !givenFlags(fs)["size"] || givenFlags(fs)["temp"] {
		t.Errorf("givenFlags = %v", givenFlags(fs))
	}
	var help bytes.Buffer
	fs.SetOutput(&help)
	fs.Usage()
	for _, want := range []string{"usage: sizebudget test [flags]", "-temp temperature", "(default 25C)", "-size size", Temperature.Accepted, Length.Accepted} {
		if !strings.Contains(help.String(), want) {
			t.Errorf("usage lacks %q:\n%s", want, help.String())
		}
	}
	func() {
		defer func() {
			if r := recover(); r == nil || !strings.HasPrefix(r.(string), "sizebudget: default of -bad") {
				t.Errorf("bad default: recover() = %v", r)
			}
		}()
		defineQuantity(fs, "bad", Length, "50", "")
	}()
}

func TestChoiceFlag(t *testing.T) {
	fs := newFlagSet("test", "", "", io.Discard)
	c := defineChoice(fs, "medium", "water", mediumNames, "")
	err := parseFlags(fs, []string{"-medium", "oil"})
	checkUsageReport(t, err, "sizebudget test", `invalid value "oil" for flag -medium: want one of water, glycerol, custom`)
	if err := parseFlags(fs, []string{"-medium", "glycerol"}); err != nil || c.Value() != "glycerol" || c.String() != "glycerol" {
		t.Errorf("err %v, value %q", err, c.Value())
	}
}

func TestWriteJSONRefusesNaN(t *testing.T) {
	var out bytes.Buffer
	if err := writeJSON(&out, map[string]float64{"x": math.NaN()}); err == nil || out.Len() != 0 {
		t.Errorf("err %v, wrote %q", err, out.String())
	}
	if err := checkFinite(map[string]float64{"a": 1, "b": math.Inf(1)}); err == nil || !strings.Contains(err.Error(), "b is +Inf") {
		t.Errorf("checkFinite: %v", err)
	}
}

// builtBinary builds the command once per test run (skipped with -short or without a go command)
// and returns the path of the binary.
func builtBinary(t *testing.T) string {
	t.Helper()
	if testing.Short() {
		t.Skip("builds the binary")
	}
	binOnce.Do(func() {
		goTool, err := exec.LookPath("go")
		if err != nil {
			binErr = errSkipBuild
			return
		}
		dir, err := os.MkdirTemp("", "sizebudget-test-")
		if err != nil {
			binErr = err
			return
		}
		binPath = filepath.Join(dir, "sizebudget")
		if out, err := exec.Command(goTool, "build", "-o", binPath, ".").CombinedOutput(); err != nil {
			binErr = fmt.Errorf("go build: %v\n%s", err, out)
		}
	})
	if binErr == errSkipBuild {
		t.Skip("no go command in PATH")
	}
	if binErr != nil {
		t.Fatal(binErr)
	}
	return binPath
}

// TestMain removes the binary builtBinary made, if any.
func TestMain(m *testing.M) {
	code := m.Run()
	if binPath != "" {
		os.RemoveAll(filepath.Dir(binPath))
	}
	os.Exit(code)
}

var (
	binOnce      sync.Once
	binPath      string
	binErr       error
	errSkipBuild = errors.New("no go command")
)

// TestBinaryExitCodes builds the command and runs it as a process: the exit status must be 2 for bad
// usage and 1 for a value out of range, and nothing on stderr may look like a Go panic.
func TestBinaryExitCodes(t *testing.T) {
	bin := builtBinary(t)
	for _, c := range []struct {
		args   []string
		status int
		stderr string // a text stderr must contain
	}{
		{nil, 2, "missing command"},
		{[]string{"sizes"}, 2, "unknown command"},
		{[]string{"viscosity"}, 2, "missing -temp"},
		{[]string{"viscosity", "-temp", "25"}, 2, "K, C, °C or degC"},
		{[]string{"viscosity", "-temp", "25C", "-nope"}, 2, "-nope"},
		{[]string{"viscosity", "-temp", "NaNC"}, 2, "not a finite number"},
		{[]string{"viscosity", "-temp", "\xff\xfe"}, 2, "does not start with a number"},
		{[]string{"diffusion", "-temp", "25C"}, 2, "exactly one of -radius"},
		{[]string{"viscosity", "-temp", "400K"}, 1, "temperature_K = 400 is outside the allowed range [273.15, 373.124]"},
		{[]string{"diffusion", "-temp", "25C", "-radius", "50m"}, 1, "radius_nm = 5e+10 is outside the allowed range"},
		{[]string{"diffusion", "-temp", "25C", "-diffusion", "0.5um2/s", "-wall-distance", "200nm"}, 1, "diffusion_um2_per_s = 0.5"},
		{[]string{"viscosity", "-h"}, 0, "usage: sizebudget viscosity"},
		{[]string{"diffusion", "-temp", "25C", "-radius", "50nm"}, 0, ""},
	} {
		cmd := exec.Command(bin, c.args...)
		var out, errb bytes.Buffer
		cmd.Stdout, cmd.Stderr = &out, &errb
		err := cmd.Run()
		status := 0
		var exit *exec.ExitError
		if errors.As(err, &exit) {
			status = exit.ExitCode()
		} else if err != nil {
			t.Fatalf("%v: %v", c.args, err)
		}
		stderr := errb.String()
		if status != c.status || !strings.Contains(stderr, c.stderr) {
			t.Errorf("%q: status %d, stderr %q; want status %d and %q", c.args, status, stderr, c.status, c.stderr)
		}
		if strings.Contains(stderr, "goroutine") || strings.Contains(stderr, "panic") {
			t.Errorf("%q: stderr looks like a panic: %q", c.args, stderr)
		}
		if c.status == 1 && strings.Count(stderr, "\n") != 1 {
			t.Errorf("%q: a data error must be one line, got %q", c.args, stderr)
		}
		if c.status != 0 && out.Len() != 0 {
			t.Errorf("%q: wrote %q on stdout on failure", c.args, out.String())
		}
	}
}
