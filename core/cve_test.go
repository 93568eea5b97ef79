package core

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// TestCentredMoments checks the expected centred sums used by the drift correction against the exact
// computation with explicit matrices: for y = (I − J/N)·dx and Cov dx = tridiag(b, a, b) = C,
// E Σy² = tr(PCP) and E Σ y_k y_{k+1} = Σ_k (PCP)_{k,k+1}, P = I − J/N (an analytic identity, 1e-12).
func TestCentredMoments(t *testing.T) {
	for N := 2; N <= 12; N++ {
		for _, ab := range [][2]float64{{1, 0}, {0, 1}, {1.7, -0.4}} {
			a, b := ab[0], ab[1]
			C := make([][]float64, N)
			P := make([][]float64, N)
			for i := range N {
				C[i] = make([]float64, N)
				P[i] = make([]float64, N)
				for j := range N {
					P[i][j] = -1 / float64(N)
				}
				P[i][i] += 1
				C[i][i] = a
				if i > 0 {
					C[i][i-1], C[i-1][i] = b, b
				}
			}
			M := simMatMul(simMatMul(P, C), P)
			var s0, s1 float64
			for k := range N {
				s0 += M[k][k]
				if k+1 < N {
					s1 += M[k][k+1]
				}
			}
			a0, b0, a1, b1 := centredMoments(N)
			for _, c := range []struct {
				name      string
				got, want float64
			}{{"E Σy²", a0*a + b0*b, s0}, {"E Σy_k y_k+1", a1*a + b1*b, s1}} {
				if math.Abs(c.got-c.want) > 1e-12*math.Max(1, math.Abs(c.want)) {
					t.Errorf("N=%d a=%g b=%g: %s = %.15g, want %.15g", N, a, b, c.name, c.got, c.want)
				}
			}
			// The determinant used to solve for (a, b) is (N−1)(N−2)²(N+1)/N².
			n := float64(N)
			if det, want := a0*b1-b0*a1, (n-1)*(n-2)*(n-2)*(n+1)/(n*n); math.Abs(det-want) > 1e-12*math.Max(1, want) {
				t.Errorf("N=%d: determinant %.15g, want %.15g", N, det, want)
			}
		}
	}
}

func simMatMul(A, B [][]float64) [][]float64 {
	n := len(A)
	M := make([][]float64, n)
	for i := range M {
		M[i] = make([]float64, n)
		for j := range n {
			for k := range n {
				M[i][j] += A[i][k] * B[k][j]
			}
		}
	}
	return M
}

// estCase is one condition for the estimator Monte Carlo checks.
type estCase struct {
	rec         Recording
	points      int
	removeDrift bool
}

func (c estCase) String() string {
	return fmt.Sprintf("%d-D %d points t_E/Δt=%.2g σ=%.0fnm drift=%v removeDrift=%v",
		c.rec.Dims, c.points, c.rec.Exposure/c.rec.Interval, c.rec.Sigma*1e9, c.rec.Drift != nil, c.removeDrift)
}

// TestCVEUnbiased checks that the single-track CVE estimates of D and σ² are unbiased (mean over many
// simulated tracks within 4 standard errors of the truth, REFERENCES.md §2, Vestergaard et al. 2014,
// Phys. Rev. E 89, 022726), and, without drift removal, that their mean squared error equals the exact
// variance of the quadratic form (VarCVEExact in variance.go) within 4 standard errors. With drift
// removal it also checks the size of the O(1/N) bias that the exact correction removes: the uncorrected
// centred estimate has the mean predicted by centredMoments.
func TestCVEUnbiased(t *testing.T) {
	src := rand.NewPCG(2014, 22726)
	const tracks = 12000
	cases := []estCase{
		{Recording{D: simD, Dims: 2, Interval: simDt, Exposure: simDt / 2, Sigma: 150e-9}, 3, false},
		{Recording{D: simD, Dims: 1, Interval: simDt, Exposure: simDt}, 20, false},
		{Recording{D: simD, Dims: 3, Interval: simDt, Exposure: simDt, Sigma: 250e-9}, 50, false},
		{Recording{D: simD, Dims: 1, Interval: simDt, Sigma: 400e-9}, 8, false},
		{Recording{D: simD, Dims: 1, Interval: simDt, Exposure: simDt, Sigma: 100e-9}, 4, true},
		{Recording{D: simD, Dims: 2, Interval: simDt, Exposure: 0.3 * simDt, Sigma: 100e-9, Drift: []float64{5e-6, -2e-6}}, 6, true},
	}
	for _, c := range cases {
		rec := c.rec
		R, s2 := rec.Blur(), rec.Sigma*rec.Sigma
		N := c.points - 1
		var dHat, s2Hat, sqErr, naive simAcc
		for range tracks {
			tr := Simulate(src, rec, c.points)
			est, err := CVE([]Track{tr}, rec.Interval, R, c.removeDrift)
			if err != nil {
				t.Fatalf("%v: %v", c, err)
			}
			if est.Tracks != 1 || est.Displacements != N || !(math.Abs(est.S2) < 1) {
				t.Fatalf("%v: estimate %+v", c, est)
			}
			dHat.add(est.D)
			s2Hat.add(est.S2)
			sqErr.add((est.D - rec.D) * (est.D - rec.D))
			if c.removeDrift {
				var d float64
				for _, p := range tr.Pos {
					s0, s1 := laggedSums(p, meanStep(p))
					d += s0/float64(N)/(2*rec.Interval) + s1/float64(N-1)/rec.Interval
				}
				naive.add(d / float64(rec.Dims))
			}
		}
		simCheck(t, c.String()+": D̂", &dHat, rec.D)
		simCheck(t, c.String()+": ŝ2", &s2Hat, s2)
		if !c.removeDrift {
			simCheck(t, c.String()+": (D̂ − D)²", &sqErr, VarCVEExact(rec.D, rec.Interval, R, s2, N, rec.Dims))
			continue
		}
		// Expected uncorrected centred estimate, from E Σy² and E Σ y_k y_{k+1}.
		sc := NewStepCovariance(rec.D, rec.Interval, R, s2)
		a0, b0, a1, b1 := centredMoments(N)
		n := float64(N)
		want := (a0*sc.Diag+b0*sc.Off)/n/(2*rec.Interval) + (a1*sc.Diag+b1*sc.Off)/(n-1)/rec.Interval
		simCheck(t, c.String()+": uncorrected centred D̂", &naive, want)
		if math.Abs(want-rec.D) < 8*naive.se() {
			t.Errorf("%v: the drift-removal bias %.3g is too small to be seen (SE %.3g)", c, want-rec.D, naive.se())
		}
	}
}

// TestCVEPooled checks the pooled estimator over tracks of different lengths: unbiased (4 standard
// errors, Vestergaard et al. 2014, Phys. Rev. E 89, 022726), mean squared error equal to the exact
// pooled variance (PooledVariance with VarCVEExact, variance.go), and equal to the displacement-weighted
// mean of the per-track estimates of CVETrack (an exact identity, 1e-12).
func TestCVEPooled(t *testing.T) {
	src := rand.NewPCG(3, 1415)
	rec := Recording{D: simD, Dims: 2, Interval: simDt, Exposure: 0.7 * simDt, Sigma: 200e-9}
	R, s2 := rec.Blur(), rec.Sigma*rec.Sigma
	lengths := []int{3, 4, 7, 12, 30}
	const experiments = 4000
	var dHat, s2Hat, sqErr simAcc
	steps := make([]int, len(lengths))
	for i, p := range lengths {
		steps[i] = p - 1
	}
	for e := range experiments {
		trs := make([]Track, len(lengths))
		for i, p := range lengths {
			trs[i] = Simulate(src, rec, p)
		}
		est, err := CVE(trs, rec.Interval, R, false)
		if err != nil {
			t.Fatal(err)
		}
		dHat.add(est.D)
		s2Hat.add(est.S2)
		sqErr.add((est.D - rec.D) * (est.D - rec.D))
		if e == 0 {
			if est.Displacements != 2+3+6+11+29 || est.Tracks != len(lengths) {
				t.Errorf("counts: %d displacements, %d tracks; want 51, 5", est.Displacements, est.Tracks)
			}
			var wD, wS, w float64
			for _, tr := range trs {
				d, s, n := CVETrack(tr, rec.Interval, R)
				wD += float64(n) * d
				wS += float64(n) * s
				w += float64(n)
			}
			if math.Abs(est.D-wD/w) > 1e-12*math.Abs(est.D) || math.Abs(est.S2-wS/w) > 1e-12*math.Abs(est.S2) {
				t.Errorf("pooled (%g, %g), weighted mean of CVETrack (%g, %g)", est.D, est.S2, wD/w, wS/w)
			}
		}
	}
	simCheck(t, "pooled D̂", &dHat, rec.D)
	simCheck(t, "pooled ŝ2", &s2Hat, s2)
	want := PooledVariance(steps, func(N int) float64 { return VarCVEExact(rec.D, rec.Interval, R, s2, N, rec.Dims) })
	simCheck(t, "pooled (D̂ − D)²", &sqErr, want)
}

// TestCVEExactValues checks the estimator's arithmetic on a track small enough to work by hand
// (exact fractions, 1e-12). 1-D positions 0, 1, 3, 2 m, Δt = 1 s, R = 1/6: dx = 1, 2, −1;
// ⟨dx²⟩ = 6/3 = 2 and ⟨dx_k dx_{k+1}⟩ = (2 − 2)/2 = 0, so D̂ = 1 m²/s and ŝ2 = 2R = 1/3 m².
// With drift removal: m = 2/3, y = 1/3, 4/3, −5/3, Σy² = 42/9, Σy_k y_{k+1} = (4 − 20)/9 = −16/9. For
// N = 3 the coefficients are a0 = 2, b0 = −4/3, a1 = −2/3, b1 = 8/9, determinant 8/9, so
// â = (8/9·42/9 − 4/3·16/9)/(8/9) = 2 and b̂ = (2·(−16/9) + 2/3·42/9)/(8/9) = −1/2:
// D̂ = (â + 2b̂)/2 = 1/2 m²/s and ŝ2 = Râ + (2R − 1)b̂ = 1/3 + 1/3 = 2/3 m².
func TestCVEExactValues(t *testing.T) {
	tr := Track{Pos: [][]float64{{0, 1, 3, 2}}}
	est, err := CVE([]Track{tr}, 1, 1.0/6, false)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(est.D-1) > 1e-12 || math.Abs(est.S2-1.0/3) > 1e-12 {
		t.Errorf("CVE: D = %.15g, S2 = %.15g; want 1, 1/3", est.D, est.S2)
	}
	est, err = CVE([]Track{tr}, 1, 1.0/6, true)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(est.D-0.5) > 1e-12 || math.Abs(est.S2-2.0/3) > 1e-12 {
		t.Errorf("CVE, drift removed: D = %.15g, S2 = %.15g; want 1/2, 2/3", est.D, est.S2)
	}
	// A 2-D track whose second axis is the first shifted and scaled by 2: D̂ = (1 + 4)/2.
	tr2 := Track{Pos: [][]float64{{0, 1, 3, 2}, {5, 7, 11, 9}}}
	if d, s, n := CVETrack(tr2, 1, 1.0/6); math.Abs(d-2.5) > 1e-12 || math.Abs(s-(1.0/3+4.0/3)/2) > 1e-12 || n != 3 {
		t.Errorf("CVETrack 2-D: %g, %g, %d; want 2.5, 5/6, 3", d, s, n)
	}
}

func TestCVETrackShortAndMisuse(t *testing.T) {
	for _, tr := range []Track{{}, {Pos: [][]float64{{1}}}, {Pos: [][]float64{{1, 2}, {3, 4}}}} {
		d, s, n := CVETrack(tr, 1, 0)
		if !math.IsNaN(d) || !math.IsNaN(s) || n != max(tr.Len()-1, 0) {
			t.Errorf("track of %d points: %g, %g, %d; want NaN, NaN, %d", tr.Len(), d, s, n, max(tr.Len()-1, 0))
		}
	}
	for name, f := range map[string]func(){
		"zero interval": func() { CVETrack(Track{Pos: [][]float64{{0, 1, 2}}}, 0, 0) },
		"blur > 1/4":    func() { CVETrack(Track{Pos: [][]float64{{0, 1, 2}}}, 1, 0.3) },
		"ragged":        func() { CVETrack(Track{Pos: [][]float64{{0, 1, 2}, {0, 1}}}, 1, 0) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic", name)
				}
			}()
			f()
		}()
	}
}

func TestCVEShortTracks(t *testing.T) {
	three := Track{Pos: [][]float64{{0, 1, 3}}}
	if _, err := CVE([]Track{three}, 1, 0, false); err != nil {
		t.Errorf("3 points without drift removal: %v", err)
	}
	for _, c := range []struct {
		tr          Track
		removeDrift bool
		min         float64
	}{
		{Track{Pos: [][]float64{{0, 1}}}, false, 3},
		{three, true, 4},
	} {
		_, err := CVE([]Track{three, c.tr}, 1, 0, c.removeDrift)
		var re *RangeError
		if !errors.As(err, &re) || re.Field != "points" || re.Min != c.min || re.Value != float64(c.tr.Len()) {
			t.Errorf("%d points, removeDrift=%v: got %v, want a points RangeError with minimum %g", c.tr.Len(), c.removeDrift, err, c.min)
		}
	}
}
