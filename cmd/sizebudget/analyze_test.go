package main

import (
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"sizebudget/trackfile"
	"sizebudget/uncertainty"
)

// The invented demo files of the repository: the scenario and the track file simulate wrote from it.
var (
	demoScenarioFile = filepath.Join("..", "..", "testdata", "scenarios", "demo.json")
	demoTracksFile   = filepath.Join("..", "..", "testdata", "tracks", "demo.csv")
)

// analyzeJSON runs analyze with args and -json and decodes its output both as the report and as a
// generic map (for the keys).
func analyzeJSON(t *testing.T, args ...string) (analyzeReport, map[string]any) {
	t.Helper()
	stdout, stderr, err := runArgs(append([]string{"analyze", "-json"}, args...)...)
	if err != nil {
		t.Fatalf("analyze %v: %v (stderr %q)", args, err, stderr)
	}
	var rep analyzeReport
	if err := json.Unmarshal([]byte(stdout), &rep); err != nil {
		t.Fatalf("output is not the report: %v\n%s", err, stdout)
	}
	var keys map[string]any
	if err := json.Unmarshal([]byte(stdout), &keys); err != nil {
		t.Fatal(err)
	}
	return rep, keys
}

// TestAnalyzeDemoFile analyses the invented demo track file with the demo scenario: the output has the
// keys the command promises, the numbers are exactly what uncertainty.Analyze computes from the file
// read by trackfile, and the interval holds the radius the file was simulated with (50 nm, the demo
// scenario's; the file's header says so).
func TestAnalyzeDemoFile(t *testing.T) {
	rep, keys := analyzeJSON(t, "-tracks", demoTracksFile, "-scenario", demoScenarioFile, "-trials", "2000", "-workers", "1")
	for _, k := range []string{"radius_nm", "interval_nm", "diffusion_um2_per_s", "localisation_nm", "tracks_used",
		"tracks_dropped", "displacements", "drift_um_per_s", "warnings", "free_diffusion", "track_radii", "plan", "tracks_file"} {
		if _, ok := keys[k]; !ok {
			t.Errorf("the JSON has no key %q", k)
		}
	}
	if !(rep.IntervalNM[0] <= 50 && 50 <= rep.IntervalNM[1]) {
		t.Errorf("interval %v nm does not hold the simulated 50 nm", rep.IntervalNM)
	}
	if rep.TracksUsed != 100 || rep.TracksDropped != 0 || rep.Displacements != 5900 || rep.File.Rows != 6000 ||
		rep.File.Unit != "um" || !strings.HasPrefix(rep.File.Notes[0], "INVENTED") {
		t.Errorf("report %+v, file %+v", rep.Analysis, rep.File)
	}

	// The same analysis through the packages.
	data, err := os.ReadFile(demoScenarioFile)
	if err != nil {
		t.Fatal(err)
	}
	s, err := uncertainty.ParseScenario(data)
	if err != nil {
		t.Fatal(err)
	}
	s.Trials = 2000
	f, err := os.Open(demoTracksFile)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r, err := trackfile.NewReader(f, trackfile.Options{Interval: s.FrameIntervalS})
	if err != nil {
		t.Fatal(err)
	}
	a, err := uncertainty.Analyze(context.Background(), r, s, uncertainty.PlanOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if a.RadiusNM != rep.RadiusNM || a.IntervalNM != rep.IntervalNM || a.DiffusionUM2PerS != rep.DiffusionUM2PerS ||
		a.LocalisationNM != rep.LocalisationNM || a.DriftUMPerS != rep.DriftUMPerS {
		t.Errorf("command %v %v, package %v %v", rep.RadiusNM, rep.IntervalNM, a.RadiusNM, a.IntervalNM)
	}
}

// TestSimulateAnalyzeRoundTrip writes invented tracks with simulate — 3-D, in nm, tracks of three
// lengths, in a glycerol mixture, with a drift — and analyses them with the same settings: the
// interval holds the simulated radius and the drift is found and corrected.
func TestSimulateAnalyzeRoundTrip(t *testing.T) {
	dir := t.TempDir()
	s := uncertainty.Demo()
	s.Name, s.Note = "round trip (invented)", "INVENTED for a test"
	s.RadiusNM, s.Medium, s.GlycerolMassFraction, s.Dims = 80, "glycerol", 0.2, 3
	s.TrackLengths = []uncertainty.LengthGroup{{Frames: 12, Count: 40}, {Frames: 30, Count: 30}, {Frames: 80, Count: 10}}
	s.Frames, s.Tracks = 80, 80
	s.DriftUMPerS, s.LocalisationNM, s.Seed, s.TargetRelU = 3, 25, 7, 0
	doc, err := s.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	scen := filepath.Join(dir, "scenario.json")
	if err := os.WriteFile(scen, doc, 0o644); err != nil {
		t.Fatal(err)
	}
	tracks := filepath.Join(dir, "tracks.csv")
	stdout, _, err := runArgs("simulate", "-scenario", scen, "-unit", "nm", "-o", tracks)
	if err != nil || !strings.Contains(stdout, "wrote 80 tracks, 2180 positions") {
		t.Fatalf("simulate: %v, %q", err, stdout)
	}
	rep, _ := analyzeJSON(t, "-tracks", tracks, "-scenario", scen, "-trials", "2000", "-workers", "1")
	if !(rep.IntervalNM[0] <= 80 && 80 <= rep.IntervalNM[1]) {
		t.Errorf("interval %v nm does not hold the simulated 80 nm", rep.IntervalNM)
	}
	if rep.Dims != 3 || rep.TracksUsed != 80 || rep.File.Unit != "nm" || !rep.Drift.Corrected {
		t.Errorf("dims %d, %d tracks, unit %s, drift %+v", rep.Dims, rep.TracksUsed, rep.File.Unit, rep.Drift)
	}
	groups := rep.Plan.Scenario.TrackLengths
	if len(groups) != 3 || groups[0] != (uncertainty.LengthGroup{Frames: 12, Count: 40}) || groups[2] != (uncertainty.LengthGroup{Frames: 80, Count: 10}) {
		t.Errorf("the engine's track lengths %v are not the simulated ones", groups)
	}
}

// TestAnalyzeFlagsOnly gives the conditions as flags: the result is that of the scenario file with
// the same conditions, and an uncertainty not given is warned about.
func TestAnalyzeFlagsOnly(t *testing.T) {
	args := []string{"-tracks", demoTracksFile, "-temp", "25C", "-interval", "33.333333333333333ms", "-exposure", "10ms",
		"-trials", "2000", "-workers", "1", "-seed", "1"}
	rep, _ := analyzeJSON(t, append(args, "-temp-u", "0.5K", "-pixel-u", "0.5%")...)
	ref, _ := analyzeJSON(t, "-tracks", demoTracksFile, "-scenario", demoScenarioFile, "-trials", "2000", "-workers", "1")
	if rep.IntervalNM != ref.IntervalNM {
		t.Errorf("flags give %v, the scenario file %v", rep.IntervalNM, ref.IntervalNM)
	}
	rep, _ = analyzeJSON(t, args...)
	var temp, cal bool
	for _, w := range rep.Warnings {
		temp = temp || strings.HasPrefix(w, "temperature: no uncertainty given")
		cal = cal || strings.HasPrefix(w, "calibration: no uncertainty of the length scale given")
	}
	if !temp || !cal || !(rep.RelExpanded < ref.RelExpanded) {
		t.Errorf("warnings %q; U/r %g without the uncertainties, %g with", rep.Warnings, rep.RelExpanded, ref.RelExpanded)
	}
}

func TestAnalyzeReport(t *testing.T) {
	stdout, _, err := runArgs("analyze", "-tracks", demoTracksFile, "-scenario", demoScenarioFile, "-trials", "2000", "-workers", "1")
	if err != nil {
		t.Fatal(err)
	}
	for _, label := range []string{"tracks: " + demoTracksFile, "# INVENTED", "radius ", "coverage interval ", "diffusion coefficient ",
		"localisation precision ", "tracks used ", "tracks dropped ", "displacements ", "drift ", "correlation at lag 2 ",
		"correlation at lag 3 ", "Monte Carlo ", "budget ", "  tracks "} {
		if !strings.Contains(stdout, label) {
			t.Errorf("the report lacks %q:\n%s", label, stdout)
		}
	}
}

func TestAnalyzeSVG(t *testing.T) {
	path := filepath.Join(t.TempDir(), "radii.svg")
	if _, _, err := runArgs("analyze", "-tracks", demoTracksFile, "-scenario", demoScenarioFile, "-trials", "2000", "-svg", path); err != nil {
		t.Fatal(err)
	}
	doc, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"<svg", "Radii of 100 single tracks", "a monodisperse sample, same track lengths and noise", "pooled radius"} {
		if !strings.Contains(string(doc), want) {
			t.Errorf("the SVG lacks %q", want)
		}
	}
}

func TestAnalyzeUsageErrors(t *testing.T) {
	cases := []struct {
		args []string
		text string
	}{
		{[]string{"-scenario", demoScenarioFile}, "missing -tracks"},
		{[]string{"-tracks", demoTracksFile}, "missing -temp, -interval, -exposure"},
		{[]string{"-tracks", demoTracksFile, "-temp", "25C", "-fps", "30fps"}, "missing -exposure"},
		{[]string{"-tracks", demoTracksFile, "-scenario", demoScenarioFile, "-radius", "50nm"}, "-radius does not apply to analyze"},
		{[]string{"-tracks", demoTracksFile, "-scenario", demoScenarioFile, "--sigma=40nm"}, "-sigma does not apply to analyze"},
		{[]string{"-tracks", demoTracksFile, "-scenario", demoScenarioFile, "-min-positions", "2"}, "-min-positions 2"},
		{[]string{"-tracks", demoTracksFile, "-scenario", demoScenarioFile, "-order", "rows"}, "invalid value"},
		{[]string{"-tracks", demoTracksFile, "-scenario", demoScenarioFile, "-unit", "inch"}, "invalid value"},
	}
	for _, c := range cases {
		_, _, err := runArgs(append([]string{"analyze"}, c.args...)...)
		checkUsageReport(t, err, "sizebudget analyze", c.text)
	}
}

func TestAnalyzeDataErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.csv")
	if err := os.WriteFile(bad, []byte("track,frame,x_um,y_um\n1,0,1,2\n1,1,x,2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	noUnit := filepath.Join(dir, "bare.csv")
	if err := os.WriteFile(noUnit, []byte("track,frame,x,y\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	short := filepath.Join(dir, "short.csv")
	if err := os.WriteFile(short, []byte("track,frame,x_um,y_um\n1,0,1,2\n1,1,1,2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	base := []string{"analyze", "-scenario", demoScenarioFile, "-tracks"}
	cases := []struct {
		args []string
		text string
	}{
		{append(base, bad), bad + ": trackfile: line 3, column 3 (x_um): \"x\" is not a number"},
		{append(base, noUnit), noUnit + ": trackfile: line 1, column 3 (x): the position columns carry no unit"},
		{append(base, noUnit), "[give -unit]"},
		{append(base, noUnit, "-unit", "px"), "[give -pixel]"},
		{append(base, short), "no tracks to analyse (1 dropped as too short)"},
		{append(base, filepath.Join(dir, "missing.csv")), "no such file"},
	}
	for _, c := range cases {
		_, _, err := runArgs(c.args...)
		var ue *usageError
		if err == nil || errors.As(err, &ue) || !strings.Contains(err.Error(), c.text) {
			t.Errorf("%v: error %v, want a data error containing %q", c.args, err, c.text)
		}
	}
	// With -unit the bare file is read (and has no tracks).
	_, _, err := runArgs(append(base, noUnit, "-unit", "nm")...)
	if err == nil || !strings.Contains(err.Error(), "no tracks") {
		t.Errorf("bare columns with -unit: %v", err)
	}
}

func TestAnalyzeHelp(t *testing.T) {
	_, stderr, err := runArgs("analyze", "-h")
	if err == nil || !strings.HasPrefix(stderr, "usage: sizebudget analyze -tracks file") {
		t.Fatalf("%v, %.60q", err, stderr)
	}
	flags := strings.SplitN(stderr, "\nflags:\n", 2)[1]
	for _, absent := range []string{"-radius", "-sigma", "-frames", "-estimator", "-target"} {
		if strings.Contains(flags, "\n  "+absent+" ") {
			t.Errorf("the flags of analyze list %q", absent)
		}
	}
	if strings.Contains(stderr, "(demo ") {
		t.Error("the flags of analyze name the demo scenario's values")
	}
	for _, present := range []string{"\n  -tracks file", "\n  -temp temperature", "\n  -medium liquid", "\n  -pixel-u uncertainty", "\n  -order arranged"} {
		if !strings.Contains(stderr, present) {
			t.Errorf("the flags of analyze lack %q", present)
		}
	}
}
