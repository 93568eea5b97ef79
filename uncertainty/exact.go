package uncertainty

import (
	"errors"
	"math"
	"math/rand/v2"

	"sizebudget/core"
)

// ExactLaw is the distribution of the Monte Carlo value y of TrialModel (nm), computed without
// sampling, for the scenarios whose track statistics the spectral engine samples exactly and that
// have no drift (covariance-based or known-noise estimator, drift_um_per_s = 0). Given the true
// diffusion coefficient D, the pooled estimate is a weighted sum of chi-squared variates
// (core.Spectral.Law), and the pixel factor (1 + δ)², δ ~ N(0, u_pix²), is u_pix²·χ²(1; 1/u_pix²), so
//
//	P(y ≤ q | D) = P( D̂/D − ξ·(1 + δ)² ≤ 0 ),   ξ = (q/r₀)·(D₀/D)
//
// is the CDF at 0 of one more weighted sum of (one non-central) chi-squared variates, inverted by
// core.ChiSquaredSum (Imhof 1961). Writing e = D₀/D, that conditional law Ψ(e, ξ) is tabulated as a
// two-dimensional Chebyshev interpolant of its probit Φ⁻¹(Ψ) (nearly linear in ξ, so few terms, and
// relative accuracy in both tails), on the range of e the quadrature below reaches and the range of ξ
// where Ψ is between 1e-10 and 1 − 1e-10 (extrapolated linearly beyond, a Gaussian tail). The true
// temperature and the viscosity factor are then integrated out by quadrature —
//
//	P(y ≤ q) = Σ_j ω_j·Ψ(e_j, q·e_j/r₀),   e_j = D₀/D(T_j, η_j)
//
// with Gauss–Legendre nodes for a rectangular temperature, and for the normal inputs (temperature,
// viscosity) Gauss–Legendre nodes weighted by the normal density on ±8σ (narrower where the medium's
// range or a positive viscosity factor requires, but never below ±5σ; renormalised). The node counts
// grow with the ratio of each input's spread to the spread of the track statistics, so the sharp
// dependence of Ψ on e is resolved. The Monte Carlo clamps its normal variates at ±5σ instead; the
// two laws differ by less than P(|Z| > 5) = 5.7e-7 in any probability. The pixel factor enters
// unclamped too, but the moments (Mean, StdUnc) take it clamped as the Monte Carlo does: unclamped,
// E[(1 + δ)⁻²] does not exist.
//
// The probit of the resulting CDF is tabulated in turn, and its inverse y = Q(z) gives an exact
// sampler by inversion: y = Q(Z), Z ~ N(0, 1) clamped to ±5 — the "exact" Monte Carlo engine of
// TrialModel, one normal variate and one polynomial evaluation per trial. Quantile and Intervals
// solve on the CDF itself. When the tables do not converge (a law with a hard edge and very few
// degrees of freedom, for instance), the conditional law is inverted directly at every node instead:
// slower, as exact.
//
// References:
//   - Imhof J.P. (1961) Biometrika 48, 419–426; see core.ChiSquaredSum.
//   - JCGM 101:2008, Supplement 1 to the GUM, clause 5.4 (from memory: the implementations of the
//     propagation of distributions, analytical methods among them) and clause 7.7 (coverage
//     intervals).
//   - Trefethen L.N., Approximation Theory and Approximation Practice (2013) (Chebyshev interpolants).
type ExactLaw struct {
	rnm, d0   float64
	groups    []exactGroup
	uPix      float64
	nodes     []exactNode
	direct    bool // no ξ table: Ψ by inversion at each node
	xiLo      float64
	xiHi      float64
	fwd, dfwd cheb // probit of P(y ≤ q) on [qLo, qHi], and its derivative
	qLo, qHi  float64
	inv       cheb // the quantile function in probit units, q = Q(z), on [−zMax, zMax]
	zMax      float64
	mean, std float64
	nonPos    float64
}

// exactGroup is one group of tracks of equal length: its spectral sampler and its weight in the pool.
type exactGroup struct {
	sp     *core.Spectral
	weight float64
}

// exactNode is one node of the quadrature over the temperature and the viscosity: e = D₀/D, its
// weight, and the probit table at this e as a Chebyshev series in ξ with its derivative.
type exactNode struct {
	e, w  float64
	g, dg cheb
}

// Accuracy settings of the exact law.
const (
	exactTailCut   = 1e-10 // Ψ range of the ξ table
	exactTableTol  = 1e-10 // trailing Chebyshev coefficients, relative (probit units)
	exactZMax      = 5.0   // range of the inverse table and clamp of the sampler's normal variate
	exactProbitCap = 10.0  // probits are clamped to ±10 (Φ(−10) = 7.6e-24)
)

// NewExactLaw computes the exact law of the scenario's Monte Carlo value (see TrialModel for the
// model and TrialSpec for frames and tracks; spec.Engine is ignored). It returns a *FieldError when the
// scenario is not one the exact law covers (estimator "msd", drift), and the scenario's own
// validation errors.
func NewExactLaw(spec TrialSpec) (*ExactLaw, error) {
	u, err := spec.resolve()
	if err != nil {
		return nil, err
	}
	if err := exactEligible(u.s); err != nil {
		return nil, err
	}
	return newExactLaw(u)
}

// exactEligible reports why the exact law does not cover s, or nil.
func exactEligible(s Scenario) error {
	if BestEngine(s) != EngineSpectral {
		return &FieldError{Field: "engine", Value: EngineExact, Allowed: `"direct" for this estimator and drift setting`}
	}
	if s.DriftUMPerS > 0 {
		return &FieldError{Field: "engine", Value: EngineExact, Allowed: `"spectral" or "direct" when there is residual drift`}
	}
	return nil
}

func newExactLaw(u *setup) (*ExactLaw, error) { return buildExactLaw(u, 1) }

// buildExactLaw computes the law with nodeScale times the quadrature nodes (1 in use; tests double it).
func buildExactLaw(u *setup, nodeScale int) (*ExactLaw, error) {
	l := &ExactLaw{rnm: u.r0 * 1e9, d0: u.D0, uPix: u.uPix}
	total := 0
	for _, g := range u.groups {
		total += g.Count * (g.Frames - 1)
	}
	for _, g := range u.groups {
		N := g.Frames - 1
		form := core.CVEForm(u.dt, N)
		if u.s.Estimator == "known-noise" {
			form = core.KnownNoiseForm(u.dt, u.blur, u.s2, N)
		}
		l.groups = append(l.groups, exactGroup{sp: core.NewSpectral(form, u.dt, u.blur, u.s2, N, g.Count, u.dims),
			weight: float64(g.Count*N) / float64(total)})
	}
	l.outerNodes(u, nodeScale)
	l.moments(u)
	if err := l.buildXiTable(u); err != nil {
		return nil, err
	}
	if err := l.buildTables(); err != nil {
		return nil, err
	}
	lo, _ := l.tails(0)
	l.nonPos = lo
	return l, nil
}

// condLaw returns the law of D̂/D at e = D₀/D: the pooled spectral law scaled by 1/D.
func (l *ExactLaw) condLaw(e float64) core.ChiSquaredSum {
	D := l.d0 / e
	var q core.ChiSquaredSum
	for _, g := range l.groups {
		law := g.sp.Law(D, nil)
		for _, t := range law.Terms {
			t.Weight *= g.weight / D
			q.Terms = append(q.Terms, t)
		}
		q.Const += g.weight * law.Const / D
	}
	return q
}

// psiOf returns the probit of Ψ = P(A − ξ(1 + δ)² ≤ 0) for the law A of D̂/D (condLaw), by inversion,
// with the pixel factor as the non-central term u_pix²·χ²(1; 1/u_pix²).
func (l *ExactLaw) psiOf(a core.ChiSquaredSum, xi float64) float64 {
	q := core.ChiSquaredSum{Terms: make([]core.ChiSquaredTerm, len(a.Terms), len(a.Terms)+1), Const: a.Const}
	copy(q.Terms, a.Terms)
	if l.uPix > 0 {
		q.Terms = append(q.Terms, core.ChiSquaredTerm{Weight: -xi * l.uPix * l.uPix, DOF: 1, NonCentrality: 1 / (l.uPix * l.uPix)})
	} else {
		q.Const -= xi
	}
	return probit(q.Tails(0))
}

// psi returns the probit of Ψ(e, ξ) = P(D̂/D ≤ ξ(1 + δ)² | e).
func (l *ExactLaw) psi(e, xi float64) float64 { return l.psiOf(l.condLaw(e), xi) }

// probit returns Φ⁻¹ of a probability given by both its tails, from the smaller one, within ±10.
func probit(lo, up float64) float64 {
	var z float64
	switch {
	case lo <= 0:
		z = -exactProbitCap
	case up <= 0:
		z = exactProbitCap
	case lo < 0.5:
		z = normalQuantile(lo)
	default:
		z = -normalQuantile(up)
	}
	return math.Max(-exactProbitCap, math.Min(exactProbitCap, z))
}

// normTails returns Φ(z) and Φ(−z), the smaller one from the complementary error function.
func normTails(z float64) (lo, up float64) {
	if z < 0 {
		lo = 0.5 * math.Erfc(-z/math.Sqrt2)
		return lo, 1 - lo
	}
	up = 0.5 * math.Erfc(z/math.Sqrt2)
	return 1 - up, up
}

// outerNodes sets the quadrature over the temperature and the viscosity factor.
func (l *ExactLaw) outerNodes(u *setup, scale int) {
	width := math.Sqrt(u.trackRelVar(u.groups) + 4*u.uPix*u.uPix) // relative spread of D̂/(D(1+δ)²)
	sens := math.Abs(1/u.T0 - u.dlnEta)                           // |d ln D/dT|
	type node struct{ x, w float64 }
	var temps, visc []node
	count := func(base int, span float64) int {
		return scale * min(400, max(base, int(math.Ceil(float64(base)+10*span/width))))
	}
	switch {
	case u.uT == 0:
		temps = []node{{u.T0, 1}}
	case u.s.TemperatureDist == "normal":
		reach := 8.0
		for _, T := range []float64{u.T0 - reach*u.uT, u.T0 + reach*u.uT} {
			if _, err := u.medium.Viscosity(T); err != nil {
				reach = 5 // Validate checked ±5σ
			}
		}
		for _, n := range truncatedNormalRule(count(24, 5*u.uT*sens), reach) {
			temps = append(temps, node{u.T0 + u.uT*n[0], n[1]})
		}
	default:
		a := u.s.TemperatureUK
		n := count(12, a*sens)
		x, w := legendreRule(n, u.T0-a, u.T0+a)
		for i := range x {
			temps = append(temps, node{x[i], w[i] / (2 * a)})
		}
	}
	if u.uEta == 0 {
		visc = []node{{1, 1}}
	} else {
		reach := math.Max(5, math.Min(8, 0.9/u.uEta)) // keeps 1 + u_η·z ≥ 0.1 (u_η ≤ 0.15 by Validate)
		for _, n := range truncatedNormalRule(count(24, 5*u.uEta), reach) {
			visc = append(visc, node{1 + u.uEta*n[0], n[1]})
		}
	}
	viscosity := u.viscosityAt()
	for _, t := range temps {
		eta := viscosity(t.x)
		for _, v := range visc {
			D := core.Boltzmann * t.x / (6 * math.Pi * eta * v.x * u.r0)
			l.nodes = append(l.nodes, exactNode{e: u.D0 / D, w: t.w * v.w})
		}
	}
}

// truncatedNormalRule returns n nodes and weights for E[f(Z)], Z ~ N(0, 1) truncated to ±reach:
// Gauss–Legendre on [−reach, reach] weighted by the normal density, normalised to sum to 1 (with
// n ≥ 24 nodes on ±5 it integrates the density to 2e-14).
func truncatedNormalRule(n int, reach float64) [][2]float64 {
	x, w := legendreRule(n, -reach, reach)
	rule := make([][2]float64, n)
	sum := 0.0
	for i := range x {
		rule[i] = [2]float64{x[i], w[i] * normalPDF(x[i])}
		sum += rule[i][1]
	}
	for i := range rule {
		rule[i][1] /= sum
	}
	return rule
}

// clampedNormalRule returns n + 2 nodes and weights for E[f(clamp(Z, −5, 5))], Z ~ N(0, 1), the
// Monte Carlo's clamped variate: Gauss–Legendre on [−5, 5] weighted by the normal density, plus the
// masses Φ(−5) at ±5; the weights are normalised to sum to 1.
func clampedNormalRule(n int) [][2]float64 {
	x, w := legendreRule(n, -5, 5)
	tail := normalCDF(-5)
	rule := [][2]float64{{-5, tail}, {5, tail}}
	sum := 2 * tail
	for i := range x {
		wi := w[i] * normalPDF(x[i])
		rule = append(rule, [2]float64{x[i], wi})
		sum += wi
	}
	for i := range rule {
		rule[i][1] /= sum
	}
	return rule
}

// trackRelVarAt is Var(D̂)/D² of the pooled estimate when the true coefficient is D (trackRelVar is
// the same at the nominal D₀).
func (u *setup) trackRelVarAt(D float64) float64 {
	total := 0.0
	for _, g := range u.groups {
		total += float64(g.Count * (g.Frames - 1))
	}
	v := 0.0
	for _, g := range u.groups {
		N := g.Frames - 1
		w := float64(N) / total
		var v1 float64
		if u.s.Estimator == "known-noise" {
			v1 = core.VarKnownNoiseExact(D, u.dt, u.blur, u.s2, N, u.dims)
		} else {
			v1 = core.VarCVEExact(D, u.dt, u.blur, u.s2, N, u.dims)
		}
		v += float64(g.Count) * w * w * v1
	}
	return v / (D * D)
}

// legendreRule returns the n-point Gauss–Legendre nodes and weights on [a, b], by Newton's method on
// the three-term recurrence of P_n from the initial guesses cos(π(i + 3/4)/(n + 1/2)), with weights
// 2/((1 − x²)·P′_n(x)²). (Written here rather than taken from gonum's quad.Legendre, whose v0.17.0
// rule for n = 26 has weights summing to 2 − 0.0211 on [−1, 1].)
//
// References:
//   - Abramowitz M., Stegun I.A. (1964) Handbook of Mathematical Functions, 25.4.29 (the weights).
func legendreRule(n int, a, b float64) (x, w []float64) {
	x, w = make([]float64, n), make([]float64, n)
	for i := range (n + 1) / 2 {
		z := math.Cos(math.Pi * (float64(i) + 0.75) / (float64(n) + 0.5))
		var dp float64
		for range 20 {
			p0, p1 := 1.0, z
			for k := 1; k < n; k++ {
				p0, p1 = p1, (float64(2*k+1)*z*p1-float64(k)*p0)/float64(k+1)
			}
			dp = float64(n) * (z*p1 - p0) / (z*z - 1)
			dz := p1 / dp
			z -= dz
			if math.Abs(dz) <= 1e-15 {
				break
			}
		}
		wi := 2 / ((1 - z*z) * dp * dp)
		x[i], x[n-1-i] = z, -z
		w[i], w[n-1-i] = wi, wi
	}
	if n%2 == 1 {
		x[n/2] = 0
	}
	h, c := (b-a)/2, (a+b)/2
	for i := range x {
		x[i] = c + h*x[i]
		w[i] *= h
	}
	return x, w
}

// moments sets the exact mean and standard deviation of y for the Monte Carlo model, whose pixel
// error is clamped to ±5σ: E[y] = (r₀/D₀)·E[D]·E[(1+δ)⁻²] (the estimators are unbiased) and
// E[y²] = (r₀/D₀)²·E[D² + Var(D̂|D)]·E[(1+δ)⁻⁴].
func (l *ExactLaw) moments(u *setup) {
	m2, m4 := 1.0, 1.0
	if l.uPix > 0 {
		m2, m4 = 0, 0
		for _, n := range clampedNormalRule(48) {
			f := 1 / ((1 + l.uPix*n[0]) * (1 + l.uPix*n[0]))
			m2 += n[1] * f
			m4 += n[1] * f * f
		}
	}
	// Var(D̂|D) = D²·(relative variance at D), from the exact finite-N variances (core.VarCVEExact,
	// core.VarKnownNoiseExact, through trackRelVar), which depend on D through ε only.
	var eD, eD2 float64
	for _, n := range l.nodes {
		D := l.d0 / n.e
		eD += n.w * D
		eD2 += n.w * D * D * (1 + u.trackRelVarAt(D))
	}
	k := l.rnm / l.d0
	l.mean = k * eD * m2
	l.std = math.Sqrt(math.Max(0, k*k*eD2*m4-l.mean*l.mean))
}

// buildXiTable tabulates the probit of Ψ(e, ξ) over the nodes' range of e and the range of ξ where Ψ
// is within [1e-10, 1 − 1e-10], doubling the Chebyshev points in each direction until the trailing
// coefficients fall below 1e-10; if they do not by 513 × 65 points, it leaves l.direct set.
func (l *ExactLaw) buildXiTable(u *setup) error {
	eLo, eHi := math.Inf(1), math.Inf(-1)
	for _, n := range l.nodes {
		eLo, eHi = math.Min(eLo, n.e), math.Max(eHi, n.e)
	}
	width := math.Sqrt(u.trackRelVar(u.groups) + 4*u.uPix*u.uPix)
	zCut := normalQuantile(exactTailCut)
	l.xiLo, l.xiHi = math.Inf(1), math.Inf(-1)
	for _, e := range []float64{eLo, (eLo + eHi) / 2, eHi} {
		a := l.condLaw(e)
		f := func(xi float64) float64 { return l.psiOf(a, xi) }
		lo, err := solveIncreasing(f, zCut, 1-6*width, 1, 1e-12)
		if err != nil {
			return err
		}
		hi, err := solveIncreasing(f, -zCut, 1, 1+6*width, 1e-12)
		if err != nil {
			return err
		}
		l.xiLo, l.xiHi = math.Min(l.xiLo, lo), math.Max(l.xiHi, hi)
	}
	single := eHi-eLo <= 1e-12*eHi
	ne, nx := 4, 32
	if single {
		ne = 0
	}
	vals := map[[2]int]float64{} // keyed by (i·64/ne, j·512/nx): positions on the finest grids
	laws := map[int]core.ChiSquaredSum{}
	const eFine, xFine = 64, 512
	value := func(i, j int) float64 {
		ki, kj := 0, j*(xFine/nx)
		if ne > 0 {
			ki = i * (eFine / ne)
		}
		key := [2]int{ki, kj}
		if v, ok := vals[key]; ok {
			return v
		}
		a, ok := laws[ki]
		if !ok {
			a = l.condLaw(chebPoint(i, ne, eLo, eHi))
			laws[ki] = a
		}
		v := l.psiOf(a, chebPoint(j, nx, l.xiLo, l.xiHi))
		vals[key] = v
		return v
	}
	for {
		grid := make([][]float64, ne+1)
		xiOK, eOK := true, true
		rows := make([][]float64, ne+1) // coefficients in ξ of each e row
		for i := range grid {
			grid[i] = make([]float64, nx+1)
			for j := range grid[i] {
				grid[i][j] = value(i, j)
			}
			rows[i] = chebCoeffs(grid[i])
			xiOK = xiOK && chebTail(rows[i]) <= exactTableTol
		}
		// Coefficients in e of each ξ-coefficient: the two-dimensional series.
		coef := make([][]float64, nx+1) // coef[m] = series in e of the m-th ξ coefficient
		col := make([]float64, ne+1)
		for m := 0; m <= nx; m++ {
			for i := range col {
				col[i] = rows[i][m]
			}
			coef[m] = chebCoeffs(col)
			if ne > 0 {
				eOK = eOK && tailAbs(coef[m]) <= exactTableTol // absolute: the scale is that of the ξ series
			}
		}
		if xiOK && eOK {
			for k := range l.nodes {
				n := &l.nodes[k]
				b := make([]float64, nx+1)
				x := 0.0
				if ne > 0 {
					x = (2*n.e - eLo - eHi) / (eHi - eLo)
				}
				for m := range b {
					b[m] = clenshaw(coef[m], x)
				}
				n.g = cheb{a: l.xiLo, b: l.xiHi, c: chop(b, exactTableTol/10)}
				n.dg = n.g.deriv()
			}
			return nil
		}
		if (!xiOK && 2*nx > xFine) || (!eOK && 2*ne > eFine) {
			l.direct = true
			return nil
		}
		if !xiOK {
			nx *= 2
		}
		if !eOK {
			ne *= 2
		}
	}
}

// tailAbs returns the largest magnitude among the last three coefficients.
func tailAbs(c []float64) float64 {
	m := 0.0
	for _, v := range c[max(0, len(c)-3):] {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

// nodeProbit returns the probit of Ψ at node n and ξ, from the table (linear beyond its range).
func (l *ExactLaw) nodeProbit(n *exactNode, xi float64) float64 {
	if l.direct {
		return l.psi(n.e, xi)
	}
	switch {
	case xi < l.xiLo:
		return n.g.at(l.xiLo) + n.dg.at(l.xiLo)*(xi-l.xiLo)
	case xi > l.xiHi:
		return n.g.at(l.xiHi) + n.dg.at(l.xiHi)*(xi-l.xiHi)
	}
	return n.g.at(xi)
}

// tails returns P(y ≤ q) and P(y > q), each summed from its own tail of the nodes' laws, so both keep
// their relative accuracy.
func (l *ExactLaw) tails(q float64) (lo, up float64) {
	for k := range l.nodes {
		n := &l.nodes[k]
		a, b := normTails(l.nodeProbit(n, q*n.e/l.rnm))
		lo += n.w * a
		up += n.w * b
	}
	return lo, up
}

// cdfProbit returns the probit of P(y ≤ q).
func (l *ExactLaw) cdfProbit(q float64) float64 { return probit(l.tails(q)) }

// buildTables tabulates the probit of the CDF of y and its inverse.
func (l *ExactLaw) buildTables() error {
	// Range: where the CDF passes Φ(∓(zMax + 1)), found outward from mean ± 6 sd.
	zEdge := exactZMax + 1
	lo, err := solveIncreasing(l.cdfProbit, -zEdge, l.mean-6*l.std, l.mean, 1e-10)
	if err != nil {
		return err
	}
	hi, err := solveIncreasing(l.cdfProbit, zEdge, l.mean, l.mean+6*l.std, 1e-10)
	if err != nil {
		return err
	}
	l.qLo, l.qHi = lo, hi
	// The tables serve the sampler, the starting points of the solves on the CDF itself and the
	// density; a table that stops short of 1e-10 but within 1e-7 is still good for those.
	fwd, ok := adaptCheb(l.cdfProbit, lo, hi, 32, 1024, exactTableTol)
	if !ok && chebTail(fwd.c) > 1e-7 {
		return errors.New("uncertainty: exact law: the CDF table did not converge")
	}
	l.fwd, l.dfwd = fwd, fwd.deriv()
	l.zMax = exactZMax
	inverse := func(z float64) float64 {
		q, _ := solveIncreasing(l.fwd.at, z, lo, hi, 1e-13)
		return q
	}
	inv, ok := adaptCheb(inverse, -l.zMax, l.zMax, 32, 1024, exactTableTol)
	if !ok && chebTail(inv.c) > 1e-7 {
		return errors.New("uncertainty: exact law: the quantile table did not converge")
	}
	l.inv = inv
	return nil
}

// solveIncreasing returns x with f(x) = target for an increasing f, starting from the bracket guess
// [a, b] (widened outward by doubling steps until it holds the root), by the Illinois variant of
// regula falsi, to |Δx| ≤ tol·(1 + |x|).
func solveIncreasing(f func(float64) float64, target, a, b, tol float64) (float64, error) {
	if !(b > a) {
		b = a + math.Max(1, math.Abs(a))*1e-3
	}
	fa, fb := f(a)-target, f(b)-target
	step := b - a
	for k := 0; fa > 0; k++ {
		if k > 200 {
			return 0, errors.New("uncertainty: exact law: no lower bracket")
		}
		b, fb = a, fa
		a -= step
		step *= 2
		fa = f(a) - target
	}
	step = b - a
	for k := 0; fb < 0; k++ {
		if k > 200 {
			return 0, errors.New("uncertainty: exact law: no upper bracket")
		}
		a, fa = b, fb
		b += step
		step *= 2
		fb = f(b) - target
	}
	side := 0
	for range 200 {
		x := (a*fb - b*fa) / (fb - fa)
		if !(x > a && x < b) {
			x = a + (b-a)/2
		}
		if b-a <= tol*(1+math.Abs(x)) {
			return x, nil
		}
		fx := f(x) - target
		switch {
		case fx == 0:
			return x, nil
		case fx > 0:
			b, fb = x, fx
			if side == 1 {
				fa /= 2
			}
			side = 1
		default:
			a, fa = x, fx
			if side == -1 {
				fb /= 2
			}
			side = -1
		}
	}
	return a + (b-a)/2, nil
}

// CDF returns P(y ≤ q), q in nm.
func (l *ExactLaw) CDF(q float64) float64 {
	lo, _ := l.tails(q)
	return lo
}

// Quantile returns the q (nm) with P(y ≤ q) = p, solved on the CDF to 1e-12 relative; p in (0, 1).
// It panics for p outside (0, 1).
func (l *ExactLaw) Quantile(p float64) float64 {
	if !(p > 0 && p < 1) {
		panic("uncertainty: ExactLaw.Quantile: p must be in (0, 1)")
	}
	z := normalQuantile(p)
	guess := l.inv.at(math.Max(-l.zMax, math.Min(l.zMax, z)))
	h := 1e-3 * l.std
	q, err := solveIncreasing(l.cdfProbit, z, guess-h, guess+h, 1e-12)
	if err != nil {
		panic("uncertainty: ExactLaw.Quantile: " + err.Error())
	}
	return q
}

// Mean returns E[y] (nm) and StdUnc its standard deviation, for the Monte Carlo model (pixel error
// clamped to ±5σ as there).
func (l *ExactLaw) Mean() float64 { return l.mean }

// StdUnc returns the standard deviation of y (nm).
func (l *ExactLaw) StdUnc() float64 { return l.std }

// NonPositive returns P(y ≤ 0), the share of experiments whose estimate of D is not positive.
func (l *ExactLaw) NonPositive() float64 { return l.nonPos }

// Intervals returns the probabilistically symmetric coverage interval [Q((1−p)/2), Q((1+p)/2)] and the
// shortest interval [Q(α), Q(α + p)] (α minimising its length, by golden-section search on the
// quantile table, the ends then solved on the CDF) for coverage probability p in (0, 1), in nm
// (JCGM 101:2008 clauses 5.3 and 7.7 for a known distribution).
func (l *ExactLaw) Intervals(p float64) (symmetric, shortest [2]float64) {
	mustCoverage(p)
	symmetric = [2]float64{l.Quantile((1 - p) / 2), l.Quantile((1 + p) / 2)}
	length := func(a float64) float64 {
		return l.inv.at(normalQuantile(a+p)) - l.inv.at(normalQuantile(a))
	}
	edge := normalCDF(-l.zMax)
	a, b := edge, 1-p-edge
	if !(b > a) {
		return symmetric, symmetric
	}
	g := (math.Sqrt(5) - 1) / 2
	x1, x2 := b-g*(b-a), a+g*(b-a)
	f1, f2 := length(x1), length(x2)
	for b-a > 1e-9 {
		if f1 <= f2 {
			b, x2, f2 = x2, x1, f1
			x1 = b - g*(b-a)
			f1 = length(x1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + g*(b-a)
			f2 = length(x2)
		}
	}
	alpha := (a + b) / 2
	shortest = [2]float64{l.Quantile(alpha), l.Quantile(alpha + p)}
	if shortest[1]-shortest[0] > symmetric[1]-symmetric[0] {
		shortest = symmetric
	}
	return symmetric, shortest
}

// model returns the Monte Carlo model that draws y by inversion: y = Q(Z), Z ~ N(0, 1) clamped to
// ±5 (probability 5.7e-7 of clamping).
func (l *ExactLaw) model() Model {
	inv, zMax := l.inv, l.zMax
	return func(r *rand.Rand, y []float64) {
		for i := range y {
			z := math.Max(-zMax, math.Min(zMax, r.NormFloat64()))
			y[i] = inv.at(z)
		}
	}
}

// ExactSummary reports the exact law of a plan's Monte Carlo value (nm) and how the Monte Carlo agrees
// with it.
type ExactSummary struct {
	IntervalNM         [2]float64 `json:"interval_nm"`          // probabilistically symmetric
	ShortestIntervalNM [2]float64 `json:"shortest_interval_nm"` // shortest
	MeanNM             float64    `json:"mean_nm"`
	StdUncNM           float64    `json:"standard_uncertainty_nm"`
	NonPositive        float64    `json:"nonpositive_fraction"` // P(D̂ ≤ 0)
	// MonteCarloDeviationSE is the larger deviation of the Monte Carlo's symmetric interval ends from
	// the exact ones, in standard errors of a Monte Carlo quantile, √(p(1−p)/M)/f(y_p) (f the exact
	// density); MonteCarloAgrees reports that it is at most 4.
	MonteCarloDeviationSE float64 `json:"monte_carlo_deviation_se"`
	MonteCarloAgrees      bool    `json:"monte_carlo_agrees"`
}

// summary compares the Monte Carlo result mc with the law at coverage p.
func (l *ExactLaw) summary(mc *Result, p float64) ExactSummary {
	sym, short := l.Intervals(p)
	ex := ExactSummary{IntervalNM: sym, ShortestIntervalNM: short, MeanNM: l.mean, StdUncNM: l.std, NonPositive: l.nonPos}
	M := float64(mc.Trials)
	for i, pe := range []float64{(1 - p) / 2, (1 + p) / 2} {
		se := math.Sqrt(pe*(1-pe)/M) / l.Density(sym[i])
		got := mc.Low
		if i == 1 {
			got = mc.High
		}
		ex.MonteCarloDeviationSE = math.Max(ex.MonteCarloDeviationSE, math.Abs(got-sym[i])/se)
	}
	ex.MonteCarloAgrees = ex.MonteCarloDeviationSE <= 4
	return ex
}

// Density returns the probability density of y at q (1/nm), from the derivative of the CDF table
// (zero outside the table's range, where the CDF is within 1e-9 of 0 or 1).
func (l *ExactLaw) Density(q float64) float64 {
	if q < l.qLo || q > l.qHi {
		return 0
	}
	g := l.fwd.at(q)
	return normalPDF(g) * l.dfwd.at(q)
}
