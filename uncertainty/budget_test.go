package uncertainty

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

func TestBudgetExactCase(t *testing.T) {
	// Known-noise estimator, σ = 0, no blur, exact inputs: D̂ = D·χ²(k)/k, so u(D̂)/D = √(2/k), the
	// track term's degrees of freedom 2/u² = k, ν_eff = k and k_p = t_{0.975}(k) (gonum
	// distuv.StudentsT).
	zero := 0.0
	s := Demo()
	s.Estimator, s.LocalisationNM, s.ExposureS, s.TemperatureUK, s.PixelRelU, s.ViscosityRelU = "known-noise", 0, 0, 0, 0, &zero
	s.Frames, s.Tracks = 11, 3
	u, err := newSetup(s)
	if err != nil {
		t.Fatal(err)
	}
	b := u.budget(u.groups)
	k := float64(s.Dims * s.Tracks * (s.Frames - 1))
	if len(b.Sources) != 1 || math.Abs(b.RelU-math.Sqrt(2/k)) > 1e-12*math.Sqrt(2/k) {
		t.Fatalf("sources %d, u_c/r = %.15g, want √(2/k) = %.15g", len(b.Sources), b.RelU, math.Sqrt(2/k))
	}
	if math.Abs(float64(b.EffectiveDOF)-k) > 1e-9*k {
		t.Errorf("ν_eff = %g, want %g", float64(b.EffectiveDOF), k)
	}
	want := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: k}.Quantile(0.975)
	if math.Abs(b.K-want) > 1e-12 {
		t.Errorf("k = %.15g, want %.15g", b.K, want)
	}
}

func TestBudgetTemperatureSensitivity(t *testing.T) {
	// r = k_B·T/(6π·η(T)·D): ∂ln r/∂T = 1/T − d ln η/dT, with d ln η/dT from the medium model; the
	// rectangular ±a has u = a/√3 (JCGM 100 4.3.7). Checked against a central difference of ln r(T).
	s := Demo()
	u, err := newSetup(s)
	if err != nil {
		t.Fatal(err)
	}
	b := u.budget(u.groups)
	var src Source
	for _, x := range b.Sources {
		if x.Source == "temperature" {
			src = x
		}
	}
	lnr := func(T float64) float64 {
		eta, _ := u.medium.Viscosity(T)
		return math.Log(T / eta)
	}
	h := 1e-3
	fd := (lnr(u.T0+h) - lnr(u.T0-h)) / (2 * h)
	if math.Abs(src.Sensitivity-fd) > 1e-7*math.Abs(fd) {
		t.Errorf("c_T = %.10g, finite difference %.10g", src.Sensitivity, fd)
	}
	if math.Abs(src.InputU-s.TemperatureUK/math.Sqrt(3)) > 1e-15 {
		t.Errorf("u_T = %g, want a/√3", src.InputU)
	}
	// The common-practice figure: near 25 °C in water one kelvin moves the radius by about 2.6 %
	// (common practice, no source); the model gives 1/T − d ln η/dT.
	if src.Sensitivity < 0.024 || src.Sensitivity > 0.028 {
		t.Errorf("c_T = %.4f /K, not about 2.6 %%/K", src.Sensitivity)
	}
	sum := 0.0
	for _, x := range b.Sources {
		sum += x.Share
	}
	if math.Abs(sum-1) > 1e-12 {
		t.Errorf("shares add to %.15g", sum)
	}
}

func TestBudgetNoiseDominatedStaysFinite(t *testing.T) {
	// One 3-position track with σ far above the step: ν_eff from Welch–Satterthwaite falls below 1; it
	// is kept at 1 so the coverage factor t_{0.975}(1) = 12.706 stays finite and the plan completes.
	s := Demo()
	s.RadiusNM, s.Medium, s.GlycerolMassFraction, s.LocalisationNM = 100, "glycerol", 0.6, 1000
	s.Frames, s.Tracks, s.Trials, s.TargetRelU = 3, 1, 1000, 0
	res, err := Plan(context.Background(), s, PlanOptions{NoPlanner: true})
	if err != nil {
		t.Fatal(err)
	}
	if float64(res.GUM.EffectiveDOF) != 1 || math.Abs(res.GUM.K-12.706204736) > 1e-8 {
		t.Errorf("ν_eff = %v, k = %v; want 1 and 12.706204736 (t table, ν = 1)", float64(res.GUM.EffectiveDOF), res.GUM.K)
	}
}
