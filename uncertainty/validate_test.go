package uncertainty

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// uniformSumCDF returns P(Σ c_i U_i ≤ x) for independent U_i ~ R(0, 1) and widths c_i > 0, and the
// density there (exact piecewise-polynomial law, by inclusion–exclusion over the subsets S of the
// widths, c_S their sum; common practice, no source — it reduces to the Irwin–Hall law for equal c_i):
//
//	F(x) = Σ_S (−1)^|S| (x − c_S)₊ⁿ / (n! Π c_i),   f(x) = Σ_S (−1)^|S| (x − c_S)₊ⁿ⁻¹ / ((n−1)! Π c_i)
func uniformSumCDF(c []float64, x float64) (cdf, pdf float64) {
	n := len(c)
	prod, fact := 1.0, 1.0
	for i, v := range c {
		prod *= v
		fact *= float64(i + 1)
	}
	for mask := 0; mask < 1<<n; mask++ {
		cs, sign := 0.0, 1.0
		for i := range n {
			if mask>>i&1 == 1 {
				cs += c[i]
				sign = -sign
			}
		}
		if d := x - cs; d > 0 {
			cdf += sign * math.Pow(d, float64(n))
			pdf += sign * math.Pow(d, float64(n-1))
		}
	}
	return cdf / (fact * prod), pdf * float64(n) / (fact * prod)
}

// centredUniformSumQuantile returns the level-P quantile of Σ (c_i U_i − c_i/2) (a sum of centred
// rectangular laws R(−c_i/2, c_i/2)) and the density there, by bisection of uniformSumCDF.
func centredUniformSumQuantile(c []float64, level float64) (q, density float64) {
	var total float64
	for _, v := range c {
		total += v
	}
	lo, hi := 0.0, total
	for range 200 {
		mid := (lo + hi) / 2
		if F, _ := uniformSumCDF(c, mid); F < level {
			lo = mid
		} else {
			hi = mid
		}
	}
	_, density = uniformSumCDF(c, lo)
	return lo - total/2, density
}

func TestUniformSumLawHelper(t *testing.T) {
	// Checks of the test helper itself (exact identities): symmetry F(Σc/2) = ½, F(Σc) = 1, and one
	// rectangle R(0, c) has F(x) = x/c, f = 1/c.
	c := []float64{1, 2, 3.5}
	if F, _ := uniformSumCDF(c, 3.25); math.Abs(F-0.5) > 1e-12 {
		t.Errorf("F(Σc/2) = %v, want 0.5", F)
	}
	if F, _ := uniformSumCDF(c, 6.5); math.Abs(F-1) > 1e-12 {
		t.Errorf("F(Σc) = %v, want 1", F)
	}
	if F, f := uniformSumCDF([]float64{4}, 1); math.Abs(F-0.25) > 1e-12 || math.Abs(f-0.25) > 1e-12 {
		t.Errorf("R(0, 4) at 1: F = %v, f = %v, want 0.25, 0.25", F, f)
	}
	// Irwin–Hall n = 2 (triangle on [0, 2]): F(0.5) = 0.125, f(0.5) = 0.5.
	if F, f := uniformSumCDF([]float64{1, 1}, 0.5); math.Abs(F-0.125) > 1e-12 || math.Abs(f-0.5) > 1e-12 {
		t.Errorf("triangle at 0.5: F = %v, f = %v, want 0.125, 0.5", F, f)
	}
}

// rectangularSum returns the model Y = Σ X_i with X_i ~ R(−a_i, a_i).
func rectangularSum(a ...float64) Model {
	return func(r *rand.Rand, y []float64) {
		for i := range y {
			var s float64
			for _, ai := range a {
				s += ai * (2*r.Float64() - 1)
			}
			y[i] = s
		}
	}
}

func TestValidateGUMArithmetic(t *testing.T) {
	// Clause 8.2 by hand: y = 1, U = 2, MC interval [−0.96, 3.03], u = 1.0 → δ = 0.05 at n_dig = 2;
	// d_low = |1 − 2 + 0.96| = 0.04, d_high = |1 + 2 − 3.03| = 0.03 → validated; at n_dig = 3
	// (δ = 0.005) it is not.
	res := &Result{Low: -0.96, High: 3.03, StdUnc: 1.0}
	v := ValidateGUM(res, 1, 2, 2)
	near(t, "d_low", v.DLow, 0.04, 1e-12)
	near(t, "d_high", v.DHigh, 0.03, 1e-12)
	if v.Delta != 0.05 || !v.Passed {
		t.Errorf("n_dig 2: δ = %v, passed %v; want 0.05, true", v.Delta, v.Passed)
	}
	if v := ValidateGUM(res, 1, 2, 3); v.Delta != 0.005 || v.Passed {
		t.Errorf("n_dig 3: δ = %v, passed %v; want 0.005, false", v.Delta, v.Passed)
	}
	if v := ValidateGUM(res, 1, 2, 0); v.Delta != 0.05 {
		t.Errorf("n_dig 0 (default 2): δ = %v, want 0.05", v.Delta)
	}
	for name, f := range map[string]func(){
		"nil":   func() { ValidateGUM(nil, 0, 1, 2) },
		"U < 0": func() { ValidateGUM(res, 0, -1, 2) },
		"y NaN": func() { ValidateGUM(res, math.NaN(), 1, 2) },
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

func TestValidateJCGM101Clause923(t *testing.T) {
	// JCGM 101:2008 clause 9.2.3 (REFERENCES.md §7, as transcribed): Y = ΣX_i, four X_i ~ R(−√3, √3)
	// (u(x_i) = 1); published MCM 95 % interval ±3.88, GUF ±3.92 (y = 0, u = 2, k = 1.96).
	const m = 1_000_000
	s3 := math.Sqrt(3)
	res, err := Propagate(context.Background(), rectangularSum(s3, s3, s3, s3), Options{Trials: m, Seed: 923})
	if err != nil {
		t.Fatal(err)
	}
	// Exact law: a scaled Irwin–Hall sum.
	w := 2 * s3
	qHigh, f := centredUniformSumQuantile([]float64{w, w, w, w}, 0.975)
	se := quantileSE(0.975, f, m)
	near(t, "exact 97.5 % point (published 3.88)", qHigh, 3.88, 0.005) // the exact law is 3.879 4
	near(t, "y_high (exact)", res.High, qHigh, 4*se)
	near(t, "y_low (exact)", res.Low, -qHigh, 4*se)
	near(t, "y_high (published 3.88)", res.High, 3.88, 0.005+4*se)
	near(t, "y_low (published −3.88)", res.Low, -3.88, 0.005+4*se)
	seU := stdUncSE(res.Values, res.Mean, res.StdUnc)
	near(t, "u (exact 2)", res.StdUnc, 2, 4*seU)

	// GUF: y = 0, u = √(4·1²) = 2, U = 1.96·2 = 3.92 (published).
	const yGUF, UGUF = 0, 1.96 * 2
	near(t, "GUF U (published 3.92)", UGUF, 3.92, 0.005)

	// What the numbers say (clause 8.2): d_low = d_high = |3.92 − 3.8794| = 0.041 (exact law).
	// u = 2.0 gives δ = 0.05 at n_dig = 2 → validated; δ = 0.005 at n_dig = 3 → not validated.
	exact := ValidateGUM(&Result{Low: -qHigh, High: qHigh, StdUnc: 2}, yGUF, UGUF, 2)
	if !exact.Passed || exact.Delta != 0.05 {
		t.Errorf("exact law, n_dig 2: passed %v, δ %v; want true, 0.05", exact.Passed, exact.Delta)
	}
	if ValidateGUM(&Result{Low: -qHigh, High: qHigh, StdUnc: 2}, yGUF, UGUF, 3).Passed {
		t.Error("exact law, n_dig 3: validated, want not")
	}
	// The Monte Carlo comparison: its d's match the exact ones within the endpoints' 4 standard
	// errors and its δ is the same. The n_dig = 2 margin (0.05 − 0.041 = 0.009) is under 2 standard
	// errors of an endpoint at M = 10⁶, so the Monte Carlo verdict there is logged, not asserted; the
	// n_dig = 3 verdict (0.041 against 0.005, over 6 standard errors apart) is asserted.
	v2 := ValidateGUM(res, yGUF, UGUF, 2)
	near(t, "MC d_low", v2.DLow, exact.DLow, 4*se)
	near(t, "MC d_high", v2.DHigh, exact.DHigh, 4*se)
	if v2.Delta != 0.05 {
		t.Errorf("MC δ at n_dig 2 = %v, want 0.05", v2.Delta)
	}
	if v3 := ValidateGUM(res, yGUF, UGUF, 3); v3.Passed || v3.Delta != 0.005 {
		t.Errorf("MC n_dig 3: passed %v, δ %v; want false, 0.005", v3.Passed, v3.Delta)
	}
	t.Logf("9.2.3: MC [%.4f, %.4f], d = %.4f, %.4f, δ(2) = %v, validated at n_dig 2: %v",
		res.Low, res.High, v2.DLow, v2.DHigh, v2.Delta, v2.Passed)
}

func TestValidateJCGM101Clause924(t *testing.T) {
	// JCGM 101:2008 clause 9.2.4 (REFERENCES.md §7, as transcribed): three X_i ~ R(−√3, √3) and
	// X_4 ~ R(−10√3, 10√3); published MCM 95 % interval ±17.0, GUF ±19.9.
	const m = 1_000_000
	s3 := math.Sqrt(3)
	res, err := Propagate(context.Background(), rectangularSum(s3, s3, s3, 10*s3), Options{Trials: m, Seed: 924})
	if err != nil {
		t.Fatal(err)
	}
	w := 2 * s3
	qHigh, f := centredUniformSumQuantile([]float64{w, w, w, 10 * w}, 0.975)
	se := quantileSE(0.975, f, m)
	near(t, "exact 97.5 % point (published 17.0)", qHigh, 17.0, 0.05) // the exact law is 17.016
	near(t, "y_high (exact)", res.High, qHigh, 4*se)
	near(t, "y_low (exact)", res.Low, -qHigh, 4*se)
	near(t, "y_high (published 17.0)", res.High, 17.0, 0.05+4*se)
	near(t, "y_low (published −17.0)", res.Low, -17.0, 0.05+4*se)
	uExact := math.Sqrt(103) // √(3·1² + 10²)
	near(t, "u (exact √103)", res.StdUnc, uExact, 4*stdUncSE(res.Values, res.Mean, res.StdUnc))

	// GUF: y = 0, U = 1.96·√103 = 19.89 (published ±19.9).
	UGUF := 1.96 * uExact
	near(t, "GUF U (published 19.9)", UGUF, 19.9, 0.05)
	// Clause 8.2: d = |19.89 − 17.02| ≈ 2.9; u ≈ 10.15 gives δ = 0.5 at n_dig = 2 → not validated
	// (the point of JCGM 101 9.2.4, from memory). Only at n_dig = 1 (δ = 5) would it pass. Both
	// margins exceed 4 standard errors of an endpoint by far.
	v := ValidateGUM(res, 0, UGUF, 2)
	near(t, "d_low", v.DLow, UGUF-qHigh, 4*se)
	near(t, "d_high", v.DHigh, UGUF-qHigh, 4*se)
	if v.Passed || v.Delta != 0.5 {
		t.Errorf("n_dig 2: passed %v, δ %v; want false, 0.5", v.Passed, v.Delta)
	}
	if v1 := ValidateGUM(res, 0, UGUF, 1); !v1.Passed || v1.Delta != 5 {
		t.Errorf("n_dig 1: passed %v, δ %v; want true, 5", v1.Passed, v1.Delta)
	}
}

// massCalibration is the model of JCGM 101:2008 clause 9.3 (inputs from memory of its Table 13), in mg
// and kg/m³:
//
//	δm = (m_R,c + δm_R,c)·[1 + (ρ_a − ρ_a0)(1/ρ_W − 1/ρ_R)] − m_nom,   ρ_a0 = 1.2 kg/m³, m_nom = 100 g,
//	m_R,c ~ N(100 000.000, 0.050²) mg,  δm_R,c ~ N(1.234, 0.020²) mg,  ρ_a ~ R(1.10, 1.30),
//	ρ_W ~ R(7 000, 9 000),  ρ_R ~ R(7 950, 8 050) kg/m³.
func massCalibration(r *rand.Rand, y []float64) {
	const rhoA0, mNom = 1.2, 100_000.0
	for i := range y {
		mR := 100_000.000 + 0.050*r.NormFloat64()
		dmR := 1.234 + 0.020*r.NormFloat64()
		rhoA := 1.10 + 0.20*r.Float64()
		rhoW := 7000 + 2000*r.Float64()
		rhoR := 7950 + 100*r.Float64()
		y[i] = (mR+dmR)*(1+(rhoA-rhoA0)*(1/rhoW-1/rhoR)) - mNom
	}
}

func TestValidateJCGM101Clause93(t *testing.T) {
	// JCGM 101:2008 clause 9.3, mass calibration (REFERENCES.md §7, as transcribed): δm = 1.2340 mg,
	// u_GUF = 0.0539 mg (first order), u_MCM = 0.0754 mg. The inputs are from memory (see
	// massCalibration); the published outputs check them.
	const m = 1_000_000
	res, err := Propagate(context.Background(), massCalibration, Options{Trials: m, Seed: 93})
	if err != nil {
		t.Fatal(err)
	}
	// Exact moments, with A = m_R,c + δm_R,c, B = ρ_a − ρ_a0, C = 1/ρ_W − 1/ρ_R independent and
	// E[B] = 0: E[δm] = E[A] − m_nom = 1.234 mg, Var = Var(A) + E[A²]·E[B²]·E[C²], where
	// E[B²] = 0.1²/3, E[1/ρ] = ln(b/a)/(b−a) and E[1/ρ²] = 1/(ab) for ρ ~ R(a, b).
	varA := 0.050*0.050 + 0.020*0.020
	eA := 100_001.234
	eB2 := 0.1 * 0.1 / 3
	inv := func(a, b float64) float64 { return math.Log(b/a) / (b - a) }
	eC2 := 1/(7000.0*9000.0) - 2*inv(7000, 9000)*inv(7950, 8050) + 1/(7950.0*8050.0)
	uExact := math.Sqrt(varA + (varA+eA*eA)*eB2*eC2) // 0.075 48 mg
	seMean := res.StdUnc / math.Sqrt(m)
	seU := stdUncSE(res.Values, res.Mean, res.StdUnc)
	near(t, "δm (exact 1.234 mg)", res.Mean, 1.234, 4*seMean)
	near(t, "δm (published 1.2340 mg)", res.Mean, 1.2340, 0.00005+4*seMean)
	near(t, "u (exact)", res.StdUnc, uExact, 4*seU)
	near(t, "u_MCM (published 0.0754 mg)", res.StdUnc, 0.0754, 0.00005+4*seU)

	// GUF, first order: the sensitivities at the estimates are 1 for m_R,c and δm_R,c and 0 for the
	// densities (ρ_W = ρ_R = 8 000 kg/m³, ρ_a = ρ_a0), so u = √(0.050² + 0.020²) = 0.0539 mg published.
	uGUF := math.Sqrt(varA)
	near(t, "u_GUF (published 0.0539 mg)", uGUF, 0.0539, 0.00005)
	// Clause 8.2 with the first-order GUF (y = 1.2340 mg, U = 1.96·u_GUF): its interval is far too
	// short, d ≈ 0.04 mg against δ = 0.0005 mg (u ≈ 0.075 mg at n_dig = 2) → not validated. The
	// margin is checked against 4 standard errors of an endpoint, with the density there estimated
	// from the sorted values (a difference quotient over ±1 % of the values).
	v := ValidateGUM(res, 1.2340, 1.96*uGUF, 2)
	if v.Delta != 0.0005 {
		t.Errorf("δ = %v, want 0.0005", v.Delta)
	}
	q := CoverageCount(m, 0.95)
	rLow := SymmetricIndex(m, q)
	for _, end := range []struct {
		name  string
		d     float64
		r     int
		level float64
	}{{"d_low", v.DLow, rLow, 0.025}, {"d_high", v.DHigh, rLow + q, 0.975}} {
		k := m / 100
		f := float64(2*k) / float64(m) / (res.Values[end.r-1+k] - res.Values[end.r-1-k])
		if se := quantileSE(end.level, f, m); !(end.d > v.Delta+4*se) {
			t.Errorf("%s = %v is not clearly above δ = %v (4 SE = %v)", end.name, end.d, v.Delta, 4*se)
		}
	}
	if v.Passed {
		t.Error("first-order GUF validated, want not")
	}
	t.Logf("9.3: δm = %.5f mg, u = %.5f mg (exact %.5f), [%.4f, %.4f], d = %.4f, %.4f",
		res.Mean, res.StdUnc, uExact, res.Low, res.High, v.DLow, v.DHigh)
}
