package core

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// simAcc accumulates independent samples of one statistic: its mean and the standard error of the mean
// from the sample variance.
type simAcc struct {
	n         int
	sum, sum2 float64
}

func (s *simAcc) add(x float64) { s.n++; s.sum += x; s.sum2 += x * x }

func (s *simAcc) mean() float64 { return s.sum / float64(s.n) }

func (s *simAcc) se() float64 {
	m := s.mean()
	v := (s.sum2 - float64(s.n)*m*m) / float64(s.n-1)
	return math.Sqrt(v / float64(s.n))
}

// simCheck fails unless the sample mean is within 4 standard errors of want (a Monte Carlo tolerance
// derived from the sample itself, as the project's testing rules require).
func simCheck(t *testing.T, name string, s *simAcc, want float64) {
	t.Helper()
	if s.n < 2 {
		t.Fatalf("%s: only %d samples", name, s.n)
	}
	m, se := s.mean(), s.se()
	t.Logf("%s: %.6g vs %.6g (%+.2f SE, SE %.3g, n %d)", name, m, want, (m-want)/se, se, s.n)
	if math.Abs(m-want) > 4*se {
		t.Errorf("%s: sample mean %.6g, want %.6g (|diff| = %.2f standard errors, SE %.3g, n %d)",
			name, m, want, math.Abs(m-want)/se, se, s.n)
	}
}

// simKS returns the Kolmogorov–Smirnov statistic sup|F_n − F| of the sample xs against the CDF cdf.
func simKS(xs []float64, cdf func(float64) float64) float64 {
	ys := slices.Clone(xs)
	sort.Float64s(ys)
	n := float64(len(ys))
	var d float64
	for i, y := range ys {
		f := cdf(y)
		d = max(d, f-float64(i)/n, float64(i+1)/n-f)
	}
	return d
}

// simKSCritical is the 0.1 % critical value of the KS statistic for n samples, from the asymptotic
// Kolmogorov distribution: P(√n·D_n > 1.95) ≈ 0.001 (the quantile 1.9495 is from memory).
func simKSCritical(n int) float64 { return 1.95 / math.Sqrt(float64(n)) }

// A particle of about 50 nm radius in water at 25 °C (D from Stokes–Einstein, see stokes_test.go),
// filmed at 30 frames/s: the invented scenario used by the simulation and estimator tests.
const (
	simD  = 4.9e-12 // m²/s
	simDt = 1.0 / 30
)

func TestRecordingValidate(t *testing.T) {
	good := Recording{D: simD, Dims: 2, Interval: simDt, Exposure: simDt, Sigma: 30e-9, Drift: []float64{1e-7, -2e-7}}
	if err := good.Validate(); err != nil {
		t.Fatalf("valid recording refused: %v", err)
	}
	zero := Recording{D: simD, Dims: 3, Interval: simDt} // instantaneous, noise-free, no drift
	if err := zero.Validate(); err != nil {
		t.Fatalf("valid recording refused: %v", err)
	}
	nan := math.NaN()
	for _, c := range []struct {
		field string
		edit  func(r *Recording)
	}{
		{"dims", func(r *Recording) { r.Dims = 0 }},
		{"dims", func(r *Recording) { r.Dims = 4 }},
		{"diffusion_m2_per_s", func(r *Recording) { r.D = 0 }},
		{"diffusion_m2_per_s", func(r *Recording) { r.D = nan }},
		{"diffusion_m2_per_s", func(r *Recording) { r.D = math.Inf(1) }},
		{"frame_interval_s", func(r *Recording) { r.Interval = -1 }},
		{"frame_interval_s", func(r *Recording) { r.Interval = nan }},
		{"exposure_s", func(r *Recording) { r.Exposure = -1e-3 }},
		{"exposure_s", func(r *Recording) { r.Exposure = 1.01 * simDt }},
		{"exposure_s", func(r *Recording) { r.Exposure = nan }},
		{"sigma_m", func(r *Recording) { r.Sigma = -1e-9 }},
		{"sigma_m", func(r *Recording) { r.Sigma = math.Inf(1) }},
		{"drift_axes", func(r *Recording) { r.Drift = []float64{1e-7} }},
		{"drift_axes", func(r *Recording) { r.Drift = []float64{0, 0, 0} }},
		{"drift_m_per_s", func(r *Recording) { r.Drift = []float64{0, nan} }},
	} {
		r := good
		r.Drift = slices.Clone(good.Drift)
		c.edit(&r)
		err := r.Validate()
		var re *RangeError
		if !errors.As(err, &re) {
			t.Errorf("%s: got %v, want a *RangeError", c.field, err)
			continue
		}
		if re.Field != c.field {
			t.Errorf("got field %q (%v), want %q", re.Field, err, c.field)
		}
	}
}

// simConfig is one recording condition of the simulator tests.
type simConfig struct {
	name string
	rec  Recording
}

func simConfigs() []simConfig {
	return []simConfig{
		{"1D instantaneous noise-free", Recording{D: simD, Dims: 1, Interval: simDt}},
		{"1D full-frame blur noise-free", Recording{D: simD, Dims: 1, Interval: simDt, Exposure: simDt}},
		{"2D half-frame blur 150nm", Recording{D: simD, Dims: 2, Interval: simDt, Exposure: simDt / 2, Sigma: 150e-9}},
		{"3D full-frame blur 250nm", Recording{D: simD, Dims: 3, Interval: simDt, Exposure: simDt, Sigma: 250e-9}},
		{"2D instantaneous 300nm drift", Recording{D: simD, Dims: 2, Interval: simDt, Sigma: 300e-9, Drift: []float64{3e-6, -1e-6}}},
		{"3D 0.3-frame blur 100nm drift", Recording{D: simD, Dims: 3, Interval: simDt, Exposure: 0.3 * simDt, Sigma: 100e-9, Drift: []float64{0, 2e-6, -5e-6}}},
	}
}

// TestSimulateDisplacementMoments checks the displacement statistics of REFERENCES.md §1 (Berglund 2010,
// Phys. Rev. E 82, 011917): mean vΔt, variance 2DΔt(1−2R) + 2σ², lag-1 covariance −(σ² − 2RDΔt), lag-2
// covariance 0, no correlation between axes; and the mean of the first recorded position, v·t_E/2.
// Samples are taken from blocks of four displacements so that they are independent (lag ≥ 2
// displacements are independent Gaussians).
func TestSimulateDisplacementMoments(t *testing.T) {
	src := rand.NewPCG(20240611, 1)
	const tracks, points = 1500, 41
	for _, c := range simConfigs() {
		rec := c.rec
		R := rec.Blur()
		dDt := rec.D * rec.Interval
		s2 := rec.Sigma * rec.Sigma
		var mean, vari, lag1, lag2, cross, start simAcc
		for range tracks {
			tr := Simulate(src, rec, points)
			if tr.Dims() != rec.Dims || tr.Len() != points {
				t.Fatalf("%s: track has %d×%d, want %d×%d", c.name, tr.Dims(), tr.Len(), rec.Dims, points)
			}
			dx := tr.Displacements()
			for a := range dx {
				mu, off := 0.0, 0.0
				if rec.Drift != nil {
					mu, off = rec.Drift[a]*rec.Interval, rec.Drift[a]*rec.Exposure/2
				}
				start.add(tr.Pos[a][0] - off)
				for k := 0; k+2 < len(dx[a]); k += 4 {
					d0, d1, d2 := dx[a][k]-mu, dx[a][k+1]-mu, dx[a][k+2]-mu
					mean.add(d0)
					vari.add(d0 * d0)
					lag1.add(d0 * d1)
					lag2.add(d0 * d2)
					if a > 0 {
						var mu0 float64
						if rec.Drift != nil {
							mu0 = rec.Drift[0] * rec.Interval
						}
						cross.add(d0 * (dx[0][k] - mu0))
					}
				}
			}
		}
		simCheck(t, c.name+": mean displacement − vΔt", &mean, 0)
		simCheck(t, c.name+": variance", &vari, 2*dDt*(1-2*R)+2*s2)
		simCheck(t, c.name+": lag-1 covariance", &lag1, -(s2 - 2*R*dDt))
		simCheck(t, c.name+": lag-2 covariance", &lag2, 0)
		simCheck(t, c.name+": first position − v·t_E/2", &start, 0)
		if rec.Dims > 1 {
			simCheck(t, c.name+": covariance between axes", &cross, 0)
		}
	}
}

// TestSimulateMSD checks the mean squared displacement of the positions about the first one, per axis,
// at lags n = 1..6: 2(DnΔt + σ² − 2RDΔt) (REFERENCES.md §3, E[MSD_n]/d; Michalet 2010, Phys. Rev. E 82,
// 041914).
func TestSimulateMSD(t *testing.T) {
	src := rand.NewPCG(7, 11)
	const tracks, points = 4000, 7
	for _, c := range simConfigs()[:4] {
		rec := c.rec
		R, s2 := rec.Blur(), rec.Sigma*rec.Sigma
		msd := make([]simAcc, points)
		for range tracks {
			tr := Simulate(src, rec, points)
			for a := range tr.Pos {
				for n := 1; n < points; n++ {
					d := tr.Pos[a][n] - tr.Pos[a][0]
					msd[n].add(d * d)
				}
			}
		}
		for n := 1; n < points; n++ {
			want := 2 * (rec.D*float64(n)*rec.Interval + s2 - 2*R*rec.D*rec.Interval)
			simCheck(t, fmt.Sprintf("%s: MSD at lag %d", c.name, n), &msd[n], want)
		}
	}
}

// TestSimulateNoisePerPoint checks point-dependent localisation noise: Var dx_k = 2DΔt(1−2R) + σ_k² +
// σ_{k+1}², Cov(dx_k, dx_{k+1}) = 2RDΔt − σ_{k+1}², Cov(dx_k, dx_{k+2}) = 0 (REFERENCES.md §1 with the
// noise of each point kept apart; Berglund 2010, Phys. Rev. E 82, 011917).
func TestSimulateNoisePerPoint(t *testing.T) {
	src := rand.NewPCG(99, 3)
	sig := []float64{0, 300e-9, 100e-9, 0, 450e-9, 200e-9}
	rec := Recording{D: simD, Dims: 1, Interval: simDt, Exposure: 0.8 * simDt, Sigma: 1 /* ignored */}
	R, dDt := rec.Blur(), rec.D*rec.Interval
	const tracks = 20000
	n := len(sig) - 1
	vari := make([]simAcc, n)
	lag1 := make([]simAcc, n-1)
	lag2 := make([]simAcc, n-2)
	for range tracks {
		tr := SimulateNoise(src, rec, sig)
		if tr.Len() != len(sig) {
			t.Fatalf("track has %d points, want %d", tr.Len(), len(sig))
		}
		dx := tr.Displacements()[0]
		for k := range n {
			vari[k].add(dx[k] * dx[k])
			if k+1 < n {
				lag1[k].add(dx[k] * dx[k+1])
			}
			if k+2 < n {
				lag2[k].add(dx[k] * dx[k+2])
			}
		}
	}
	for k := range n {
		name := fmt.Sprintf("displacement %d", k)
		simCheck(t, name+": variance", &vari[k], 2*dDt*(1-2*R)+sig[k]*sig[k]+sig[k+1]*sig[k+1])
		if k+1 < n {
			simCheck(t, name+": lag-1 covariance", &lag1[k], 2*R*dDt-sig[k+1]*sig[k+1])
		}
		if k+2 < n {
			simCheck(t, name+": lag-2 covariance", &lag2[k], 0)
		}
	}
}

// TestSimulateGaussian checks the distribution, not only the moments: standardised displacements and
// standardised sums of two neighbouring displacements (variance 2a + 2b) follow N(0, 1), by a KS test
// against gonum distuv.UnitNormal.CDF at the 0.1 % level.
func TestSimulateGaussian(t *testing.T) {
	src := rand.NewPCG(5, 5)
	rec := Recording{D: simD, Dims: 2, Interval: simDt, Exposure: simDt, Sigma: 200e-9}
	R, dDt, s2 := rec.Blur(), rec.D*rec.Interval, rec.Sigma*rec.Sigma
	a := 2*dDt*(1-2*R) + 2*s2
	b := -(s2 - 2*R*dDt)
	const tracks = 2000
	var one, two []float64
	for range tracks {
		dx := Simulate(src, rec, 4).Displacements()
		for ax := range dx {
			one = append(one, dx[ax][0]/math.Sqrt(a))
			two = append(two, (dx[ax][1]+dx[ax][2])/math.Sqrt(2*a+2*b))
		}
	}
	for name, xs := range map[string][]float64{"single": one, "pair sum": two} {
		if ks, crit := simKS(xs, distuv.UnitNormal.CDF), simKSCritical(len(xs)); ks > crit {
			t.Errorf("%s: KS statistic %.4f above the 0.1 %% critical value %.4f", name, ks, crit)
		}
	}
}

// TestSimulateNoiseMatchesSimulate: with the same seed and a constant σ > 0 both entry points draw the
// same variates in the same order, so the tracks agree exactly; a different seed gives a different track.
func TestSimulateNoiseMatchesSimulate(t *testing.T) {
	rec := Recording{D: simD, Dims: 3, Interval: simDt, Exposure: simDt / 3, Sigma: 80e-9, Drift: []float64{1e-6, 0, -1e-6}}
	sig := make([]float64, 50)
	for i := range sig {
		sig[i] = rec.Sigma
	}
	a := Simulate(rand.NewPCG(1, 2), rec, len(sig))
	b := SimulateNoise(rand.NewPCG(1, 2), rec, sig)
	c := Simulate(rand.NewPCG(1, 3), rec, len(sig))
	for ax := range a.Pos {
		if !slices.Equal(a.Pos[ax], b.Pos[ax]) {
			t.Errorf("axis %d: Simulate and SimulateNoise differ under the same seed", ax)
		}
		if slices.Equal(a.Pos[ax], c.Pos[ax]) {
			t.Errorf("axis %d: different seeds gave the same track", ax)
		}
		if cap(a.Pos[ax]) != len(sig) {
			t.Errorf("axis %d: capacity %d, want %d (axes must not share spare capacity)", ax, cap(a.Pos[ax]), len(sig))
		}
	}
}

func TestSimulatePanics(t *testing.T) {
	good := Recording{D: simD, Dims: 2, Interval: simDt}
	for name, f := range map[string]func(){
		"invalid recording": func() { Simulate(rand.NewPCG(1, 1), Recording{D: -1, Dims: 2, Interval: simDt}, 10) },
		"no points":         func() { Simulate(rand.NewPCG(1, 1), good, 0) },
		"no sigmas":         func() { SimulateNoise(rand.NewPCG(1, 1), good, nil) },
		"negative sigma":    func() { SimulateNoise(rand.NewPCG(1, 1), good, []float64{1e-9, -1e-9}) },
		"NaN sigma":         func() { SimulateNoise(rand.NewPCG(1, 1), good, []float64{math.NaN()}) },
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
	// One point is a valid (if useless) track.
	if tr := Simulate(rand.NewPCG(1, 1), good, 1); tr.Len() != 1 || tr.Dims() != 2 {
		t.Errorf("one-point track has %d×%d", tr.Dims(), tr.Len())
	}
}
