package core

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestFisherInformationAgainstDenseTrace(t *testing.T) {
	// Reference: I_ij = ½·tr(S⁻¹∂_iS S⁻¹∂_jS) with the full inverse from gonum mat.Inverse and dense
	// products (tolerance 1e-10).
	for _, N := range []int{1, 2, 5, 40, 150} {
		for _, m := range covModels {
			S := tridiagonal(NewStepCovariance(m.D, m.dt, m.R, m.s2), N)
			dD := tridiagonal(StepCovariance{Diag: 2 * m.dt * (1 - 2*m.R), Off: 2 * m.R * m.dt}, N)
			dS := tridiagonal(StepCovariance{Diag: 2, Off: -1}, N)
			var inv mat.Dense
			if err := inv.Inverse(S); err != nil {
				t.Fatal(err)
			}
			der := []*mat.SymDense{dD, dS}
			got := FisherInformation(m.D, m.dt, m.R, m.s2, N)
			for i := 0; i < 2; i++ {
				for j := 0; j < 2; j++ {
					var a, b, p mat.Dense
					a.Mul(&inv, der[i])
					b.Mul(&inv, der[j])
					p.Mul(&a, &b)
					ref := mat.Trace(&p) / 2
					if !approxRel(got[i][j], ref, 1e-10) {
						t.Errorf("N=%d %+v: I[%d][%d] = %g, dense %g", N, m, i, j, got[i][j], ref)
					}
				}
			}
		}
	}
}

func TestCRBKnownNoiseChiSquareLaw(t *testing.T) {
	// Exact result: without noise and blur, D̂ = D·χ²(k)/k, k = dims·N, is efficient and the bound is
	// its variance 2D²/(N·dims) (REFERENCES.md §3).
	for _, N := range []int{1, 7, 1000} {
		for _, dims := range []int{1, 2, 3} {
			D := 2.2e-12
			want := 2 * D * D / float64(N*dims)
			if got := CRBKnownNoise(D, 0.01, 0, 0, N, dims); !approxRel(got, want, 1e-13) {
				t.Errorf("N=%d dims=%d: %g, want %g", N, dims, got, want)
			}
			if v := VarKnownNoiseExact(D, 0.01, 0, 0, N, dims); !approxRel(v, want, 1e-13) {
				t.Errorf("N=%d dims=%d: known-noise variance %g, want %g", N, dims, v, want)
			}
		}
	}
}

func TestCRBExactApproachesAsymptotic(t *testing.T) {
	// Michalet & Berglund 2012 (Phys. Rev. E 85, 061916): N·CRB → 2D²(1 + 2√(1+2ε)). The DST sum is a
	// trapezoid rule for a smooth even periodic function of θ = kπ/(N+1) with the end points left out,
	// so the exact bound differs from the limit by c/N + O(1/N²). Measure c at N = 1e5 and require
	// |CRBExact/CRBAsymptotic − 1| ≤ 1.02·|c|/N at N = 1e4, and the same c to 2 % at both sizes.
	D, dt := 1e-12, 0.02
	for _, R := range []float64{0, 1.0 / 6, 0.25} {
		for _, x := range []float64{0.1, 1, 10} {
			s2 := x * D * dt
			eps := x - 2*R
			rel := func(N int) float64 {
				return CRBExact(D, dt, R, s2, N, 2)/CRBAsymptotic(D, eps, N, 2) - 1
			}
			c := 1e5 * rel(1e5)
			r4 := rel(1e4)
			if math.Abs(r4) > 1.02*math.Abs(c)/1e4 || math.Abs(1e4*r4-c) > 0.02*math.Abs(c) {
				t.Errorf("R=%.3g x=%g: N·(ratio−1) = %.5g at 1e4, %.5g at 1e5", R, x, 1e4*r4, c)
			}
			t.Logf("R=%.3g x=%g ε=%.3g: CRBExact/CRBAsymptotic − 1 = %.3g at N=1e4 (N·diff %.4g; %.4g at N=1e5)", R, x, eps, r4, 1e4*r4, c)
		}
	}
}

func TestCRBBelowEstimatorVariances(t *testing.T) {
	// The CVE and the known-noise estimator are unbiased, so their exact variances cannot fall below the
	// matching bound; knowing s2 can only lower the bound. Also report the CVE efficiency.
	D, dt := 1e-12, 0.02
	for _, R := range []float64{0, 1.0 / 12, 1.0 / 6, 0.25} {
		for _, x := range []float64{0, 0.05, 0.5, 2, 10, 100} {
			for _, N := range []int{2, 3, 5, 10, 30, 100, 1000} {
				s2 := x * D * dt
				crb := CRBExact(D, dt, R, s2, N, 2)
				crbK := CRBKnownNoise(D, dt, R, s2, N, 2)
				cve := VarCVEExact(D, dt, R, s2, N, 2)
				kn := VarKnownNoiseExact(D, dt, R, s2, N, 2)
				if crb > cve*(1+1e-12) {
					t.Errorf("R=%g x=%g N=%d: CRBExact %g above VarCVEExact %g", R, x, N, crb, cve)
				}
				if crbK > kn*(1+1e-12) {
					t.Errorf("R=%g x=%g N=%d: CRBKnownNoise %g above VarKnownNoiseExact %g", R, x, N, crbK, kn)
				}
				if crbK > crb*(1+1e-12) {
					t.Errorf("R=%g x=%g N=%d: known-noise bound %g above the unknown-noise bound %g", R, x, N, crbK, crb)
				}
				if N == 1000 && (x == 0 || x == 10) {
					t.Logf("R=%.3g x=%g N=%d: CRBExact/VarCVEExact = %.4f", R, x, N, crb/cve)
				}
			}
		}
	}
}

func TestCRBPanics(t *testing.T) {
	for name, f := range map[string]func(){
		"D=0":     func() { CRBExact(0, 1, 0, 1, 10, 1) },
		"N=0":     func() { CRBKnownNoise(1, 1, 0, 0, 0, 1) },
		"dims=0":  func() { CRBExact(1, 1, 0, 0, 10, 0) },
		"eps<-.5": func() { CRBAsymptotic(1, -0.6, 10, 1) },
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
