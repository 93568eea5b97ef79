package core

import (
	"errors"
	"math"
	"testing"
)

func TestRecordingBlur(t *testing.T) {
	// Exact: R = t_E/(6Δt) for continuous illumination (REFERENCES.md §1; Berglund 2010, Phys. Rev. E
	// 82, 011917): 0 for an instantaneous exposure, 1/6 for the full frame, 1/12 for half of it.
	for _, c := range []struct{ te, want float64 }{{0, 0}, {simDt, 1.0 / 6}, {simDt / 2, 1.0 / 12}, {0.3 * simDt, 0.05}} {
		r := Recording{D: simD, Dims: 1, Interval: simDt, Exposure: c.te}
		if got := r.Blur(); math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("t_E = %g: R = %.15g, want %.15g", c.te, got, c.want)
		}
	}
}

func TestIlluminationBlur(t *testing.T) {
	// Exact values of R = (1/Δt)∫ S(1−S) dt (REFERENCES.md §1), worked by hand:
	//   - continuous light over a fraction f of the frame: f/6 (for any cut of the frame into parts);
	//   - one lit part j of n: S rises over 1/n of the frame, then stays at 1 (or 0 before): 1/(6n);
	//   - equal flashes in the first and last of n parts: (1/n)(2·1/6 + (n−2)/4), which tends to 1/4.
	cases := []struct {
		name    string
		profile []float64
		want    float64
	}{
		{"full frame", []float64{1}, 1.0 / 6},
		{"full frame, 7 parts", []float64{2, 2, 2, 2, 2, 2, 2}, 1.0 / 6},
		{"first half", []float64{1, 1, 0, 0}, 1.0 / 12},
		{"3 of 10 parts", []float64{5, 5, 5, 0, 0, 0, 0, 0, 0, 0}, 0.3 / 6},
		{"middle part of 5", []float64{0, 0, 3, 0, 0}, 1.0 / 30},
		{"two flashes, 4 parts", []float64{1, 0, 0, 1}, (2.0/6 + 2.0/4) / 4},
		{"two flashes, 1000 parts", append(append([]float64{1}, make([]float64, 998)...), 1), (2.0/6 + 998.0/4) / 1000},
	}
	for _, c := range cases {
		got, err := IlluminationBlur(c.profile)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("%s: R = %.15g, want %.15g", c.name, got, c.want)
		}
		if got < 0 || got > 0.25 {
			t.Errorf("%s: R = %g outside [0, 1/4]", c.name, got)
		}
	}
	// Continuous illumination agrees with Recording.Blur.
	rec := Recording{D: simD, Dims: 1, Interval: simDt, Exposure: 0.6 * simDt}
	if got, _ := IlluminationBlur([]float64{1, 1, 1, 0, 0}); math.Abs(got-rec.Blur()) > 1e-12*rec.Blur() {
		t.Errorf("0.6 of the frame: IlluminationBlur %.15g, Recording.Blur %.15g", got, rec.Blur())
	}
}

func TestIlluminationBlurErrors(t *testing.T) {
	if _, err := IlluminationBlur(nil); err == nil {
		t.Error("empty profile accepted")
	}
	if _, err := IlluminationBlur([]float64{0, 0}); err == nil {
		t.Error("dark profile accepted")
	}
	for _, p := range [][]float64{{1, -1}, {math.NaN()}, {math.Inf(1), 1}} {
		_, err := IlluminationBlur(p)
		var re *RangeError
		if !errors.As(err, &re) || re.Field != "illumination" {
			t.Errorf("profile %v: got %v, want a *RangeError for illumination", p, err)
		}
	}
}
