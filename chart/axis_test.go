package chart

import (
	"math"
	"slices"
	"testing"
)

// The expected ticks below are exact results of the 1-2-5 rule (Heckbert 1990): the step is the
// smallest 1, 2 or 5 times a power of ten that is at least span/(maxN−1); each case is worked by
// hand in its comment.

func values(ts []tick) []float64 {
	v := make([]float64, len(ts))
	for i, t := range ts {
		v[i] = t.value
	}
	return v
}

func labels(ts []tick) []string {
	s := make([]string, len(ts))
	for i, t := range ts {
		s[i] = t.label
	}
	return s
}

func TestNiceStep(t *testing.T) {
	for _, c := range []struct {
		span      float64
		intervals int
		m, e      int
	}{
		{1, 5, 2, -1},      // 0.2 is itself nice
		{10, 5, 2, 0},      // 2
		{15.8, 4, 5, 0},    // 3.95 → 5
		{0.0355, 4, 1, -2}, // 0.008875 → 0.01
		{1000, 1, 1, 3},    // 1000 is itself nice (log10 rounding must not matter)
		{0.3, 3, 1, -1},    // 0.1
		{6e-12, 4, 2, -12}, // 1.5e-12 → 2e-12
		{7, 1, 1, 1},       // 7 → 10
	} {
		if m, e := niceStep(c.span, c.intervals); m != c.m || e != c.e {
			t.Errorf("niceStep(%v, %d) = %d·10^%d, want %d·10^%d", c.span, c.intervals, m, e, c.m, c.e)
		}
	}
}

func TestLinearTicks(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		maxN   int
		values []float64
		labels []string
	}{
		// [0, 1], 6 ticks: step 1/5 = 0.2.
		{0, 1, 6, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}, []string{"0", "0.2", "0.4", "0.6", "0.8", "1.0"}},
		// [0, 10], 6 ticks: step 2.
		{0, 10, 6, []float64{0, 2, 4, 6, 8, 10}, []string{"0", "2", "4", "6", "8", "10"}},
		// [−3.7, 12.1], 5 ticks: 15.8/4 = 3.95 → step 5; multiples of 5 inside.
		{-3.7, 12.1, 5, []float64{0, 5, 10}, []string{"0", "5", "10"}},
		// [−1, 1], 5 ticks: 2/4 = 0.5.
		{-1, 1, 5, []float64{-1, -0.5, 0, 0.5, 1}, []string{"-1.0", "-0.5", "0", "0.5", "1.0"}},
		// [0.013, 0.0485], 5 ticks: 0.008875 → step 0.01.
		{0.013, 0.0485, 5, []float64{0.02, 0.03, 0.04}, []string{"0.02", "0.03", "0.04"}},
		// [1e−12, 5e−12], 5 ticks: step 1e−12, exponent labels.
		{1e-12, 5e-12, 5, []float64{1e-12, 2e-12, 3e-12, 4e-12, 5e-12},
			[]string{"1e-12", "2e-12", "3e-12", "4e-12", "5e-12"}},
		// [0, 2.5e6], 6 ticks: step 5e5, exponent labels with one decimal.
		{0, 2.5e6, 6, []float64{0, 5e5, 1e6, 1.5e6, 2e6, 2.5e6},
			[]string{"0", "5.0e5", "1.0e6", "1.5e6", "2.0e6", "2.5e6"}},
		// [3, 50], 2 ticks: 47 → step 50; only 50 lies inside.
		{3, 50, 2, []float64{50}, []string{"50"}},
	} {
		got := linearTicks(c.lo, c.hi, c.maxN)
		if !slices.Equal(values(got), c.values) || !slices.Equal(labels(got), c.labels) {
			t.Errorf("linearTicks(%v, %v, %d) = %v %q, want %v %q",
				c.lo, c.hi, c.maxN, values(got), labels(got), c.values, c.labels)
		}
		if len(got) > c.maxN {
			t.Errorf("linearTicks(%v, %v, %d) gave %d ticks", c.lo, c.hi, c.maxN, len(got))
		}
	}
}

func TestLinearAxisExpand(t *testing.T) {
	// [0.3, 9.2], 5 ticks: 8.9/4 = 2.225 → step 5; widened to [0, 10].
	lo, hi, ts := linearAxis(0.3, 9.2, 5, true)
	if lo != 0 || hi != 10 || !slices.Equal(values(ts), []float64{0, 5, 10}) {
		t.Errorf("linearAxis(0.3, 9.2, 5, true) = [%v, %v] %v, want [0, 10] [0 5 10]", lo, hi, values(ts))
	}
	// [−0.73, 0.41], 6 ticks: 1.14/5 = 0.228 → step 0.5; widened to [−1, 0.5].
	lo, hi, ts = linearAxis(-0.73, 0.41, 6, true)
	if lo != -1 || hi != 0.5 || !slices.Equal(values(ts), []float64{-1, -0.5, 0, 0.5}) {
		t.Errorf("linearAxis(−0.73, 0.41, 6, true) = [%v, %v] %v", lo, hi, values(ts))
	}
	// Already on whole steps: unchanged.
	lo, hi, _ = linearAxis(0, 1, 6, true)
	if lo != 0 || hi != 1 {
		t.Errorf("linearAxis(0, 1, 6, true) = [%v, %v], want [0, 1]", lo, hi)
	}
}

func TestLogTicks(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		maxN   int
		values []float64
		labels []string
	}{
		// 2.5 decades: decades only.
		{3, 1000, 10, []float64{10, 100, 1000}, []string{"10", "100", "1000"}},
		// 1.2 decades: 1, 2, 5 in each decade.
		{3, 50, 10, []float64{5, 10, 20, 50}, []string{"5", "10", "20", "50"}},
		{0.01, 0.5, 10, []float64{0.01, 0.02, 0.05, 0.1, 0.2, 0.5},
			[]string{"0.01", "0.02", "0.05", "0.1", "0.2", "0.5"}},
		// Exactly two decades: decades only.
		{1, 100, 10, []float64{1, 10, 100}, []string{"1", "10", "100"}},
		// 1.2 decades but only 3 fit: the 1-2-5 ticks do not, only one decade is inside, so every
		// second 1-2-5 tick.
		{3, 50, 3, []float64{5, 20}, []string{"5", "20"}},
		// 1.9 decades with 3 fitting: the two decades.
		{2, 150, 3, []float64{10, 100}, []string{"10", "100"}},
		// 12 decades, 5 fit: every third decade (13 decades / 5 → 3), aligned to 10^(3k).
		{1e-3, 1e9, 5, []float64{1e-3, 1, 1e3, 1e6, 1e9}, []string{"0.001", "1", "1000", "1e6", "1e9"}},
		// Tiny values.
		{1e-13, 1e-10, 10, []float64{1e-13, 1e-12, 1e-11, 1e-10}, []string{"1e-13", "1e-12", "1e-11", "1e-10"}},
		// Under a 1-2-5 step: linear ticks (2/4 = 0.5).
		{2.5, 4.5, 5, []float64{2.5, 3, 3.5, 4, 4.5}, []string{"2.5", "3.0", "3.5", "4.0", "4.5"}},
	} {
		got := logTicks(c.lo, c.hi, c.maxN)
		if !slices.Equal(values(got), c.values) || !slices.Equal(labels(got), c.labels) {
			t.Errorf("logTicks(%v, %v, %d) = %v %q, want %v %q",
				c.lo, c.hi, c.maxN, values(got), labels(got), c.values, c.labels)
		}
	}
}

func TestTidyExp(t *testing.T) {
	for in, want := range map[string]string{
		"1.5e-07": "1.5e-7", "2e+06": "2e6", "1e+00": "1e0", "3.0e-12": "3.0e-12", "12": "12",
	} {
		if got := tidyExp(in); got != want {
			t.Errorf("tidyExp(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestScale(t *testing.T) {
	// Exact results: the ends map to the ends, the middle to the middle (geometric middle on log).
	lin := scale{lo: -2, hi: 6, p0: 10, p1: 90}
	log := scale{lo: 1, hi: 1e4, p0: 300, p1: 100, log: true}
	for _, c := range []struct {
		s       scale
		v, want float64
	}{
		{lin, -2, 10}, {lin, 6, 90}, {lin, 2, 50},
		{log, 1, 300}, {log, 1e4, 100}, {log, 100, 200}, {log, 10, 250},
	} {
		if got := c.s.at(c.v); math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%+v.at(%v) = %v, want %v", c.s, c.v, got, c.want)
		}
	}
}

func TestWiden(t *testing.T) {
	for _, c := range []struct {
		lo, hi         float64
		log            bool
		wantLo, wantHi float64
	}{
		{1, 2, false, 1, 2},
		{0, 0, false, -0.5, 0.5},
		{5, 5, false, 4.5, 5.5},
		{-5, -5, false, -5.5, -4.5},
		{4, 4, true, 2, 8},
	} {
		if lo, hi := widen(c.lo, c.hi, c.log); lo != c.wantLo || hi != c.wantHi {
			t.Errorf("widen(%v, %v, %v) = %v, %v, want %v, %v", c.lo, c.hi, c.log, lo, hi, c.wantLo, c.wantHi)
		}
	}
}

func TestFrameTicks(t *testing.T) {
	// Across widths and data ranges, the x tick labels never touch (unless only two are left), the
	// last label stays inside the image and the y range holds the data.
	for _, width := range []int{240, 300, 360, 480, 640, 1000} {
		for _, xs := range []axisSpec{
			{lo: 0, hi: 1}, {lo: 0.013, hi: 0.0485}, {lo: 1e-12, hi: 5e-12, expand: true},
			{lo: 3, hi: 1000, log: true}, {lo: 3, hi: 50, log: true}, {lo: 1e-3, hi: 1e9, log: true},
			{lo: 123456, hi: 9876543, expand: true},
		} {
			f, err := newFrame(width, width*3/4, true, xs, axisSpec{lo: 0.2, hi: 97, expand: true, label: "y"}, 1)
			if err != nil {
				t.Fatal(err)
			}
			if len(f.xt) > 2 && f.crowded() {
				t.Errorf("width %d, %+v: crowded x labels %q", width, xs, labels(f.xt))
			}
			last := f.xt[len(f.xt)-1]
			if r := f.x.at(last.value) + textWidth(last.label, f.fs)/2; r > float64(width) {
				t.Errorf("width %d, %+v: last label %q ends at %.1f", width, xs, last.label, r)
			}
			if f.y.lo > 0.2 || f.y.hi < 97 {
				t.Errorf("y range [%v, %v] does not hold [0.2, 97]", f.y.lo, f.y.hi)
			}
		}
	}
	if _, err := newFrame(360, 200, true, axisSpec{lo: 0, hi: 1}, axisSpec{lo: 0, hi: 1}, 6); err == nil {
		t.Error("no error for 6 legend rows in a 200 units tall chart")
	}
}
