package core

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"
)

// imhofTol is the absolute accuracy asked of the CDF in these tests: a hundredth of the 1e-6 the
// uncertainty engine needs, and about what gonum's incomplete gamma delivers.
const imhofTol = 1e-10

// tailErr is the error of a computed tail probability, scaled so that comparing it with imhofTol asks
// for imhofTol absolute and, in tails below 1 %, imhofTol·100 relative to the tail itself (the
// smaller tail is the one computed directly, so it keeps its relative accuracy).
func tailErr(got, want float64) float64 {
	return math.Abs(got-want) / math.Min(1, want/0.01)
}

var tailProbs = []float64{1e-7, 1e-5, 0.001, 0.025, 0.2, 0.5, 0.8, 0.975, 0.999, 1 - 1e-5}

func TestChiSquaredSumSingleTerm(t *testing.T) {
	// w·χ²(k) + c against gonum distuv.ChiSquared, for positive and negative weights: CDF, Survival
	// (relative accuracy in the far tails) and Prob.
	for _, k := range []float64{1, 2, 3.5, 10, 100, 1000} {
		ref := distuv.ChiSquared{K: k}
		for _, w := range []float64{2.5, -0.8} {
			const c = 0.7
			q := ChiSquaredSum{Terms: []ChiSquaredTerm{{Weight: w, DOF: k}}, Const: c}
			for _, p := range tailProbs {
				x := c + w*ref.Quantile(p)
				u := (x - c) / w // what x stands for after rounding
				if !(u > 0) {
					t.Fatalf("k %g, p %g: quantile %g is not positive", k, p, u)
				}
				wantLo, wantUp := ref.CDF(u), ref.Survival(u) // P(Q ≤ x) = P(X ≤ u) for w > 0
				if w < 0 {
					wantLo, wantUp = wantUp, wantLo
				}
				lo, up := q.CDF(x), q.Survival(x)
				if l2, u2 := q.Tails(x); l2 != lo || u2 != up {
					t.Errorf("k %g, w %g, p %g: Tails %g, %g differ from CDF, Survival", k, w, p, l2, u2)
				}
				if e := math.Max(tailErr(lo, wantLo), tailErr(up, wantUp)); e > imhofTol {
					t.Errorf("k %g, w %g, p %g: CDF %.15g, Survival %.15g, want %.15g, %.15g (error %.2g)", k, w, p, lo, up, wantLo, wantUp, e)
				}
				if f, want := q.Prob(x), ref.Prob(u)/math.Abs(w); math.Abs(f-want) > 1e-9*want {
					t.Errorf("k %g, w %g, p %g: density %.15g, want %.15g", k, w, p, f, want)
				}
			}
		}
	}
}

func TestChiSquaredSumEqualWeights(t *testing.T) {
	// Σ w·χ²(ν_i) = w·χ²(Σν_i): 40 terms of mixed degrees of freedom (gonum distuv.ChiSquared, K = 61).
	var terms []ChiSquaredTerm
	total := 0.0
	for i := range 40 {
		nu := 1 + 0.5*float64(i%3)
		terms = append(terms, ChiSquaredTerm{Weight: 0.3, DOF: nu})
		total += nu
	}
	q := ChiSquaredSum{Terms: terms}
	ref := distuv.ChiSquared{K: total}
	for _, p := range tailProbs {
		x := 0.3 * ref.Quantile(p)
		if e := math.Max(tailErr(q.CDF(x), p), tailErr(q.Survival(x), 1-p)); e > imhofTol {
			t.Errorf("p %g: CDF %.15g (error %.2g)", p, q.CDF(x), e)
		}
	}
	if got := q.Quantile(0.975); math.Abs(got-0.3*ref.Quantile(0.975)) > 1e-10*got {
		t.Errorf("Quantile(0.975) = %.15g, want %.15g", got, 0.3*ref.Quantile(0.975))
	}
}

func TestChiSquaredSumNonCentral(t *testing.T) {
	// One degree of freedom: P((Z + √λ)² ≤ x) = Φ(√x − √λ) − Φ(−√x − √λ) (exact; gonum distuv.UnitNormal).
	for _, lam := range []float64{0.5, 4, 400} {
		q := ChiSquaredSum{Terms: []ChiSquaredTerm{{Weight: 1, DOF: 1, NonCentrality: lam}}}
		m := math.Sqrt(lam)
		for _, x := range []float64{0.01, 0.3, lam, lam + 3*m + 1, lam + 8*m + 8} {
			r := math.Sqrt(x)
			want := distuv.UnitNormal.CDF(r-m) - distuv.UnitNormal.CDF(-r-m)
			if got := q.CDF(x); math.Abs(got-want) > imhofTol {
				t.Errorf("λ %g, x %g: CDF %.15g, want %.15g", lam, x, got, want)
			}
		}
	}
	// Four degrees of freedom: the Poisson mixture of central laws,
	// P(χ²(ν; λ) ≤ x) = Σ_j e^{−λ/2}(λ/2)^j/j! · P(χ²(ν + 2j) ≤ x) (gonum distuv.Poisson and ChiSquared).
	const nu, lam = 4.0, 6.0
	q := ChiSquaredSum{Terms: []ChiSquaredTerm{{Weight: 1, DOF: nu, NonCentrality: lam}}}
	pois := distuv.Poisson{Lambda: lam / 2}
	for _, x := range []float64{0.5, 4, 10, 25} {
		want := 0.0
		for j := range 80 {
			want += pois.Prob(float64(j)) * distuv.ChiSquared{K: nu + 2*float64(j)}.CDF(x)
		}
		if got := q.CDF(x); math.Abs(got-want) > imhofTol {
			t.Errorf("χ²(4; 6) at %g: CDF %.15g, Poisson mixture %.15g", x, got, want)
		}
	}
}

// convolution returns P(w1·X1 + w2·X2 ≤ x) for X1 ~ χ²(1), X2 ~ χ²(2) by direct numerical
// integration over X1 = t² (which removes the t^{−1/2} singularity of its density), split where X2's
// argument reaches 0: P = ∫ 2t·f1(t²)·P(w2·X2 ≤ x − w1t²) dt, with P(X2 ≤ y) = 1 − e^{−y/2}.
func convolution(w1, w2, x float64) float64 {
	g := func(t float64) float64 {
		u := t * t
		f1 := math.Exp(-u/2) / math.Sqrt(2*math.Pi) * 2 // 2t·f1(t²) for χ²(1): f1(u) = e^{−u/2}/√(2πu)
		y := (x - w1*u) / w2
		var p float64
		switch {
		case w2 > 0 && y <= 0:
			p = 0
		case w2 > 0:
			p = -math.Expm1(-y / 2)
		case y <= 0: // w2 < 0: P(X2 ≥ y)
			p = 1
		default:
			p = math.Exp(-y / 2)
		}
		return f1 * p
	}
	const tMax = 12 // P(χ²(1) > 144) ~ 1e-33
	kink := math.Sqrt(math.Max(0, x/w1))
	if kink <= 0 || kink >= tMax {
		return integratePanels(g, 0, tMax)
	}
	return integratePanels(g, 0, kink) + integratePanels(g, kink, tMax)
}

// integratePanels integrates by 64-point Gauss–Legendre on 16 equal panels (gonum quad.Fixed).
func integratePanels(f func(float64) float64, a, b float64) float64 {
	const panels = 16
	s := 0.0
	for i := range panels {
		lo := a + (b-a)*float64(i)/panels
		hi := a + (b-a)*float64(i+1)/panels
		s += quad.Fixed(f, lo, hi, 64, quad.Legendre{}, 0)
	}
	return s
}

func TestChiSquaredSumTwoTermsAgainstConvolution(t *testing.T) {
	for _, c := range []struct{ w1, w2 float64 }{{1, 0.3}, {1, -0.4}, {0.2, -3}} {
		q := ChiSquaredSum{Terms: []ChiSquaredTerm{{Weight: c.w1, DOF: 1}, {Weight: c.w2, DOF: 2}}}
		m, sd := q.Mean(), math.Sqrt(q.Variance())
		for _, k := range []float64{-2.5, -1, -0.2, 0, 0.5, 1.5, 4} {
			x := m + k*sd
			want := convolution(c.w1, c.w2, x)
			if got := q.CDF(x); math.Abs(got-want) > imhofTol {
				t.Errorf("w %g, %g at %g: CDF %.15g, convolution %.15g", c.w1, c.w2, x, got, want)
			}
			// The density against a central difference of the convolution (error O(h²) ~ 1e-8).
			h := 1e-4 * sd
			fd := (convolution(c.w1, c.w2, x+h) - convolution(c.w1, c.w2, x-h)) / (2 * h)
			if got := q.Prob(x); math.Abs(got-fd) > 1e-6*math.Max(fd, 1/sd) {
				t.Errorf("w %g, %g at %g: density %.10g, difference quotient %.10g", c.w1, c.w2, x, got, fd)
			}
		}
	}
}

func TestChiSquaredSumMonteCarlo(t *testing.T) {
	// A sum shaped like the covariance-based estimator's (weights of both signs, 25 terms of 6
	// degrees of freedom) plus one non-central term: one-sample KS of direct draws against the CDF at
	// the 0.1 % level, and the sample mean and variance against Mean and Variance (4 standard errors).
	var terms []ChiSquaredTerm
	for k := 1; k <= 25; k++ {
		c := math.Cos(float64(k) * math.Pi / 26)
		terms = append(terms, ChiSquaredTerm{Weight: (1 + 2*c) * (3 - c) / 25, DOF: 6})
	}
	terms = append(terms, ChiSquaredTerm{Weight: 0.05, DOF: 1, NonCentrality: 9})
	q := ChiSquaredSum{Terms: terms, Const: -0.3}
	r := rand.New(rand.NewPCG(51, 52))
	n := 10000
	if testing.Short() {
		n = 2000
	}
	xs := make([]float64, n)
	var m, m2 float64
	for i := range xs {
		x := q.Const
		for _, tm := range terms {
			v := 2 * Gamma(r, tm.DOF/2)
			if tm.NonCentrality > 0 { // χ²(1; λ) = (Z + √λ)²: DOF is 1 here
				z := r.NormFloat64() + math.Sqrt(tm.NonCentrality)
				v = z * z
			}
			x += tm.Weight * v
		}
		xs[i] = x
		m += x
		m2 += x * x
	}
	fn := float64(n)
	m /= fn
	v := m2/fn - m*m
	if d := ksOneSample(xs, q.CDF); d > ksCrit(fn) {
		t.Errorf("KS = %.4f > %.4f", d, ksCrit(fn))
	}
	if se := math.Sqrt(v / fn); math.Abs(m-q.Mean()) > 4*se {
		t.Errorf("sample mean %.6g, Mean %.6g (4 SE %.2g)", m, q.Mean(), 4*se)
	}
	// SE of the sample variance: √((μ4 − v²)/n) from the sample's fourth central moment.
	m4 := 0.0
	for _, x := range xs {
		d := x - m
		m4 += d * d * d * d
	}
	m4 /= fn
	if se := math.Sqrt((m4 - v*v) / fn); math.Abs(v-q.Variance()) > 4*se {
		t.Errorf("sample variance %.6g, Variance %.6g (4 SE %.2g)", v, q.Variance(), 4*se)
	}
}

func TestChiSquaredSumQuantileInvertsCDF(t *testing.T) {
	q := ChiSquaredSum{Terms: []ChiSquaredTerm{{Weight: 1, DOF: 1}, {Weight: -0.4, DOF: 2}, {Weight: 0.1, DOF: 7, NonCentrality: 2}}, Const: 1}
	for _, p := range tailProbs {
		x := q.Quantile(p)
		lo, up := q.CDF(x), q.Survival(x)
		if e := math.Max(tailErr(lo, p), tailErr(up, 1-p)); e > 1e-12 {
			t.Errorf("p %g: CDF(Quantile) = %.15g (error %.2g)", p, lo, e)
		}
	}
}

func TestChiSquaredSumDegenerate(t *testing.T) {
	// No terms of non-zero weight: the point mass at Const.
	q := ChiSquaredSum{Terms: []ChiSquaredTerm{{Weight: 0, DOF: 3}}, Const: 2}
	if q.CDF(1.999) != 0 || q.CDF(2) != 1 || q.Survival(2) != 0 || q.Prob(1) != 0 || q.Quantile(0.3) != 2 {
		t.Error("point mass at Const: wrong CDF, Survival, Prob or Quantile")
	}
	// Support edges of one-signed sums.
	pos := ChiSquaredSum{Terms: []ChiSquaredTerm{{Weight: 1, DOF: 2}}, Const: 1}
	if pos.CDF(1) != 0 || pos.Survival(0.5) != 1 || pos.Prob(0.9) != 0 {
		t.Error("positive weights: mass below Const")
	}
	neg := ChiSquaredSum{Terms: []ChiSquaredTerm{{Weight: -1, DOF: 2}}, Const: 1}
	if neg.CDF(1) != 1 || neg.Survival(1.5) != 0 {
		t.Error("negative weights: mass above Const")
	}
	for _, bad := range []ChiSquaredTerm{{Weight: 1, DOF: 0}, {Weight: 1, DOF: 2, NonCentrality: -1}, {Weight: math.NaN(), DOF: 1}} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("term %+v: no panic", bad)
				}
			}()
			ChiSquaredSum{Terms: []ChiSquaredTerm{bad}}.CDF(1)
		}()
	}
}
