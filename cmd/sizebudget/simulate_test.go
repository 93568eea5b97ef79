package main

import (
	"bytes"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"sizebudget/core"
	"sizebudget/trackfile"
	"sizebudget/uncertainty"
)

// TestSimulateDemoFile checks that testdata/tracks/demo.csv is what "sizebudget simulate" writes for the
// invented demo scenario (seed 1), byte for byte; go test -update rewrites it.
func TestSimulateDemoFile(t *testing.T) {
	stdout, _, err := runArgs("simulate")
	if err != nil {
		t.Fatal(err)
	}
	if *update {
		if err := os.WriteFile(demoTracksFile, []byte(stdout), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(demoTracksFile)
	if err != nil {
		t.Fatalf("%v (go test -update writes it)", err)
	}
	if stdout != string(want) {
		t.Errorf("simulate writes another file than %s (go test -update rewrites it)", demoTracksFile)
	}
	if !strings.HasPrefix(stdout, "# INVENTED track data") || !strings.Contains(stdout, "\n# seed 1; true radius 50 nm") {
		t.Errorf("the header does not say the data are invented, with the seed: %.200q", stdout)
	}
}

func TestSimulateSeeded(t *testing.T) {
	a, _, err := runArgs("simulate", "-frames", "10", "-tracks", "5")
	if err != nil {
		t.Fatal(err)
	}
	b, _, _ := runArgs("simulate", "-frames", "10", "-tracks", "5")
	c, _, _ := runArgs("simulate", "-frames", "10", "-tracks", "5", "-seed", "2")
	if a != b || a == c {
		t.Error("the same seed must write the same file, another seed another")
	}
}

// readSimulated writes the invented file of s in nm and reads its tracks back.
func readSimulated(t *testing.T, s uncertainty.Scenario) ([]core.Track, trackfile.Stats) {
	t.Helper()
	var buf bytes.Buffer
	n, rows, err := writeSimulated(&buf, s, "nm")
	if err != nil || n != s.Tracks || rows != s.Tracks*s.Frames {
		t.Fatalf("%d tracks, %d rows, %v", n, rows, err)
	}
	r, err := trackfile.NewReader(&buf, trackfile.Options{})
	if err != nil {
		t.Fatal(err)
	}
	var tracks []core.Track
	for {
		tr, err := r.Next()
		if err == io.EOF {
			return tracks, r.Stats()
		}
		if err != nil {
			t.Fatal(err)
		}
		tracks = append(tracks, tr)
	}
}

// TestSimulateStatistics reads back simulated files and checks that they hold what the scenario says:
// the tracks, their lengths and axes; a pooled covariance-based D̂ that agrees with the scenario's
// diffusion coefficient within 4 standard errors (core.VarCVEExact pooled over equal tracks); and,
// with a drift, a mean velocity of the scenario's speed within 4 standard errors (the variogram
// 2DNΔt + 2(σ² − 2RDΔt) of the end-to-end displacements; the speed of a 3-D velocity whose axes each
// carry that error is within 4·√3 SE).
func TestSimulateStatistics(t *testing.T) {
	s := uncertainty.Demo()
	s.Frames, s.Tracks, s.Dims, s.Seed = 40, 200, 3, 11
	m, _ := s.MediumModel()
	T := s.TemperatureC + 273.15
	eta, _ := m.Viscosity(T)
	D := core.Diffusion(T, eta, s.RadiusNM*1e-9)
	R, dt, s2 := s.ExposureS/(6*s.FrameIntervalS), s.FrameIntervalS, math.Pow(s.LocalisationNM*1e-9, 2)

	tracks, st := readSimulated(t, s)
	if len(tracks) != 200 || st.Dims != 3 || st.Gaps != 0 || st.Unit != "nm" || tracks[0].Len() != 40 {
		t.Fatalf("%d tracks read, stats %+v", len(tracks), st)
	}
	e, err := core.CVE(tracks, dt, R, false)
	if err != nil {
		t.Fatal(err)
	}
	if se := math.Sqrt(core.VarCVEExact(D, dt, R, s2, 39, 3) / 200); math.Abs(e.D-D) > 4*se {
		t.Errorf("pooled D̂ %.5g m²/s, scenario %.5g (4 SE %.2g)", e.D, D, 4*se)
	}

	s.DriftUMPerS, s.Tracks = 2, 1000
	tracks, _ = readSimulated(t, s)
	var v [3]float64
	for _, tr := range tracks {
		for a, p := range tr.Pos {
			v[a] += (p[len(p)-1] - p[0]) / (float64(1000*39) * dt)
		}
	}
	speed := math.Sqrt(v[0]*v[0]+v[1]*v[1]+v[2]*v[2]) * 1e6
	total := float64(1000*39) * dt
	seV := math.Sqrt(2*D*total+2*1000*(s2-2*R*D*dt)) / total * 1e6
	if math.Abs(speed-2) > 4*math.Sqrt(3)*seV {
		t.Errorf("drift speed %.4g µm/s, scenario 2 (4 SE %.2g)", speed, 4*math.Sqrt(3)*seV)
	}
}

func TestSimulateToFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "t.csv")
	stdout, _, err := runArgs("simulate", "-frames", "8", "-tracks", "3", "-seed", "5", "-o", path)
	if err != nil || stdout != "wrote 3 tracks, 24 positions, to "+path+" (INVENTED data, seed 5)\n" {
		t.Fatalf("%v, %q", err, stdout)
	}
	data, err := os.ReadFile(path)
	if err != nil || !strings.Contains(string(data), "\ntrack,frame,x_um,y_um\n") {
		t.Errorf("%v, %.300q", err, data)
	}
}

func TestSimulateErrors(t *testing.T) {
	if _, _, err := runArgs("simulate", "-dims", "1"); err == nil || !strings.Contains(err.Error(), "2 or 3 axes") {
		t.Errorf("1 axis: %v", err)
	}
	_, _, err := runArgs("simulate", "-unit", "px")
	checkUsageReport(t, err, "sizebudget simulate", "invalid value")
	if _, _, err := runArgs("simulate", "-o", filepath.Join(t.TempDir(), "no", "such", "dir.csv")); err == nil {
		t.Error("writing into a missing directory succeeded")
	}
	if _, _, err := runArgs("simulate", "-frames", "2"); err == nil {
		t.Error("2 positions per track accepted")
	}
}
