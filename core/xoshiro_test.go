package core

import (
	"math"
	"math/rand/v2"
	"testing"
	"unsafe"

	"gonum.org/v1/gonum/stat/distuv"
)

func TestXoshiroReferenceOutputs(t *testing.T) {
	// xoshiro256** from the state {1, 2, 3, 4}: the reference implementation's first outputs, as listed
	// in the test suites of its ports (from memory). The first is rotl(2·5, 7)·9 = 11520 by hand.
	x := &Xoshiro{}
	x.s = [4]uint64{1, 2, 3, 4}
	for i, want := range []uint64{11520, 0, 1509978240, 1215971899390074240, 1216172134540287360, 607988272756665600} {
		if got := x.Uint64(); got != want {
			t.Errorf("output %d: %d, want %d", i, got, want)
		}
	}
	// splitmix64 from 0: 0xe220a8397b1dcdaf, 0x6e789e6aa1b965f4, 0x06c45d188009454f (reference
	// implementation's first outputs, from memory).
	var z uint64
	for i, want := range []uint64{0xe220a8397b1dcdaf, 0x6e789e6aa1b965f4, 0x06c45d188009454f} {
		if got := splitmix64(&z); got != want {
			t.Errorf("splitmix64 output %d: %#x, want %#x", i, got, want)
		}
	}
}

func TestXoshiroStreams(t *testing.T) {
	// Reproducible: a seed (and a stream) gives one sequence; other seeds and streams give others; Seed
	// restarts a generator. The state is padded to 128 bytes.
	draw := func(x *Xoshiro) [8]uint64 {
		var v [8]uint64
		for i := range v {
			v[i] = x.Uint64()
		}
		return v
	}
	a, b := draw(NewXoshiro(42)), draw(NewXoshiro(42))
	if a != b {
		t.Error("same seed, different sequences")
	}
	if draw(NewXoshiro(43)) == a {
		t.Error("seeds 42 and 43 give the same sequence")
	}
	x := NewXoshiro(7)
	draw(x)
	x.Seed(42)
	if draw(x) != a {
		t.Error("Seed(42) does not restart the sequence of seed 42")
	}
	s := map[[8]uint64]bool{}
	for seed := range uint64(3) {
		for stream := range uint64(3) {
			v := draw(NewXoshiroStream(seed, stream))
			if s[v] {
				t.Errorf("stream (%d, %d) repeats another", seed, stream)
			}
			s[v] = true
			if draw(NewXoshiroStream(seed, stream)) != v {
				t.Errorf("stream (%d, %d) is not reproducible", seed, stream)
			}
		}
	}
	if n := unsafe.Sizeof(Xoshiro{}); n != 128 {
		t.Errorf("Xoshiro is %d bytes, want 128 (two cache lines)", n)
	}
	var _ rand.Source = x
}

func TestZigguratConstants(t *testing.T) {
	// Equal-area layers: the base layer's area is v = r·f(r) + ∫_r^∞ f, and the recursion from the base
	// up closes at the top, x_1·(f(0) − f(x_1)) = v (exact identities of the construction; to 1e-10 of
	// v, the digits the constants carry).
	tailNorm := math.Sqrt(math.Pi/2) * math.Erfc(zigNormR/math.Sqrt2) // ∫_r^∞ e^{−x²/2} dx
	if a := zigNormR*math.Exp(-0.5*zigNormR*zigNormR) + tailNorm; math.Abs(a-zigNormV) > 1e-10*zigNormV {
		t.Errorf("normal base area %.15g, v = %.15g", a, zigNormV)
	}
	if a := zigExpR*math.Exp(-zigExpR) + math.Exp(-zigExpR); math.Abs(a-zigExpV) > 1e-10*zigExpV {
		t.Errorf("exponential base area %.15g, v = %.15g", a, zigExpV)
	}
	x1 := zigNormW[1] * (1 << 55)
	if a := x1 * (1 - zigNormF[1]); math.Abs(a-zigNormV) > 1e-8*zigNormV {
		t.Errorf("normal top layer area %.15g, v = %.15g", a, zigNormV)
	}
	e1 := zigExpW[1] * (1 << 56)
	if a := e1 * (1 - zigExpF[1]); math.Abs(a-zigExpV) > 1e-8*zigExpV {
		t.Errorf("exponential top layer area %.15g, v = %.15g", a, zigExpV)
	}
}

// momentsCheck compares the sample mean and variance of xs with the law's, within 4 standard errors
// (of the mean √(v/n); of the variance √((μ4 − v²)/n) from the sample's fourth moment).
func momentsCheck(t *testing.T, name string, xs []float64, mean, variance float64) {
	t.Helper()
	n := float64(len(xs))
	m := 0.0
	for _, x := range xs {
		m += x
	}
	m /= n
	var v, m4 float64
	for _, x := range xs {
		d := x - m
		v += d * d
		m4 += d * d * d * d
	}
	v /= n - 1
	m4 /= n
	if se := math.Sqrt(v / n); math.Abs(m-mean) > 4*se {
		t.Errorf("%s: mean %.5g, want %.5g (4 SE %.2g)", name, m, mean, 4*se)
	}
	if se := math.Sqrt((m4 - v*v) / n); math.Abs(v-variance) > 4*se {
		t.Errorf("%s: variance %.5g, want %.5g (4 SE %.2g)", name, v, variance, 4*se)
	}
}

func TestXoshiroSamplers(t *testing.T) {
	// One-sample KS against gonum distuv (UnitNormal, Exponential, Gamma, Uniform) at the 0.1 % level,
	// and the first two moments within 4 standard errors.
	n := 40000
	if testing.Short() {
		n = 8000
	}
	x := NewXoshiro(2025)
	xs := make([]float64, n)
	fill := func(f func() float64) []float64 {
		for i := range xs {
			xs[i] = f()
		}
		return xs
	}
	crit := ksCrit(float64(n))
	if d := ksOneSample(fill(x.Norm), distuv.UnitNormal.CDF); d > crit {
		t.Errorf("Norm: KS %.4f > %.4f", d, crit)
	}
	momentsCheck(t, "Norm", xs, 0, 1)
	if d := ksOneSample(fill(x.Exp), distuv.Exponential{Rate: 1}.CDF); d > crit {
		t.Errorf("Exp: KS %.4f > %.4f", d, crit)
	}
	momentsCheck(t, "Exp", xs, 1, 1)
	if d := ksOneSample(fill(x.Float64), distuv.Uniform{Min: 0, Max: 1}.CDF); d > crit {
		t.Errorf("Float64: KS %.4f > %.4f", d, crit)
	}
	momentsCheck(t, "Float64", xs, 0.5, 1.0/12)
	for _, k := range []float64{0.3, 1, 3.7, 50, 2000} {
		if d := ksOneSample(fill(func() float64 { return x.Gamma(k) }), distuv.Gamma{Alpha: k, Beta: 1}.CDF); d > crit {
			t.Errorf("Gamma(%g): KS %.4f > %.4f", k, d, crit)
		}
		momentsCheck(t, "Gamma", xs, k, k)
	}
}

func TestXoshiroNormTail(t *testing.T) {
	// The base layer's tail (|z| > r = 3.4426) is drawn by its own method: the share of draws there is
	// binomial with p = 2Φ(−r) (gonum distuv.UnitNormal), checked within 4 standard errors, and the
	// tail's draws follow the conditional law (KS at 0.1 %).
	n := 2_000_000
	if testing.Short() {
		n = 400_000
	}
	x := NewXoshiro(99)
	var tail []float64
	for range n {
		if z := x.Norm(); math.Abs(z) > zigNormR {
			tail = append(tail, math.Abs(z))
		}
	}
	p := 2 * distuv.UnitNormal.CDF(-zigNormR)
	if se := math.Sqrt(float64(n) * p * (1 - p)); math.Abs(float64(len(tail))-float64(n)*p) > 4*se {
		t.Errorf("%d draws beyond r, want %.0f ± %.0f", len(tail), float64(n)*p, 4*se)
	}
	q := distuv.UnitNormal.Survival(zigNormR)
	cond := func(z float64) float64 { return 1 - distuv.UnitNormal.Survival(z)/q }
	if d := ksOneSample(tail, cond); d > ksCrit(float64(len(tail))) {
		t.Errorf("tail draws: KS %.4f > %.4f", d, ksCrit(float64(len(tail))))
	}
}

func TestXoshiroFillNorm(t *testing.T) {
	// FillNorm returns exactly what successive Norm calls return, and leaves the same state.
	a, b := NewXoshiro(5), NewXoshiro(5)
	got := make([]float64, 50000)
	a.FillNorm(got)
	for i, g := range got {
		if w := b.Norm(); g != w {
			t.Fatalf("variate %d: FillNorm %v, Norm %v", i, g, w)
		}
	}
	if a.Uint64() != b.Uint64() {
		t.Error("FillNorm leaves a different state")
	}
}
