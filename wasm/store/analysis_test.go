package store

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"sizebudget/core"
	"sizebudget/trackfile"
	"sizebudget/uncertainty"
)

var update = flag.Bool("update", false, "rewrite testdata/sessions-good-analysis.json from the demo track file")

// demoTracks is the invented demo track file of the repository (testdata/PROVENANCE.md).
var demoTracks = filepath.Join("..", "..", "testdata", "tracks", "demo.csv")

// demoSettings are the analysis settings of the demo scenario's conditions.
func demoSettings(t *testing.T) AnalysisSettings {
	t.Helper()
	doc, err := uncertainty.Demo().Marshal()
	if err != nil {
		t.Fatal(err)
	}
	s, err := ParseAnalysisSettings(doc)
	if err != nil {
		t.Fatalf("the demo scenario as analysis settings: %v", err)
	}
	return s
}

// analyseDemo analyses the demo track file with settings s, as the browser's worker does.
func analyseDemo(t *testing.T, s AnalysisSettings) (*uncertainty.Analysis, trackfile.Stats) {
	t.Helper()
	f, err := os.Open(demoTracks)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r, err := trackfile.NewReader(f, s.ReadOptions())
	if err != nil {
		t.Fatal(err)
	}
	a, err := uncertainty.Analyze(context.Background(), r, s.Scenario(), uncertainty.PlanOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return a, r.Stats()
}

// TestAnalysisSettingsScenario checks that the settings give Analyze what a scenario document of the
// same conditions gives it (the CLI's analyze -scenario): the placeholders for the particle and the
// tracks must not leak into the result.
func TestAnalysisSettingsScenario(t *testing.T) {
	s := demoSettings(t)
	got, st := analyseDemo(t, s)
	f, err := os.Open(demoTracks)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r, err := trackfile.NewReader(f, trackfile.Options{Interval: uncertainty.Demo().FrameIntervalS})
	if err != nil {
		t.Fatal(err)
	}
	sc := uncertainty.Demo()
	sc.Name, sc.Note = "", "" // Analyze copies them into the result; settings carry none
	want, err := uncertainty.Analyze(context.Background(), r, sc, uncertainty.PlanOptions{})
	if err != nil {
		t.Fatal(err)
	}
	jg, _ := json.Marshal(got)
	jw, _ := json.Marshal(want)
	if !bytes.Equal(jg, jw) {
		t.Errorf("analysis with the settings differs from the analysis with the scenario:\n%s\n%s", jg, jw)
	}
	// The demo file: 100 tracks of 60 positions (its header comments, written by simulate).
	if st.Rows != 6000 || st.Tracks != 100 || got.TracksUsed != 100 {
		t.Errorf("demo file: %d rows, %d tracks, %d used; want 6000, 100, 100", st.Rows, st.Tracks, got.TracksUsed)
	}
}

func TestParseAnalysisSettings(t *testing.T) {
	good := `{"temperature_C": 25, "temperature_u_K": 0.5, "medium": "water", "frame_interval_s": 0.04, "exposure_s": 0.01, "seed": 3}`
	s, err := ParseAnalysisSettings([]byte(good))
	if err != nil {
		t.Fatal(err)
	}
	if sc := s.Scenario(); sc.Coverage != 0.95 || sc.TemperatureDist != "rect" || sc.Seed != 3 {
		t.Errorf("defaults: coverage %v, distribution %q, seed %d", sc.Coverage, sc.TemperatureDist, sc.Seed)
	}
	if o := s.ReadOptions(); o.Order != trackfile.ByTrack || o.Interval != 0.04 || o.MinPositions != 0 {
		t.Errorf("read options %+v", o)
	}
	with := func(kv string) string { return strings.TrimSuffix(good, "}") + ", " + kv + "}" }
	for _, tc := range []struct {
		doc, field string
	}{
		{with(`"temperature_C": 400`), "temperature_C"},
		{with(`"exposure_s": 0.5`), "exposure_s"},
		{with(`"unit": "inch"`), "unit"},
		{with(`"unit": "px"`), "pixel_size_nm"},
		{with(`"pixel_size_nm": -3`), "pixel_size_nm"},
		{with(`"min_positions": 2`), "min_positions"},
		{with(`"order": "sideways"`), "order"},
		{with(`"trials": 10`), "trials"},
	} {
		_, err := ParseAnalysisSettings([]byte(tc.doc))
		var fe *uncertainty.FieldError
		var re *core.RangeError
		field := ""
		switch {
		case errors.As(err, &fe):
			field = fe.Field
		case errors.As(err, &re):
			field = re.Field
		}
		if field != tc.field {
			t.Errorf("%s: err = %v; want an error naming %s", tc.doc, err, tc.field)
		}
	}
	for _, doc := range []string{with(`"temprature_C": 20`), `[1]`, `null`, `{`} {
		if _, err := ParseAnalysisSettings([]byte(doc)); err == nil {
			t.Errorf("%s: accepted", doc)
		}
	}
	// Keys of a scenario document that the data determine are ignored.
	if _, err := ParseAnalysisSettings([]byte(with(`"radius_nm": 80, "frames": 2, "format": "x", "name": "n"`))); err != nil {
		t.Errorf("scenario keys the data determine: %v", err)
	}
}

func TestNewTrackFile(t *testing.T) {
	st := trackfile.Stats{Lines: 9, Rows: 7, Names: 2, Tracks: 1, Positions: 5, Dropped: 1, DroppedPositions: 2, Dims: 2, Unit: "um",
		Delimiter: ",", Notes: []string{" short", strings.Repeat("é", MaxNoteRunes+5)}}
	mod := time.Date(2031, 1, 2, 3, 4, 5, 0, time.FixedZone("x", 3600))
	f := NewTrackFile(`C:\data\run 1.csv`, 123, mod, strings.Repeat("AB", 32), st)
	if f.Name != "run 1.csv" || f.SHA256 != strings.Repeat("ab", 32) || !f.Modified.Equal(mod) || f.Modified.Location() != time.UTC {
		t.Errorf("summary %+v", f)
	}
	if n := []rune(f.Notes[1]); len(n) != MaxNoteRunes || n[len(n)-1] != '…' || f.Notes[0] != " short" {
		t.Errorf("notes %q", f.Notes)
	}
	if f.Ignored == nil || f.Validate() != nil {
		t.Errorf("ignored %v, Validate %v", f.Ignored, f.Validate())
	}
	if NewTrackFile("a.csv", 1, time.Time{}, "", st).Modified != nil {
		t.Error("an unknown modification time was recorded")
	}
	for _, bad := range []TrackFile{{Name: " "}, {Name: "a", SHA256: "xyz"}, {Name: "a", Rows: -1}, {Name: strings.Repeat("a", MaxFileNameLen+1)}} {
		if bad.Validate() == nil {
			t.Errorf("%+v: accepted", bad)
		}
	}
}

// demoAnalysis is the stored analysis of the demo track file.
func demoAnalysis(t *testing.T) *Analysis {
	t.Helper()
	s := demoSettings(t)
	a, st := analyseDemo(t, s)
	data, err := os.ReadFile(demoTracks)
	if err != nil {
		t.Fatal(err)
	}
	// The digest is computed by the browser (crypto.subtle); any 64 hex digits serve here.
	f := NewTrackFile("demo.csv", int64(len(data)), time.Time{}, strings.Repeat("0f", 32), st)
	an, err := NewAnalysis(f, s, a, time.Date(2031, 5, 6, 8, 0, 0, 0, time.UTC))
	if err != nil {
		t.Fatal(err)
	}
	return an
}

func TestAnalysisValidate(t *testing.T) {
	an := demoAnalysis(t)
	back, err := ParseAnalysis(mustMarshal(t, an))
	if err != nil {
		t.Fatal(err)
	}
	if !same(Session{Analysis: an}, Session{Analysis: back}) {
		t.Error("ParseAnalysis did not give back the analysis")
	}
	set := func(key string, v any) []byte {
		var m map[string]any
		json.Unmarshal(an.Result, &m)
		if v == nil {
			delete(m, key)
		} else {
			m[key] = v
		}
		c := *an
		c.Result = mustMarshal(t, m)
		return mustMarshal(t, c)
	}
	for _, tc := range []struct {
		name string
		doc  []byte
		want string
	}{
		{"newer format", set("format", "sizebudget/analysis/2"), "update the app"},
		{"other format", set("format", "sizebudget/scenario/1"), "not an analysis"},
		{"no format", set("format", nil), "missing"},
		{"radius outside", set("radius_nm", 1e4), "inside its interval"},
		{"no tracks", set("tracks_used", 0), "tracks_used"},
		{"unknown key", bytes.Replace(mustMarshal(t, an), []byte(`"analysed"`), []byte(`"extra":1,"analysed"`), 1), "unknown field"},
		{"bad settings", bytes.Replace(mustMarshal(t, an), []byte(`"temperature_C":25`), []byte(`"temperature_C":500`), 1), "temperature_C"},
		{"no time", bytes.Replace(mustMarshal(t, an), []byte(`"analysed":"2031-05-06T08:00:00Z"`), []byte(`"analysed":"0001-01-01T00:00:00Z"`), 1), "analysed"},
	} {
		if _, err := ParseAnalysis(tc.doc); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: err = %v; want it to mention %q", tc.name, err, tc.want)
		}
	}
}

func TestShelfKeepsAnalysis(t *testing.T) {
	ctx := context.Background()
	sh, _ := newTestShelf()
	an := demoAnalysis(t)
	s, err := sh.SaveWith(ctx, uncertainty.Demo(), an, "Invented: demo tracks", "")
	if err != nil {
		t.Fatal(err)
	}
	got, _ := sh.Get(ctx, s.ID)
	if got.Analysis == nil || !same(got, s) {
		t.Fatalf("Get after SaveWith: analysis %v", got.Analysis)
	}
	// Update keeps the analysis; UpdateWith replaces or removes it.
	sc := s.Scenario
	sc.Tracks = 250
	if u, _ := sh.Update(ctx, s.ID, sc); u.Analysis == nil {
		t.Error("Update dropped the analysis")
	}
	if d, _ := sh.Duplicate(ctx, s.ID); d.Analysis == nil || !bytes.Equal(d.Analysis.Result, an.Result) {
		t.Error("Duplicate lost the analysis")
	}
	bad := *an
	bad.File.SHA256 = "nope"
	if _, err := sh.UpdateWith(ctx, s.ID, sc, &bad); err == nil || !strings.Contains(err.Error(), "sha256") {
		t.Errorf("UpdateWith of a bad analysis: %v", err)
	}
	if _, err := sh.SaveWith(ctx, sc, &bad, "x", ""); err == nil {
		t.Error("SaveWith of a bad analysis accepted")
	}
	// Export and import carry it; numbers written by JavaScript (1e-7 for Go's 1e-07) are the same.
	file, err := sh.Export(ctx, s.ID)
	if err != nil {
		t.Fatal(err)
	}
	dst, _ := newTestShelf()
	if rep, err := dst.Import(ctx, file); err != nil || rep.Added != 1 {
		t.Fatalf("Import: %+v, %v", rep, err)
	}
	in, _ := dst.Get(ctx, s.ID)
	orig, _ := sh.Get(ctx, s.ID)
	if in.Analysis == nil || !same(in, orig) {
		t.Fatalf("imported session differs: %+v", in.Analysis)
	}
	js := bytes.ReplaceAll(file, []byte("e-0"), []byte("e-"))
	if rep, err := dst.Import(ctx, js); err != nil || rep.Unchanged != 1 {
		t.Errorf("re-import of the same numbers written differently: %+v, %v", rep, err)
	}
	if u, _ := sh.UpdateWith(ctx, s.ID, sc, nil); u.Analysis != nil {
		t.Error("UpdateWith(nil) kept the analysis")
	}
	if got, _ := sh.Get(ctx, s.ID); got.Analysis != nil || same(got, orig) {
		t.Error("the stored session still has its analysis")
	}
}

// TestAnalysisTestdata reads the export file with an analysis in testdata (with -update, it is
// written anew from the demo track file) and the one whose analysis is bad.
func TestAnalysisTestdata(t *testing.T) {
	ctx := context.Background()
	name := filepath.Join("testdata", "sessions-good-analysis.json")
	if *update {
		sh := NewShelf(&Memory{}, func() time.Time { return time.Date(2031, 5, 6, 8, 0, 0, 0, time.UTC) })
		if _, err := sh.SaveWith(ctx, uncertainty.Demo(), demoAnalysis(t), "Invented: demo tracks analysed", "An invented session for tests."); err != nil {
			t.Fatal(err)
		}
		file, err := sh.Export(ctx)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(name, append(file, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	data, err := os.ReadFile(name)
	if err != nil {
		t.Fatal(err)
	}
	ss, err := ReadExport(data)
	if err != nil {
		t.Fatal(err)
	}
	if len(ss) != 1 || ss[0].Analysis == nil || ss[0].Analysis.File.Rows != 6000 {
		t.Fatalf("%s: %d sessions, analysis %+v", name, len(ss), ss[0].Analysis)
	}
	var res uncertainty.Analysis
	if err := json.Unmarshal(ss[0].Analysis.Result, &res); err != nil || res.TracksUsed != 100 || len(res.Radii.Counts) == 0 {
		t.Errorf("the stored result: %v, %d tracks", err, res.TracksUsed)
	}
	bad, err := os.ReadFile(filepath.Join("testdata", "sessions-bad-analysis.json"))
	if err != nil {
		t.Fatal(err)
	}
	var ie *ImportError
	if _, err := ReadExport(bad); !errors.As(err, &ie) || ie.Session != 1 || !strings.Contains(err.Error(), "sha256") {
		t.Errorf("bad analysis: err = %v; want an ImportError on session 1 naming sha256", err)
	}
}

func mustMarshal(t *testing.T, v any) []byte {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
