package uncertainty

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"sizebudget/core"
)

// analysisSettings are the conditions of the invented demo scenario (water at 25 °C ± 0.5 K, 30
// frames/s, 10 ms exposure) with a fixed number of Monte Carlo trials.
func analysisSettings() Scenario {
	s := Demo()
	s.Trials = 2000
	return s
}

// simulateTracks simulates tracks of the given lengths (positions) recorded as rec.
func simulateTracks(r *rand.Rand, rec core.Recording, lengths []int) []core.Track {
	out := make([]core.Track, len(lengths))
	for i, n := range lengths {
		out[i] = core.Simulate(randSource{r}, rec, n)
	}
	return out
}

// mixedLengths returns m track lengths drawn uniformly from lo..hi positions.
func mixedLengths(r *rand.Rand, m, lo, hi int) []int {
	l := make([]int, m)
	for i := range l {
		l[i] = lo + r.IntN(hi-lo+1)
	}
	return l
}

// demoRecording is the recording of the settings for a particle of radius rNM (nm) at the nominal
// temperature, with localisation precision sigma (m).
func demoRecording(t *testing.T, s Scenario, rNM, sigma float64) core.Recording {
	t.Helper()
	m, err := s.MediumModel()
	if err != nil {
		t.Fatal(err)
	}
	T := s.TemperatureC + 273.15
	eta, err := m.Viscosity(T)
	if err != nil {
		t.Fatal(err)
	}
	return core.Recording{D: core.Diffusion(T, eta, rNM*1e-9), Dims: s.Dims, Interval: s.FrameIntervalS, Exposure: s.ExposureS, Sigma: sigma}
}

func TestAnalyzePoolsLikeCVE(t *testing.T) {
	// The pooled D̂ and σ̂² are core.CVE's (an identity of the displacement-weighted pooling, 1e-12
	// relative), the radius is Stokes–Einstein of D̂ at the nominal temperature and viscosity, and the
	// scenario handed to the engine carries the data's D̂, σ̂, axes and track lengths.
	s := analysisSettings()
	r := rand.New(rand.NewPCG(1, 2))
	rec := demoRecording(t, s, 60, 35e-9)
	lengths := mixedLengths(r, 60, 5, 80)
	tracks := simulateTracks(r, rec, lengths)
	a, err := Analyze(context.Background(), Tracks(tracks), s, PlanOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	e, err := core.CVE(tracks, s.FrameIntervalS, rec.Blur(), false)
	if err != nil {
		t.Fatal(err)
	}
	rel := func(x, y float64) float64 { return math.Abs(x-y) / math.Abs(y) }
	if rel(a.DiffusionRawUM2PerS, e.D*1e12) > 1e-12 || rel(a.LocalisationVarNM2, e.S2*1e18) > 1e-12 ||
		a.Displacements != e.Displacements || a.TracksUsed != len(tracks) || a.TracksDropped != 0 || a.Dims != 2 {
		t.Errorf("analysis D %.15g, σ² %.15g, %d displacements, %d tracks; core.CVE %.15g, %.15g, %d",
			a.DiffusionRawUM2PerS, a.LocalisationVarNM2, a.Displacements, a.TracksUsed, e.D*1e12, e.S2*1e18, e.Displacements)
	}
	if a.Drift.Corrected || a.DiffusionUM2PerS != a.DiffusionRawUM2PerS {
		t.Errorf("drift corrected without drift: %+v", a.Drift)
	}
	m, _ := s.MediumModel()
	eta, _ := m.Viscosity(s.TemperatureC + 273.15)
	if want := core.Radius(s.TemperatureC+273.15, eta, e.D) * 1e9; rel(a.RadiusNM, want) > 1e-12 {
		t.Errorf("radius %.15g nm, Stokes–Einstein of D̂ %.15g", a.RadiusNM, want)
	}
	if !(a.IntervalNM[0] < a.RadiusNM && a.RadiusNM < a.IntervalNM[1]) || a.Coverage != 0.95 {
		t.Errorf("interval %v around %g at %g", a.IntervalNM, a.RadiusNM, a.Coverage)
	}
	ps := a.Plan.Scenario
	total := 0
	for _, g := range ps.TrackLengths {
		total += g.Count
	}
	if ps.Dims != 2 || total != len(tracks) || ps.Estimator != "cve" || rel(ps.LocalisationNM, math.Sqrt(e.S2)*1e9) > 1e-12 ||
		rel(ps.DiffusionUM2PerS, e.D*1e12) > 1e-12 || ps.RadiusNM != 0 {
		t.Errorf("engine scenario %+v", ps)
	}
	if a.Positions.Min != slices.Min(lengths) || a.Positions.Max != slices.Max(lengths) {
		t.Errorf("positions %+v", a.Positions)
	}
	// Only the documented fields of the settings count: a planned particle, tracks and noise are ignored.
	s2 := s
	s2.RadiusNM, s2.Frames, s2.Tracks, s2.LocalisationNM, s2.Estimator, s2.DriftUMPerS = 500, 7, 3, 999, "msd", 5
	b, err := Analyze(context.Background(), Tracks(tracks), s2, PlanOptions{Workers: 1})
	if err != nil || b.IntervalNM != a.IntervalNM || b.RadiusNM != a.RadiusNM {
		t.Errorf("ignored fields changed the result: %v, %v vs %v", err, b, a.IntervalNM)
	}
}

func TestAnalyzeSingleLength(t *testing.T) {
	// Tracks of one length go to the engine as frames × tracks.
	s := analysisSettings()
	r := rand.New(rand.NewPCG(3, 4))
	tracks := simulateTracks(r, demoRecording(t, s, 50, 30e-9), slices.Repeat([]int{25}, 30))
	a, err := Analyze(context.Background(), Tracks(tracks), s, PlanOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if ps := a.Plan.Scenario; ps.Frames != 25 || ps.Tracks != 30 || ps.TrackLengths != nil {
		t.Errorf("scenario frames %d, tracks %d, lengths %v", ps.Frames, ps.Tracks, ps.TrackLengths)
	}
}

func TestEngineLengths(t *testing.T) {
	// Lengths up to 32 are kept exactly; longer ones are grouped in bins 25 % wide at their mean
	// length. Counts are kept, and the pooled relative variance of the CVE (the engine's track
	// statistics) changes by less than 1e-3 relative (the claim in Analyze's documentation).
	hist := map[int]int{}
	r := rand.New(rand.NewPCG(5, 6))
	for range 5000 {
		hist[5+r.IntN(600)]++
	}
	groups := engineLengths(hist)
	exact := make([]LengthGroup, 0, len(hist))
	tracks := 0
	for n, c := range hist {
		exact = append(exact, LengthGroup{Frames: n, Count: c})
		tracks += c
	}
	sum := 0
	for i, g := range groups {
		sum += g.Count
		if g.Frames <= exactLengths && g.Count != hist[g.Frames] {
			t.Errorf("group %+v: %d tracks of that length", g, hist[g.Frames])
		}
		if i > 0 && g.Frames <= groups[i-1].Frames {
			t.Errorf("groups not increasing: %v", groups)
		}
	}
	if sum != tracks || len(groups) > 50 {
		t.Errorf("%d groups holding %d tracks, want %d tracks in few groups", len(groups), sum, tracks)
	}
	s := Demo()
	s.Frames, s.Tracks = 605, tracks
	u, err := newSetup(s)
	if err != nil {
		t.Fatal(err)
	}
	ve, vg := u.trackRelVar(exact), u.trackRelVar(groups)
	if math.Abs(vg/ve-1) > 1e-3 {
		t.Errorf("pooled relative variance %.6g grouped, %.6g exact", vg, ve)
	}
}

// TestLagProductVariance checks the variance of a lag-k sum of products used by the free-diffusion
// check, K·a² + 2(K − 1)·b², against the exact variance of the quadratic form dxᵀA·dx of Gaussian
// displacements with tridiagonal covariance Σ = tridiag(b, a, b), 2·tr(AΣAΣ) with A symmetric
// (gonum mat): an analytic identity, 1e-12 relative.
func TestLagProductVariance(t *testing.T) {
	for _, c := range []struct {
		N, k int
		a, b float64
	}{{12, 2, 3, -0.7}, {12, 3, 3, -0.7}, {5, 2, 1, -0.5}, {4, 3, 2, 0.2}, {30, 2, 1.3, -0.01}} {
		S := mat.NewSymDense(c.N, nil)
		A := mat.NewSymDense(c.N, nil)
		for i := range c.N {
			S.SetSym(i, i, c.a)
			if i+1 < c.N {
				S.SetSym(i, i+1, c.b)
			}
			if i+c.k < c.N {
				A.SetSym(i, i+c.k, 0.5)
			}
		}
		var AS, ASAS mat.Dense
		AS.Mul(A, S)
		ASAS.Mul(&AS, &AS)
		want := 2 * mat.Trace(&ASAS)
		K := float64(c.N - c.k)
		got := K*c.a*c.a + 2*(K-1)*c.b*c.b
		if math.Abs(got-want) > 1e-12*want {
			t.Errorf("N %d lag %d: K·a² + 2(K−1)·b² = %.15g, 2·tr(AΣAΣ) = %.15g", c.N, c.k, got, want)
		}
	}
}

func TestVarTridiagForm(t *testing.T) {
	// The closed form of 2·tr(QΣQΣ) against the matrix product (gonum mat), an analytic identity
	// (1e-12 relative); with the CVE's coefficients it is core.VarCVEExact times the axes.
	for _, c := range []struct {
		N            int
		q0, q1, a, b float64
		D, dt, R, s2 float64
		dims         int
	}{
		{N: 2, q0: 0.3, q1: -0.2, a: 2, b: -0.4},
		{N: 9, q0: 0.05, q1: -0.45, a: 1.1, b: 0.3},
		{N: 40, q0: 1, q1: 0.5, a: 3, b: -1.4},
	} {
		S := mat.NewSymDense(c.N, nil)
		Q := mat.NewSymDense(c.N, nil)
		for i := range c.N {
			S.SetSym(i, i, c.a)
			Q.SetSym(i, i, c.q0)
			if i+1 < c.N {
				S.SetSym(i, i+1, c.b)
				Q.SetSym(i, i+1, c.q1)
			}
		}
		var QS, QSQS mat.Dense
		QS.Mul(Q, S)
		QSQS.Mul(&QS, &QS)
		want := 2 * mat.Trace(&QSQS)
		if got := varTridiagForm(c.q0, c.q1, c.a, c.b, c.N); math.Abs(got-want) > 1e-12*math.Abs(want) {
			t.Errorf("N %d: closed form %.15g, 2·tr(QΣQΣ) %.15g", c.N, got, want)
		}
	}
	D, dt, R, s2 := 4.4e-12, 0.033, 0.05, 1.6e-15
	for _, N := range []int{2, 5, 30} {
		a, b := 2*D*dt*(1-2*R)+2*s2, -(s2 - 2*R*D*dt)
		got := varTridiagForm(1/(2*float64(N)*dt), 1/(2*float64(N-1)*dt), a, b, N) / 2
		if want := core.VarCVEExact(D, dt, R, s2, N, 2); math.Abs(got-want) > 1e-12*want {
			t.Errorf("N %d: CVE variance %.15g, core.VarCVEExact %.15g", N, got, want)
		}
	}
}

func TestLocalisationStandardError(t *testing.T) {
	// The standard error of σ̂² is right: over repeated data sets, the spread of σ̂² agrees with the
	// exact standard deviation at the true D and σ² (variance ratio within 4·√(2/(n−1))).
	s := analysisSettings()
	r := rand.New(rand.NewPCG(19, 20))
	rec := demoRecording(t, s, 150, 60e-9)
	lengths := []int{5, 9, 20, 6, 33, 12, 50}
	const n = 3000
	var sum, sum2 float64
	for range n {
		acc := accumulate(t, s, simulateTracks(r, rec, lengths))
		v := acc.sumNS2 / float64(acc.sumN)
		sum, sum2 = sum+v, sum2+v*v
	}
	ns := make([]int, len(lengths))
	for i, l := range lengths {
		ns[i] = l - 1
	}
	want := core.PooledVariance(ns, func(N int) float64 { return varS2(rec.D, rec.Interval, rec.Blur(), rec.Sigma*rec.Sigma, N, 2) })
	got := (sum2 - sum*sum/n) / (n - 1)
	if tol := 4 * math.Sqrt(2.0/(n-1)); math.Abs(got/want-1) > tol {
		t.Errorf("Var σ̂² = %.4g m⁴ over the data sets, exact %.4g (ratio off by more than %.3f)", got, want, tol)
	}
	if m := sum / n; math.Abs(m-rec.Sigma*rec.Sigma) > 4*math.Sqrt(want/n) {
		t.Errorf("σ̂² averages %.4g m², true %.4g", m, rec.Sigma*rec.Sigma)
	}
}

// accumulate runs the per-track pass of the analysis over tracks.
func accumulate(t *testing.T, s Scenario, tracks []core.Track) *accumulator {
	t.Helper()
	acc := &accumulator{dt: s.FrameIntervalS, blur: s.ExposureS / (6 * s.FrameIntervalS), lengths: map[int]int{}}
	for _, tr := range tracks {
		if err := acc.add(tr); err != nil {
			t.Fatal(err)
		}
	}
	return acc
}

// pooled returns the pooled D̂ and σ̂² (≥ 0) of an accumulator.
func (acc *accumulator) pooled() (D, s2 float64) {
	return acc.sumND / float64(acc.sumN), math.Max(acc.sumNS2/float64(acc.sumN), 0)
}

func TestFreeDiffusionNull(t *testing.T) {
	// Under free diffusion with white noise (and blur), the z of the lag-2 and lag-3 checks is close to
	// standard normal, also when the tracks mix two diffusion coefficients (their own moments enter
	// the variance). Mean within 4 SE (1/√n) of 0, standard deviation within 4 SE (≈ 1/√(2n)) of 1.
	s := analysisSettings()
	r := rand.New(rand.NewPCG(7, 8))
	slow, fast := demoRecording(t, s, 150, 30e-9), demoRecording(t, s, 40, 30e-9)
	const n = 1500
	var z [2][]float64
	for range n {
		var tracks []core.Track
		tracks = append(tracks, simulateTracks(r, slow, mixedLengths(r, 10, 5, 40))...)
		tracks = append(tracks, simulateTracks(r, fast, mixedLengths(r, 10, 5, 40))...)
		acc := accumulate(t, s, tracks)
		D, s2 := acc.pooled()
		_, mu := acc.drift(D, s2)
		for i, c := range acc.lagChecks(mu) {
			z[i] = append(z[i], c.Z)
		}
	}
	for i, zs := range z {
		var m, v float64
		for _, x := range zs {
			m += x
		}
		m /= n
		for _, x := range zs {
			v += (x - m) * (x - m)
		}
		sd := math.Sqrt(v / (n - 1))
		if math.Abs(m) > 4/math.Sqrt(n) || math.Abs(sd-1) > 4/math.Sqrt(2*n) {
			t.Errorf("lag %d: z has mean %.3f (4 SE %.3f) and sd %.3f (4 SE %.3f)", lags[i], m, 4/math.Sqrt(n), sd, 4/math.Sqrt(2*n))
		}
	}
}

func TestFreeDiffusionDetectsConfinement(t *testing.T) {
	// A particle held in a harmonic trap (a stationary Ornstein–Uhlenbeck process, sampled exactly:
	// x_{i+1} = ρ·x_i + √(1 − ρ²)·L·z) has displacements that reverse. With autocovariance L²ρ^h,
	// Cov(dx_j, dx_{j+2}) = −L²ρ(1−ρ)² and Var dx = 2L²(1−ρ), so the lag-2 correlation is exactly
	// −ρ(1−ρ)/2: over repeated data sets the check's ρ₂ averages to it (within 4 SE of the mean, from
	// the spread of the data sets). The analysis names lag 2 in a warning, its z far below −4.
	s := analysisSettings()
	r := rand.New(rand.NewPCG(9, 10))
	const rho, L = 0.8, 200e-9
	trapped := func() []core.Track {
		var tracks []core.Track
		for range 40 {
			tr := core.Track{Pos: [][]float64{make([]float64, 50), make([]float64, 50)}}
			for _, p := range tr.Pos {
				p[0] = L * r.NormFloat64()
				for i := 1; i < len(p); i++ {
					p[i] = rho*p[i-1] + math.Sqrt(1-rho*rho)*L*r.NormFloat64()
				}
			}
			tracks = append(tracks, tr)
		}
		return tracks
	}
	const n = 200
	var sum, sum2 float64
	for range n {
		acc := accumulate(t, s, trapped())
		D, s2 := acc.pooled()
		_, mu := acc.drift(D, s2)
		c := acc.lagChecks(mu)[0].Correlation
		sum, sum2 = sum+c, sum2+c*c
	}
	mean := sum / n
	se := math.Sqrt((sum2/n - mean*mean) / (n - 1))
	if want := -rho * (1 - rho) / 2; math.Abs(mean-want) > 4*se {
		t.Errorf("lag-2 correlation averages %.5f, exact %.5f (4 SE %.5f)", mean, want, 4*se)
	}
	a, err := Analyze(context.Background(), Tracks(trapped()), s, PlanOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if len(a.FreeDiffusion) != 2 || a.FreeDiffusion[0].Lag != 2 || a.FreeDiffusion[0].Z > -FreeDiffusionZ {
		t.Fatalf("checks %+v", a.FreeDiffusion)
	}
	if !slices.ContainsFunc(a.Warnings, func(w string) bool { return strings.HasPrefix(w, "free diffusion: displacements 2 frames apart") }) {
		t.Errorf("no warning naming lag 2: %q", a.Warnings)
	}
}

func TestDriftStandardError(t *testing.T) {
	// The standard error of the mean velocity is exact under free diffusion: the variance of v̂ over
	// repeated data sets agrees with SE² at the true D and σ² (within 4 SE of a variance estimate,
	// √(2/(n−1)) relative), and the plug-in SE at the data's own D̂, σ̂² agrees on average.
	s := analysisSettings()
	r := rand.New(rand.NewPCG(11, 12))
	rec := demoRecording(t, s, 80, 40e-9)
	const n = 3000
	var sum2, plug float64
	lengths := []int{5, 9, 20, 6, 33, 12}
	for range n {
		acc := accumulate(t, s, simulateTracks(r, rec, lengths))
		D, s2 := acc.pooled()
		dr, _ := acc.drift(D, s2)
		sum2 += dr.VelocityUMPerS[0] * dr.VelocityUMPerS[0]
		plug += dr.StdErrUMPerS[0] * dr.StdErrUMPerS[0]
	}
	acc := accumulate(t, s, simulateTracks(r, rec, lengths))
	dr, _ := acc.drift(rec.D, rec.Sigma*rec.Sigma)
	want := dr.StdErrUMPerS[0] * dr.StdErrUMPerS[0]
	tol := 4 * math.Sqrt(2.0/(n-1))
	if got := sum2 / n; math.Abs(got/want-1) > tol {
		t.Errorf("Var v̂ = %.5g (µm/s)², SE² = %.5g; ratio off by more than %.3f", got, want, tol)
	}
	if got := plug / n; math.Abs(got/want-1) > tol {
		t.Errorf("mean plug-in SE² = %.5g, exact %.5g", got, want)
	}
}

func TestDriftCorrection(t *testing.T) {
	// A common drift of (3, −2) µm/s: the estimated velocity is within 4 SE of it, the drift is found
	// to matter, and over repeated data sets the corrected D̂ and σ̂² are unbiased (means within 4 SE of
	// the true values) while the uncorrected D̂ is biased by 1.5·|v|²Δt/d (within 4 SE).
	s := analysisSettings()
	r := rand.New(rand.NewPCG(13, 14))
	rec := demoRecording(t, s, 50, 30e-9)
	rec.Drift = []float64{3e-6, -2e-6}
	bias := 1.5 * (9e-12 + 4e-12) * rec.Interval / 2
	const n = 400
	var raw, corr, raw2, corr2, noise, noise2 float64
	se := func(s, s2 float64) float64 { return math.Sqrt((s2/n - s*s/n/n) / (n - 1)) }
	lengths := slices.Repeat([]int{40}, 50)
	for i := range n {
		acc := accumulate(t, s, simulateTracks(r, rec, lengths))
		D, s2 := acc.pooled()
		dr, _ := acc.drift(D, s2)
		if !dr.Matters {
			t.Fatalf("data set %d: drift does not matter: %+v", i, dr)
		}
		if i == 0 {
			for a, v := range rec.Drift {
				if math.Abs(dr.VelocityUMPerS[a]-v*1e6) > 4*dr.StdErrUMPerS[a] {
					t.Errorf("axis %d: v̂ = %.4g ± %.2g µm/s, true %.4g", a, dr.VelocityUMPerS[a], dr.StdErrUMPerS[a], v*1e6)
				}
			}
		}
		dD, ds2 := dr.bias(D, rec.Interval, rec.Blur())
		c := D - dD
		raw, corr, raw2, corr2 = raw+D, corr+c, raw2+D*D, corr2+c*c
		v := acc.sumNS2/float64(acc.sumN) - ds2
		noise, noise2 = noise+v, noise2+v*v
	}
	if m, want := noise/n, rec.Sigma*rec.Sigma; math.Abs(m-want) > 4*se(noise, noise2) {
		t.Errorf("corrected σ̂² averages %.4g m², true %.4g (4 SE %.2g)", m, want, 4*se(noise, noise2))
	}
	if m := corr / n; math.Abs(m-rec.D) > 4*se(corr, corr2) {
		t.Errorf("corrected D̂ averages %.5g, true %.5g (4 SE %.2g)", m, rec.D, 4*se(corr, corr2))
	}
	if m := raw / n; math.Abs(m-rec.D-bias) > 4*se(raw, raw2) {
		t.Errorf("uncorrected D̂ averages %.5g, want D + bias = %.5g (4 SE %.2g)", m, rec.D+bias, 4*se(raw, raw2))
	}
	// Through Analyze: corrected, with a warning.
	a, err := Analyze(context.Background(), Tracks(simulateTracks(r, rec, lengths)), s, PlanOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if !a.Drift.Corrected || !(a.DiffusionUM2PerS < a.DiffusionRawUM2PerS) ||
		!slices.ContainsFunc(a.Warnings, func(w string) bool { return strings.HasPrefix(w, "drift: ") }) {
		t.Errorf("drift %+v, D %g from %g, warnings %q", a.Drift, a.DiffusionUM2PerS, a.DiffusionRawUM2PerS, a.Warnings)
	}
	if want := math.Hypot(3, -2); math.Abs(a.DriftUMPerS-want) > 4*a.Drift.StdErrUMPerS[0] {
		t.Errorf("drift speed %.4g µm/s, true %.4g", a.DriftUMPerS, want)
	}
}

func TestRadiusDistribution(t *testing.T) {
	// Monodisperse data: the per-track radius histogram agrees with the monodisperse reference bin by
	// bin (X² = Σ (count − expected)²/var over bins with ≥ 5 expected, var = expected·(1 + M/S) for
	// the data's and the reference's own sampling noise, within its mean + 4 SD, k + 4√(2k)); both
	// hold every track (an identity). A 1:1 mixture of 30 nm and 90 nm particles: X² far beyond that.
	s := analysisSettings()
	r := rand.New(rand.NewPCG(15, 16))
	lengths := mixedLengths(r, 3000, 5, 60)
	x2 := func(tracks []core.Track) (float64, int) {
		t.Helper()
		a, err := Analyze(context.Background(), Tracks(tracks), s, PlanOptions{Workers: 1})
		if err != nil {
			t.Fatal(err)
		}
		rd := a.Radii
		n := rd.Below + rd.Above + rd.NonPositive
		for _, c := range rd.Counts {
			n += c
		}
		e := rd.MonoBelow + rd.MonoAbove + rd.MonoNonPositive
		for _, c := range rd.Monodisperse {
			e += c
		}
		if n != a.TracksUsed || math.Abs(e-float64(a.TracksUsed)) > 1e-9*e || len(rd.EdgesNM) != len(rd.Counts)+1 ||
			len(rd.Monodisperse) != len(rd.Counts) || rd.SimulatedTracks < monoMinTracks {
			t.Fatalf("histogram holds %d data and %g reference tracks of %d: %+v", n, e, a.TracksUsed, rd)
		}
		ratio := float64(a.TracksUsed) / float64(rd.SimulatedTracks)
		sum, k := 0.0, 0
		for i, c := range rd.Counts {
			if m := rd.Monodisperse[i]; m >= 5 {
				sum += (float64(c) - m) * (float64(c) - m) / (m * (1 + ratio))
				k++
			}
		}
		return sum, k
	}
	mono := simulateTracks(r, demoRecording(t, s, 60, 30e-9), lengths)
	got, k := x2(mono)
	limit := float64(k) + 4*math.Sqrt(2*float64(k))
	if got > limit || k < 10 {
		t.Errorf("monodisperse: X² = %.1f over %d bins (limit %.1f)", got, k, limit)
	}
	small, large := demoRecording(t, s, 30, 30e-9), demoRecording(t, s, 90, 30e-9)
	mix := append(simulateTracks(r, small, lengths[:1500]), simulateTracks(r, large, lengths[1500:])...)
	if got, k := x2(mix); got < 10*(float64(k)+4*math.Sqrt(2*float64(k))) {
		t.Errorf("polydisperse: X² = %.1f over %d bins, not far beyond what a monodisperse sample gives", got, k)
	}
}

func TestAnalyzeErrors(t *testing.T) {
	s := analysisSettings()
	ctx := context.Background()
	good := core.Track{Pos: [][]float64{{0, 1e-7, 3e-7, 2e-7}, {0, -1e-7, 0, 1e-7}}}
	zigzag := core.Track{Pos: [][]float64{{0, 1e-7, 0, 1e-7, 0, 1e-7}, {0, 1e-7, 0, 1e-7, 0, 1e-7}}}
	cases := []struct {
		name   string
		tracks []core.Track
		s      Scenario
		check  func(error) bool
	}{
		{"no tracks", nil, s, func(err error) bool { return errors.Is(err, core.ErrNoTracks) }},
		{"axes differ", []core.Track{good, {Pos: [][]float64{{0, 1, 2}}}}, s, func(err error) bool { return errors.Is(err, core.ErrDimsDiffer) }},
		{"too short", []core.Track{good, {Pos: [][]float64{{0, 1}, {0, 1}}}}, s, func(err error) bool {
			var re *core.RangeError
			return errors.As(err, &re) && re.Field == "points"
		}},
		{"ragged", []core.Track{{Pos: [][]float64{{0, 1, 2}, {0, 1}}}}, s, func(err error) bool { return errors.Is(err, core.ErrRagged) }},
		{"not finite", []core.Track{{Pos: [][]float64{{0, math.NaN(), 2}, {0, 1, 2}}}}, s, func(err error) bool { return errors.Is(err, core.ErrNonFinite) }},
		// Positions that jump back and forth every frame: D̂ = ⟨dx²⟩/(2Δt) + ⟨dx dx₊₁⟩/Δt < 0.
		{"D̂ not positive", []core.Track{zigzag}, s, func(err error) bool { return err != nil && strings.Contains(err.Error(), "is not positive") }},
		{"bad settings", []core.Track{good}, func() Scenario { x := s; x.FrameIntervalS = 0; return x }(), func(err error) bool {
			var fe *FieldError
			return errors.As(err, &fe) && fe.Field == "frame_interval_s"
		}},
	}
	for _, c := range cases {
		_, err := Analyze(ctx, Tracks(c.tracks), c.s, PlanOptions{Workers: 1})
		if !c.check(err) {
			t.Errorf("%s: error %v", c.name, err)
		}
	}
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := Analyze(cancelled, Tracks([]core.Track{good}), s, PlanOptions{}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

// dropping is a TrackSource that reports dropped tracks.
type dropping struct {
	TrackSource
	n int
}

func (d dropping) Dropped() int { return d.n }

func TestAnalyzeReportsDropped(t *testing.T) {
	s := analysisSettings()
	r := rand.New(rand.NewPCG(17, 18))
	tracks := simulateTracks(r, demoRecording(t, s, 50, 30e-9), mixedLengths(r, 20, 5, 30))
	a, err := Analyze(context.Background(), dropping{Tracks(tracks), 5}, s, PlanOptions{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	if a.TracksDropped != 5 || !slices.ContainsFunc(a.Warnings, func(w string) bool { return strings.HasPrefix(w, "tracks: 5 of 25 tracks (20 %)") }) {
		t.Errorf("dropped %d, warnings %q", a.TracksDropped, a.Warnings)
	}
}
