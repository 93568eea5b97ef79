package core

import (
	"fmt"
	"math"
)

// MSD returns the time-averaged mean squared displacement of tracks at lags 1..maxLag frames, summed
// over the axes and pooled over the tracks, in m², with the number of displacement pairs behind each
// value: element n−1 holds lag n,
//
//	MSD_n  = Σ_tracks Σ_{i=0}^{K−1} |r_{i+n} − r_i|² / count_n,   K = Len − n
//	count_n = Σ_tracks max(K, 0)
//
// A lag that no track is long enough for has count 0 and MSD NaN. MSD panics if maxLag < 1 or a track
// has axes of different lengths (see Track).
//
// References:
//   - Qian H., Sheetz M.P., Elson E.L. (1991) Single particle tracking. Analysis of diffusion and flow
//     in two-dimensional systems. Biophys. J. 60, 910–921.
func MSD(tracks []Track, maxLag int) ([]float64, []int) {
	if maxLag < 1 {
		panic("core: MSD: maxLag must be ≥ 1")
	}
	sum := make([]float64, maxLag)
	count := make([]int, maxLag)
	for _, tr := range tracks {
		pts := tr.Len()
		for _, p := range tr.Pos {
			if len(p) != pts {
				panic("core: MSD: axes of a track differ in length")
			}
			for n := 1; n <= maxLag && n < pts; n++ {
				s := 0.0
				for i := 0; i+n < pts; i++ {
					d := p[i+n] - p[i]
					s += d * d
				}
				sum[n-1] += s
			}
		}
		for n := 1; n <= maxLag && n < pts; n++ {
			count[n-1] += pts - n
		}
	}
	for k := range sum {
		if count[k] == 0 {
			sum[k] = math.NaN()
		} else {
			sum[k] /= float64(count[k])
		}
	}
	return sum, count
}

// MSDFit estimates the diffusion coefficient and the localisation variance by an unweighted
// least-squares straight line through the pooled time-averaged MSD (see MSD) of d-dimensional tracks
// at lags n = 1..lags:
//
//	MSD_n ≈ 2d·(D·nΔt + c),   c = s2 − 2R·D·Δt
//	D̂ = slope/(2dΔt),   ŝ2 = intercept/(2d) + 2R·D̂·Δt
//
// with Δt = interval and R = blur. Since E[MSD_n] is exactly linear in n for free diffusion (without
// drift), both are unbiased; the exact variance of D̂ is VarMSDFit and the lag count that minimises it
// is OptimalLags. The returned Estimate counts the displacements per axis of all tracks.
//
// interval must be positive and finite, blur within [0, 1/4] and lags ≥ 2 (a *RangeError otherwise).
// Errors for data: ErrNoTracks, ErrDimsDiffer, ErrRagged, ErrNonFinite, a *RangeError on "points" for
// a track with fewer than 2 points and on "lags" when the longest track has fewer than lags + 1 points.
//
// References:
//   - Qian H., Sheetz M.P., Elson E.L. (1991) Single particle tracking. Analysis of diffusion and flow
//     in two-dimensional systems. Biophys. J. 60, 910–921.
//   - Michalet X. (2010) Mean square displacement analysis of single-particle trajectories with
//     localization error: Brownian motion in an isotropic medium. Phys. Rev. E 82, 041914.
func MSDFit(tracks []Track, interval, blur float64, lags int) (Estimate, error) {
	if err := checkEstimatorArgs(interval, blur); err != nil {
		return Estimate{}, err
	}
	if lags < 2 {
		return Estimate{}, &RangeError{Field: "lags", Value: float64(lags), Min: 2, Max: math.Inf(1), Why: "a straight line needs two lags"}
	}
	if len(tracks) == 0 {
		return Estimate{}, ErrNoTracks
	}
	dims := tracks[0].Dims()
	if dims == 0 {
		return Estimate{}, fmt.Errorf("core: track 0: %w", &RangeError{Field: "dims", Value: 0, Min: 1, Max: 3})
	}
	longest, disp := 0, 0
	for i, tr := range tracks {
		if err := checkTrack(i, tr, dims, 2, "a displacement needs 2 points"); err != nil {
			return Estimate{}, err
		}
		for a, p := range tr.Pos {
			for _, x := range p {
				if math.IsNaN(x) || math.IsInf(x, 0) {
					return Estimate{}, fmt.Errorf("%w: track %d axis %d", ErrNonFinite, i, a)
				}
			}
		}
		pts := tr.Len()
		longest = max(longest, pts)
		disp += pts - 1
	}
	if lags > longest-1 {
		return Estimate{}, &RangeError{Field: "lags", Value: float64(lags), Min: 2, Max: float64(longest - 1),
			Why: "the longest track must be longer than the largest lag"}
	}
	msd, _ := MSD(tracks, lags)
	slope, intercept := olsLine(msd)
	if math.IsInf(slope, 0) || math.IsNaN(slope) {
		return Estimate{}, fmt.Errorf("%w: MSD fit overflowed", ErrNonFinite)
	}
	d := float64(dims)
	D := slope / (2 * d * interval)
	return Estimate{
		D:             D,
		S2:            intercept/(2*d) + 2*blur*D*interval,
		Displacements: disp,
		Tracks:        len(tracks),
	}, nil
}

// olsLine returns the unweighted least-squares slope and intercept of y[k] against x = k+1.
func olsLine(y []float64) (slope, intercept float64) {
	L := float64(len(y))
	xbar := (L + 1) / 2
	ybar := 0.0
	for _, v := range y {
		ybar += v
	}
	ybar /= L
	var sxy float64
	for k, v := range y {
		sxy += (float64(k+1) - xbar) * (v - ybar)
	}
	sxx := L * (L*L - 1) / 12
	slope = sxy / sxx
	return slope, ybar - slope*xbar
}

// MSDCovariance returns the exact covariance matrix, in m⁴, of the time-averaged MSD values (see MSD)
// of one track of Npos positions at lags 1..maxLag, summed over dims independent axes, for free
// diffusion without drift in the tridiagonal Gaussian model (NewStepCovariance): element [n−1][m−1] is
// Cov(MSD_n, MSD_m).
//
// Per axis MSD_n = (1/K_n)Σ_i y_i², y_i = x_{i+n} − x_i, K_n = Npos − n, is a quadratic form in the
// Gaussian steps, so Cov(MSD_n, MSD_m) = 2·tr(A_nΣA_mΣ) = (2/(K_nK_m))·Σ_{i,l} Cov(y_i, z_l)² with
// z_l = x_{l+m} − x_l. The covariance of two position differences follows from the variogram
// V(k) = E(x_{j+k} − x_j)² = 2DΔt|k| + 2(s2 − 2RDΔt) (k ≠ 0), V(0) = 0, by polarisation:
//
//	Cov(y_i, z_l) = ½[V(δ+n) + V(δ−m) − V(δ+n−m) − V(δ)],   δ = i − l
//
// It depends on δ only and is piecewise linear in δ, so the double sum is taken in closed form over
// the few linear pieces: O(1) work per element. Valid for the model range of NewStepCovariance,
// Npos ≥ 2, 1 ≤ maxLag ≤ Npos − 1 and dims ≥ 1; MSDCovariance panics outside it.
//
// References:
//   - Qian H., Sheetz M.P., Elson E.L. (1991) Biophys. J. 60, 910–921 (the noise-free case).
//   - Michalet X. (2010) Mean square displacement analysis of single-particle trajectories with
//     localization error: Brownian motion in an isotropic medium. Phys. Rev. E 82, 041914.
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
func MSDCovariance(D, interval, blur, s2 float64, Npos, maxLag, dims int) [][]float64 {
	mustModel("MSDCovariance", D, interval, blur, s2)
	mustLags("MSDCovariance", Npos, maxLag, 1, dims)
	v := newMSDVariogram(D, interval, blur, s2, Npos)
	cov := make([][]float64, maxLag)
	buf := make([]float64, maxLag*maxLag)
	for n := range cov {
		cov[n] = buf[n*maxLag : (n+1)*maxLag : (n+1)*maxLag]
	}
	d := float64(dims)
	for n := 1; n <= maxLag; n++ {
		for m := n; m <= maxLag; m++ {
			c := d * v.cov(n, m)
			cov[n-1][m-1] = c
			cov[m-1][n-1] = c
		}
	}
	return cov
}

// VarMSDFit returns the exact variance, in (m²/s)², of the D estimated by MSDFit from one track of Npos
// positions in dims axes with lags fitted lags, for free diffusion without drift in the tridiagonal
// Gaussian model. The OLS slope is a fixed linear combination of the MSD values, so with C from
// MSDCovariance
//
//	Var(D̂) = wᵀCw / (2dΔt)²,   w_n = (n − n̄)/Σ_m(m − n̄)²,   n̄ = (lags + 1)/2
//
// M independent tracks of the same length pooled by MSD have M times the pair counts at every lag and
// variance VarMSDFit/M. Valid for the model range of NewStepCovariance, Npos ≥ 3,
// 2 ≤ lags ≤ Npos − 1 and dims ≥ 1; VarMSDFit panics outside it. Cost O(lags²).
//
// References:
//   - Michalet X. (2010) Mean square displacement analysis of single-particle trajectories with
//     localization error: Brownian motion in an isotropic medium. Phys. Rev. E 82, 041914.
func VarMSDFit(D, interval, blur, s2 float64, Npos, lags, dims int) float64 {
	mustModel("VarMSDFit", D, interval, blur, s2)
	mustLags("VarMSDFit", Npos, lags, 2, dims)
	v := newMSDVariogram(D, interval, blur, s2, Npos)
	L := float64(lags)
	nbar := (L + 1) / 2
	sxx := L * (L*L - 1) / 12
	q := 0.0
	for n := 1; n <= lags; n++ {
		wn := float64(n) - nbar
		q += wn * wn * v.cov(n, n)
		for m := n + 1; m <= lags; m++ {
			q += 2 * wn * (float64(m) - nbar) * v.cov(n, m)
		}
	}
	g := 2 * interval * sxx
	return q / (g * g) / float64(dims)
}

// OptimalLags returns the number of fitted lags, between 2 and Npos − 1, that minimises VarMSDFit for
// one track of Npos positions; the first is returned on a tie. It is the same for any number of axes
// (dims only scales the variance) and for M equal tracks pooled. The optimum is 2 for a noise-free,
// blur-free track and grows with the reduced localisation variance x = s2/(DΔt); for Npos = 100 and
// R = 0 it is 2 for x ≤ 0.3, then 3 at x = 1, 5 at x = 3, 8 at x = 10, 14 at x = 30 and 24 at x = 100.
//
// The variances of all lag counts are obtained in one pass, O(Npos²) work and O(1) memory, from running
// sums of the covariance matrix:
//
//	Σ_{n,m≤L} (n − n̄)(m − n̄)C_nm = S_2 − 2n̄·S_1 + n̄²·S_0
//	S_p: Σ_{n,m≤L} C_nm weighted by 1, n, n·m
//
// (the running sums lose a few digits to cancellation against the direct VarMSDFit, which matters only
// between lag counts whose variances are equal to about 1e-10). Valid for the model range of
// NewStepCovariance with D > 0, Npos ≥ 3 and dims ≥ 1; OptimalLags panics outside it.
//
// References:
//   - Michalet X. (2010) Mean square displacement analysis of single-particle trajectories with
//     localization error: Brownian motion in an isotropic medium. Phys. Rev. E 82, 041914.
func OptimalLags(D, interval, blur, s2 float64, Npos, dims int) int {
	mustModel("OptimalLags", D, interval, blur, s2)
	mustLags("OptimalLags", Npos, 2, 2, dims)
	if !(D > 0) {
		panic("core: OptimalLags: D must be positive")
	}
	v := newMSDVariogram(D, interval, blur, s2, Npos)
	var s0, s1, s2w float64 // running Σ C, Σ n·C, Σ n·m·C over the leading L×L block
	best, bestVar := 0, math.Inf(1)
	for L := 1; L <= Npos-1; L++ {
		fl := float64(L)
		// Add row and column L.
		for m := 1; m <= L; m++ {
			c := v.cov(L, m)
			fm := float64(m)
			if m == L {
				s0 += c
				s1 += fl * c
				s2w += fl * fl * c
				continue
			}
			s0 += 2 * c
			s1 += (fl + fm) * c
			s2w += 2 * fl * fm * c
		}
		if L < 2 {
			continue
		}
		nbar := (fl + 1) / 2
		sxx := fl * (fl*fl - 1) / 12
		q := (s2w - 2*nbar*s1 + nbar*nbar*s0) / (sxx * sxx)
		if q < bestVar {
			best, bestVar = L, q
		}
	}
	return best
}

// msdVariogram evaluates per-axis covariances of MSD values of one track of Npos positions.
type msdVariogram struct {
	u, beta float64 // DΔt and s2 − 2RDΔt, m²
	npos    int
}

func newMSDVariogram(D, interval, blur, s2 float64, Npos int) msdVariogram {
	return msdVariogram{u: D * interval, beta: s2 - 2*blur*D*interval, npos: Npos}
}

// cov returns Cov(MSD_n, MSD_m) for one axis: (2/(K_nK_m))·Σ_δ count(δ)·c(δ)², where
// c(δ) = u·h(δ) + β·e(δ) is the covariance of the two position differences at offset δ,
// h(δ) = |δ+n| + |δ−m| − |δ+n−m| − |δ| (twice the overlap of the two position windows, in frames) and
// e(δ) = [δ=0] + [δ=m−n] − [δ=−n] − [δ=m]; count(δ) is the number of window pairs at offset δ. Both
// count and h are piecewise linear, with kinks at δ ∈ {0, m−n, K_n−K_m}, and c vanishes outside
// [−n, m], so Σ count·h² is summed in closed form piece by piece.
func (v msdVariogram) cov(n, m int) float64 {
	kn, km := v.npos-n, v.npos-m
	lo := max(-n, -(km - 1))
	hi := min(m, kn-1)
	if lo > hi {
		return 0
	}
	// Breakpoints within [lo, hi], sorted by insertion (at most 5).
	var bp [5]int
	nb := 0
	for _, p := range [...]int{lo, hi, 0, m - n, kn - km} {
		if p < lo || p > hi {
			continue
		}
		j := nb
		for j > 0 && bp[j-1] > p {
			bp[j] = bp[j-1]
			j--
		}
		bp[j] = p
		nb++
	}
	// Σ_{δ=lo}^{hi} count·h² over the pieces [p, q) with both factors linear on [p, q], then δ = hi.
	var t float64
	for i := 0; i+1 < nb; i++ {
		p, q := bp[i], bp[i+1]
		if p == q {
			continue
		}
		a := pairCount(kn, km, p)
		b := pairCount(kn, km, p+1) - a
		c := overlap2(n, m, p)
		g := overlap2(n, m, p+1) - c
		fl := float64(q - p)
		s1 := fl * (fl - 1) / 2
		s2 := (fl - 1) * fl * (2*fl - 1) / 6
		t += a*c*c*fl + (2*a*c*g+b*c*c)*s1 + (a*g*g+2*b*c*g)*s2 + b*g*g*s1*s1
	}
	hh := overlap2(n, m, hi)
	t += pairCount(kn, km, hi) * hh * hh
	sum := v.u * v.u * t
	// Correct the offsets where the noise term e(δ) = [δ=0] + [δ=m−n] − [δ=−n] − [δ=m] is non-zero.
	// Only δ = 0 and δ = m − n can coincide (when n = m); add skips offsets outside [lo, hi], where the
	// track is too short for the two windows to touch.
	add := func(d int, e float64) {
		if d < lo || d > hi {
			return
		}
		uh := v.u * overlap2(n, m, d)
		c := uh + v.beta*e
		sum += pairCount(kn, km, d) * (c*c - uh*uh)
	}
	if n == m {
		add(0, 2)
	} else {
		add(0, 1)
		add(m-n, 1)
	}
	add(-n, -1)
	add(m, -1)
	return 2 * sum / (float64(kn) * float64(km))
}

// pairCount is the number of index pairs (i, l), 0 ≤ i < kn, 0 ≤ l < km, with i − l = d, for d in
// [−(km−1), kn−1].
func pairCount(kn, km, d int) float64 {
	return float64(min(km-1, kn-1-d) - max(0, -d) + 1)
}

// overlap2 is h(d) = |d+n| + |d−m| − |d+n−m| − |d|: twice the overlap, in frames, of the position
// windows [d, d+n] and [0, m].
func overlap2(n, m, d int) float64 {
	return float64(absInt(d+n) + absInt(d-m) - absInt(d+n-m) - absInt(d))
}

func absInt(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// mustLags panics unless Npos ≥ minLag + 1, minLag ≤ lags ≤ Npos − 1 and dims ≥ 1.
func mustLags(fn string, Npos, lags, minLag, dims int) {
	if Npos < minLag+1 || lags < minLag || lags > Npos-1 {
		panic(fmt.Sprintf("core: %s: need %d ≤ lags ≤ Npos − 1 (lags = %d, Npos = %d)", fn, minLag, lags, Npos))
	}
	if dims < 1 {
		panic("core: " + fn + ": dims must be ≥ 1")
	}
}
