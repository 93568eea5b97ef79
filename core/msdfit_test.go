package core

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
)

// msdMatrix returns the dense (Npos−1)×(Npos−1) matrix A_n of the per-axis quadratic form
// MSD_n = dxᵀA_n dx: A_n = (1/K)Σ_i u_i u_iᵀ with u_i the indicator of steps i+1..i+n.
func msdMatrix(Npos, n int) *mat.SymDense {
	N := Npos - 1
	K := Npos - n
	a := mat.NewSymDense(N, nil)
	for i := 0; i < K; i++ {
		for j := i; j < i+n; j++ {
			for l := j; l < i+n; l++ {
				a.SetSym(j, l, a.At(j, l)+1/float64(K))
			}
		}
	}
	return a
}

// msdCovDirect is Cov(MSD_n, MSD_m) per axis by the plain sum over offsets δ of count(δ)·c(δ)², with
// c(δ) from the variogram by polarisation: the O(n+m) reference for the piecewise closed form.
func msdCovDirect(u, beta float64, Npos, n, m int) float64 {
	V := func(k int) float64 {
		if k == 0 {
			return 0
		}
		return 2*u*math.Abs(float64(k)) + 2*beta
	}
	kn, km := Npos-n, Npos-m
	sum := 0.0
	for d := -(km - 1); d <= kn-1; d++ {
		cnt := 0
		for l := 0; l < km; l++ {
			if i := l + d; i >= 0 && i < kn {
				cnt++
			}
		}
		c := 0.5 * (V(d+n) + V(d-m) - V(d+n-m) - V(d))
		sum += float64(cnt) * c * c
	}
	return 2 * sum / float64(kn*km)
}

func TestMSDCovarianceAgainstDenseTrace(t *testing.T) {
	// Reference: 2·tr(A_nΣA_mΣ)·dims with gonum mat products (tolerance 1e-10 of the diagonal scale);
	// also E[MSD_n] = tr(A_nΣ) = V(n) = 2DnΔt + 2(s2 − 2RDΔt) per axis.
	for _, Npos := range []int{2, 3, 6, 17} {
		for _, mdl := range covModels {
			S := tridiagonal(NewStepCovariance(mdl.D, mdl.dt, mdl.R, mdl.s2), Npos-1)
			for _, dims := range []int{1, 3} {
				C := MSDCovariance(mdl.D, mdl.dt, mdl.R, mdl.s2, Npos, Npos-1, dims)
				for n := 1; n < Npos; n++ {
					An := msdMatrix(Npos, n)
					var as mat.Dense
					as.Mul(An, S)
					if want := 2*mdl.D*float64(n)*mdl.dt + 2*(mdl.s2-2*mdl.R*mdl.D*mdl.dt); !approxRel(mat.Trace(&as), want, 1e-10) {
						t.Errorf("Npos=%d n=%d: E MSD %g, want %g", Npos, n, mat.Trace(&as), want)
					}
					for m := 1; m < Npos; m++ {
						var bs, p mat.Dense
						bs.Mul(msdMatrix(Npos, m), S)
						p.Mul(&as, &bs)
						ref := 2 * float64(dims) * mat.Trace(&p)
						scale := math.Sqrt(C[n-1][n-1] * C[m-1][m-1])
						if math.Abs(C[n-1][m-1]-ref) > 1e-10*scale {
							t.Errorf("Npos=%d %+v dims=%d (n,m)=(%d,%d): %g, dense %g", Npos, mdl, dims, n, m, C[n-1][m-1], ref)
						}
					}
				}
			}
		}
	}
}

func TestMSDCovarianceClosedFormAgainstDirectSum(t *testing.T) {
	// Exact identity: the piecewise closed-form sum equals the plain sum over offsets (1e-12).
	Npos := 60
	for _, mdl := range covModels {
		v := newMSDVariogram(mdl.D, mdl.dt, mdl.R, mdl.s2, Npos)
		for n := 1; n < Npos; n += 3 {
			for m := 1; m < Npos; m += 2 {
				got, want := v.cov(n, m), msdCovDirect(v.u, v.beta, Npos, n, m)
				scale := math.Sqrt(v.cov(n, n) * v.cov(m, m))
				if math.Abs(got-want) > 1e-12*scale {
					t.Fatalf("%+v (n,m)=(%d,%d): closed form %g, direct %g", mdl, n, m, got, want)
				}
			}
		}
	}
}

func TestQianRelVarMatchesMSDCovariance(t *testing.T) {
	// Qian, Sheetz & Elson 1991 (Biophys. J. 60, 910) relative variance of the noise-free MSD, both
	// branches (n ≤ K and n > K), against the exact quadratic-form covariance at s2 = 0, R = 0: they agree
	// to 1e-12 for every lag, in 1, 2 and 3 dimensions.
	D, dt := 1.5e-12, 0.04
	for _, Npos := range []int{2, 5, 30, 201} {
		for _, dims := range []int{1, 2, 3} {
			C := MSDCovariance(D, dt, 0, 0, Npos, Npos-1, dims)
			worst := 0.0
			for n := 1; n < Npos; n++ {
				mean := float64(dims) * 2 * D * float64(n) * dt
				got := C[n-1][n-1] / (mean * mean)
				want := QianRelVar(n, Npos-n, dims)
				worst = math.Max(worst, math.Abs(got-want)/want)
			}
			if worst > 1e-12 {
				t.Errorf("Npos=%d dims=%d: largest relative difference %g", Npos, dims, worst)
			}
			if dims == 2 {
				t.Logf("Npos=%d: Qian vs exact covariance, largest relative difference %.2g", Npos, worst)
			}
		}
	}
}

func TestVarMSDFitAgainstQuadraticForm(t *testing.T) {
	// Reference: wᵀCw/(2dΔt)² with w the OLS slope weights and C = MSDCovariance, evaluated with gonum
	// mat.Inner (1e-12); dims divides the variance.
	for _, mdl := range covModels {
		for _, lags := range []int{2, 3, 10, 29} {
			Npos, dims := 30, 2
			C := MSDCovariance(mdl.D, mdl.dt, mdl.R, mdl.s2, Npos, lags, dims)
			cm := mat.NewSymDense(lags, nil)
			w := mat.NewVecDense(lags, nil)
			L := float64(lags)
			for n := 0; n < lags; n++ {
				w.SetVec(n, (float64(n+1)-(L+1)/2)/(L*(L*L-1)/12))
				for m := n; m < lags; m++ {
					cm.SetSym(n, m, C[n][m])
				}
			}
			g := 2 * float64(dims) * mdl.dt
			want := mat.Inner(w, cm, w) / (g * g)
			if got := VarMSDFit(mdl.D, mdl.dt, mdl.R, mdl.s2, Npos, lags, dims); !approxRel(got, want, 1e-12) {
				t.Errorf("%+v lags=%d: VarMSDFit %g, wᵀCw %g", mdl, lags, got, want)
			}
		}
	}
}

func TestOptimalLags(t *testing.T) {
	// The one-pass running sums must pick the same lag count as a direct scan of VarMSDFit (both exact
	// up to rounding), the optimum must be 2 without noise and blur (Michalet 2010: fit the first two
	// points when x = 0), and it must not decrease as x = s2/(DΔt) grows.
	D, dt, Npos := 1e-12, 0.02, 100
	prev := 0
	for _, x := range []float64{0, 0.01, 0.1, 0.3, 1, 3, 10, 30, 100} {
		s2 := x * D * dt
		got := OptimalLags(D, dt, 0, s2, Npos, 2)
		best, bestVar := 0, math.Inf(1)
		for L := 2; L < Npos; L++ {
			v := VarMSDFit(D, dt, 0, s2, Npos, L, 2)
			if v < bestVar {
				best, bestVar = L, v
			}
		}
		if got != best {
			// Accept a different argmin only at a numerical tie.
			if vg := VarMSDFit(D, dt, 0, s2, Npos, got, 2); math.Abs(vg-bestVar) > 1e-9*bestVar {
				t.Errorf("x=%g: OptimalLags %d, direct scan %d", x, got, best)
			}
		}
		if got < prev {
			t.Errorf("x=%g: optimum %d fell below %d", x, got, prev)
		}
		prev = got
		t.Logf("Npos=%d x=%g: optimal lags %d, Var(D̂)/D² = %.4g (2 lags: %.4g)", Npos, x, got,
			bestVar/(D*D), VarMSDFit(D, dt, 0, s2, Npos, 2, 2)/(D*D))
	}
	if l := OptimalLags(D, dt, 0, 0, Npos, 1); l != 2 {
		t.Errorf("x=0: optimal lags %d, want 2", l)
	}
	if a, b := OptimalLags(D, dt, 0, 10*D*dt, Npos, 1), OptimalLags(D, dt, 0, 10*D*dt, Npos, 3); a != b {
		t.Errorf("optimum depends on dims: %d vs %d", a, b)
	}
}

func TestOptimalLagsRunningSumsPrecision(t *testing.T) {
	// The running-sum variances of OptimalLags lose digits to cancellation: measure it against the
	// direct VarMSDFit for all lag counts, up to strong noise (a large common mode).
	D, dt := 1e-12, 0.02
	for _, x := range []float64{0, 10, 1000} {
		Npos := 120
		v := newMSDVariogram(D, dt, 0, x*D*dt, Npos)
		var s0, s1, s2w float64
		worst := 0.0
		for L := 1; L < Npos; L++ {
			fl := float64(L)
			for m := 1; m <= L; m++ {
				c, fm := v.cov(L, m), float64(m)
				if m == L {
					s0, s1, s2w = s0+c, s1+fl*c, s2w+fl*fl*c
				} else {
					s0, s1, s2w = s0+2*c, s1+(fl+fm)*c, s2w+2*fl*fm*c
				}
			}
			if L < 2 {
				continue
			}
			nbar, sxx := (fl+1)/2, fl*(fl*fl-1)/12
			g := 2 * dt * sxx
			run := (s2w - 2*nbar*s1 + nbar*nbar*s0) / (g * g)
			worst = math.Max(worst, math.Abs(run/VarMSDFit(D, dt, 0, x*D*dt, Npos, L, 1)-1))
		}
		if worst > 1e-9 {
			t.Errorf("x=%g Npos=%d: running sums off by %g relative", x, Npos, worst)
		}
		t.Logf("x=%g Npos=%d: running-sum variance within %.2g of VarMSDFit", x, Npos, worst)
	}
}

func TestMSDByHand(t *testing.T) {
	// Invented 1-D track 0, 1, 3, 6 m (exact arithmetic): lag 1 (1+4+9)/3, lag 2 (9+25)/2, lag 3 36;
	// pooled with the 2-point track 0, 2: lag 1 (14+4)/4. Lag 4 has no pairs.
	a := Track{Pos: [][]float64{{0, 1, 3, 6}}}
	b := Track{Pos: [][]float64{{0, 2}}}
	msd, cnt := MSD([]Track{a, b}, 4)
	want := []float64{18.0 / 4, 17, 36}
	wantCnt := []int{4, 2, 1, 0}
	for k := range want {
		if msd[k] != want[k] || cnt[k] != wantCnt[k] {
			t.Errorf("lag %d: MSD %g (count %d), want %g (%d)", k+1, msd[k], cnt[k], want[k], wantCnt[k])
		}
	}
	if !math.IsNaN(msd[3]) || cnt[3] != 0 {
		t.Errorf("lag 4: %g (count %d), want NaN (0)", msd[3], cnt[3])
	}
	// Axes are summed: a 2-D track whose second axis repeats the first doubles every value.
	c := Track{Pos: [][]float64{{0, 1, 3, 6}, {0, 1, 3, 6}}}
	m2, _ := MSD([]Track{c}, 3)
	if m2[0] != 2*14.0/3 || m2[2] != 72 {
		t.Errorf("2-D: %v", m2)
	}
}

func TestMSDFitMatchesGonumRegression(t *testing.T) {
	// Reference: gonum stat.LinearRegression of the pooled MSD against the lag (tolerance 1e-10), and the
	// mapping slope → D, intercept → s2 with blur.
	src := rand.NewPCG(7, 7)
	rec := Recording{D: 2e-12, Dims: 2, Interval: 0.03, Exposure: 0.015, Sigma: 5e-8}
	tracks := []Track{Simulate(src, rec, 40), Simulate(src, rec, 25), Simulate(src, rec, 60)}
	R, lags := rec.Blur(), 8
	est, err := MSDFit(tracks, rec.Interval, R, lags)
	if err != nil {
		t.Fatal(err)
	}
	msd, _ := MSD(tracks, lags)
	x := make([]float64, lags)
	for k := range x {
		x[k] = float64(k + 1)
	}
	alpha, beta := stat.LinearRegression(x, msd, nil, false)
	D := beta / (2 * 2 * rec.Interval)
	s2 := alpha/(2*2) + 2*R*D*rec.Interval
	if !approxRel(est.D, D, 1e-10) || math.Abs(est.S2-s2) > 1e-10*math.Abs(s2)+1e-10*D*rec.Interval {
		t.Errorf("MSDFit D %g s2 %g, gonum %g %g", est.D, est.S2, D, s2)
	}
	if est.Displacements != 39+24+59 || est.Tracks != 3 {
		t.Errorf("counts %d %d", est.Displacements, est.Tracks)
	}
}

func TestMSDFitErrors(t *testing.T) {
	good := Track{Pos: [][]float64{{0, 1, 2, 4, 3}}}
	var re *RangeError
	cases := []struct {
		name   string
		tracks []Track
		dt, R  float64
		lags   int
		field  string
		target error
	}{
		{"lags<2", []Track{good}, 1, 0, 1, "lags", nil},
		{"lags too long", []Track{good}, 1, 0, 5, "lags", nil},
		{"blur", []Track{good}, 1, 0.3, 2, "blur", nil},
		{"interval", []Track{good}, 0, 0, 2, "frame_interval_s", nil},
		{"one point", []Track{good, {Pos: [][]float64{{1}}}}, 1, 0, 2, "points", nil},
		{"no tracks", nil, 1, 0, 2, "", ErrNoTracks},
		{"dims differ", []Track{good, {Pos: [][]float64{{0, 1, 2}, {0, 1, 2}}}}, 1, 0, 2, "", ErrDimsDiffer},
		{"ragged", []Track{{Pos: [][]float64{{0, 1, 2}, {0, 1}}}}, 1, 0, 2, "", ErrRagged},
		{"NaN", []Track{{Pos: [][]float64{{0, math.NaN(), 2}}}}, 1, 0, 2, "", ErrNonFinite},
	}
	for _, c := range cases {
		_, err := MSDFit(c.tracks, c.dt, c.R, c.lags)
		switch {
		case err == nil:
			t.Errorf("%s: no error", c.name)
		case c.target != nil && !errors.Is(err, c.target):
			t.Errorf("%s: error %v, want %v", c.name, err, c.target)
		case c.field != "" && (!errors.As(err, &re) || re.Field != c.field):
			t.Errorf("%s: error %v, want a RangeError on %q", c.name, err, c.field)
		}
	}
	if _, err := MSDFit([]Track{good}, 1, 0, 4); err != nil {
		t.Errorf("lags = points − 1 refused: %v", err)
	}
}

func TestVarMSDFitBySimulation(t *testing.T) {
	// Sample variance of MSDFit estimates from 3000 simulated 20-point tracks (fixed seed) against
	// VarMSDFit, and the means of D̂ and ŝ2 against the true values (4 standard errors, from the sample).
	src := rand.NewPCG(20240611, 3)
	for _, rec := range mcRecordings {
		R, s2 := rec.Blur(), rec.Sigma*rec.Sigma
		const M, points, lags = 3000, 20, 4
		ds := make([]float64, M)
		ss := make([]float64, M)
		for i := range ds {
			est, err := MSDFit([]Track{Simulate(src, rec, points)}, rec.Interval, R, lags)
			if err != nil {
				t.Fatal(err)
			}
			ds[i], ss[i] = est.D, est.S2
		}
		want := VarMSDFit(rec.D, rec.Interval, R, s2, points, lags, rec.Dims)
		checkSampleVariance(t, "MSDFit", ds, want)
		for _, q := range []struct {
			name  string
			xs    []float64
			truth float64
		}{{"D", ds, rec.D}, {"s2", ss, s2}} {
			mean, sd := stat.MeanStdDev(q.xs, nil)
			if se := sd / math.Sqrt(M); math.Abs(mean-q.truth) > 4*se {
				t.Errorf("MSDFit mean %s %g, truth %g (SE %g)", q.name, mean, q.truth, se)
			}
		}
	}
}
