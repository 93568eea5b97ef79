package core

import (
	"errors"
	"math"
	"testing"
)

// poolEstimators runs both pooled poolEstimators with the same data arguments, so that the error paths shared
// through pool are checked for each.
var poolEstimators = map[string]func(tracks []Track, interval, blur float64) (Estimate, error){
	"CVE":        func(t []Track, dt, R float64) (Estimate, error) { return CVE(t, dt, R, false) },
	"CVE drift":  func(t []Track, dt, R float64) (Estimate, error) { return CVE(t, dt, R, true) },
	"KnownNoise": func(t []Track, dt, R float64) (Estimate, error) { return KnownNoise(t, dt, R, 0, false) },
	"KnownNoise drift": func(t []Track, dt, R float64) (Estimate, error) {
		return KnownNoise(t, dt, R, 0, true)
	},
}

func TestPoolErrors(t *testing.T) {
	good := Track{Pos: [][]float64{{0, 1, 3, 2, 4}, {0, -1, 1, 2, 2}}}
	nan := Track{Pos: [][]float64{{0, 1, math.NaN(), 2, 4}, {0, -1, 1, 2, 2}}}
	inf := Track{Pos: [][]float64{{0, 1, 3, 2, 4}, {0, -1, math.Inf(1), 2, 2}}}
	oneAxis := Track{Pos: [][]float64{{0, 1, 3, 2, 4}}}
	ragged := Track{Pos: [][]float64{{0, 1, 3, 2, 4}, {0, -1, 1, 2}}}
	for name, est := range poolEstimators {
		if e, err := est([]Track{good, good}, 1, 0.1); err != nil || e.Tracks != 2 || e.Displacements != 8 {
			t.Errorf("%s: good tracks: %+v, %v", name, e, err)
		}
		for _, c := range []struct {
			what   string
			tracks []Track
			want   error
		}{
			{"nil", nil, ErrNoTracks},
			{"empty", []Track{}, ErrNoTracks},
			{"differing axes", []Track{good, oneAxis}, ErrDimsDiffer},
			{"ragged", []Track{good, ragged}, ErrRagged},
			{"NaN", []Track{good, nan}, ErrNonFinite},
			{"Inf", []Track{inf}, ErrNonFinite},
		} {
			if _, err := est(c.tracks, 1, 0); !errors.Is(err, c.want) {
				t.Errorf("%s, %s: got %v, want %v", name, c.what, err, c.want)
			}
		}
		var re *RangeError
		if _, err := est([]Track{{}}, 1, 0); !errors.As(err, &re) || re.Field != "dims" {
			t.Errorf("%s, no axes: got %v, want a dims RangeError", name, err)
		}
		for _, c := range []struct {
			field    string
			dt, blur float64
		}{
			{"frame_interval_s", 0, 0}, {"frame_interval_s", math.NaN(), 0}, {"frame_interval_s", math.Inf(1), 0},
			{"blur", 1, -0.01}, {"blur", 1, 0.26}, {"blur", 1, math.NaN()},
		} {
			if _, err := est([]Track{good}, c.dt, c.blur); !errors.As(err, &re) || re.Field != c.field {
				t.Errorf("%s, Δt=%g R=%g: got %v, want a %s RangeError", name, c.dt, c.blur, err, c.field)
			}
		}
	}
}

// TestPoolWeights checks the pooling rule, an exact identity (1e-12): the pooled estimate is the mean of
// the track estimates weighted by their numbers of displacements, which for KnownNoise without drift
// removal equals the estimate from the pooled sum of squares, (Σdx²/(dΣN) − 2s2)/(2(1−2R)Δt).
func TestPoolWeights(t *testing.T) {
	a := Track{Pos: [][]float64{{0, 1, 3, 2}, {1, 1, 2, 0}}}                 // 3 displacements
	b := Track{Pos: [][]float64{{5, 4, 4.5, 6, 7, 6.5}, {0, 2, 1, 1, 3, 2}}} // 5 displacements
	const dt, R, s2 = 0.5, 0.1, 0.05
	both := []Track{a, b}
	var sumSq float64
	for _, tr := range both {
		for _, d := range tr.Displacements() {
			for _, x := range d {
				sumSq += x * x
			}
		}
	}
	want := (sumSq/(2*8) - 2*s2) / (2 * (1 - 2*R) * dt)
	got, err := KnownNoise(both, dt, R, s2, false)
	if err != nil || math.Abs(got.D-want) > 1e-12*math.Abs(want) {
		t.Errorf("KnownNoise pooled: %+v, %v; want D = %.15g", got, err, want)
	}
	for name, est := range poolEstimators {
		ea, errA := est([]Track{a}, dt, R)
		eb, errB := est([]Track{b}, dt, R)
		ab, errAB := est(both, dt, R)
		if errA != nil || errB != nil || errAB != nil {
			t.Fatalf("%s: %v %v %v", name, errA, errB, errAB)
		}
		wantD := (3*ea.D + 5*eb.D) / 8
		if math.Abs(ab.D-wantD) > 1e-12*math.Abs(wantD) {
			t.Errorf("%s: pooled D = %.15g, weighted mean %.15g", name, ab.D, wantD)
		}
		if wantS := (3*ea.S2 + 5*eb.S2) / 8; !(math.IsNaN(wantS) && math.IsNaN(ab.S2)) && math.Abs(ab.S2-wantS) > 1e-12*math.Abs(wantS) {
			t.Errorf("%s: pooled S2 = %.15g, weighted mean %.15g", name, ab.S2, wantS)
		}
		if ab.Displacements != 8 || ab.Tracks != 2 {
			t.Errorf("%s: counts %d, %d; want 8, 2", name, ab.Displacements, ab.Tracks)
		}
	}
}
