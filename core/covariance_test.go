package core

import (
	"math"
	"sort"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// covModels is a set of physically valid (D, Δt, R, s2) used across the covariance-model tests:
// no noise, noise only, blur only, both, and the extreme blur R = 1/4.
var covModels = []struct{ D, dt, R, s2 float64 }{
	{2e-12, 0.03, 0, 0},
	{2e-12, 0.03, 0, 4e-15},
	{2e-12, 0.03, 1.0 / 6, 0},
	{1e-12, 0.01, 1.0 / 12, 9e-16},
	{1e-12, 0.01, 0.25, 0},
	{5e-13, 0.05, 0.1, 1e-13},
}

// tridiagonal returns the dense N×N matrix tridiag(c.Off, c.Diag, c.Off).
func tridiagonal(c StepCovariance, N int) *mat.SymDense {
	s := mat.NewSymDense(N, nil)
	for i := 0; i < N; i++ {
		s.SetSym(i, i, c.Diag)
		if i+1 < N {
			s.SetSym(i, i+1, c.Off)
		}
	}
	return s
}

// dstBasis returns V with V[j−1][k−1] = DSTVector(k, j, N).
func dstBasis(N int) *mat.Dense {
	v := mat.NewDense(N, N, nil)
	for j := 1; j <= N; j++ {
		for k := 1; k <= N; k++ {
			v.Set(j-1, k-1, DSTVector(k, j, N))
		}
	}
	return v
}

func TestStepCovarianceInTermsOfEpsilon(t *testing.T) {
	// Exact algebra (REFERENCES.md §2): with ε = s2/(DΔt) − 2R, Diag = 2DΔt(1+ε) and Off = −DΔt·ε.
	for _, m := range covModels {
		c := NewStepCovariance(m.D, m.dt, m.R, m.s2)
		u := m.D * m.dt
		eps := m.s2/u - 2*m.R
		if !approxRel(c.Diag, 2*u*(1+eps), 1e-12) || math.Abs(c.Off+u*eps) > 1e-12*u {
			t.Errorf("%+v: Diag %g Off %g, want %g %g", m, c.Diag, c.Off, 2*u*(1+eps), -u*eps)
		}
	}
}

func TestDSTBasisDiagonalisesStepCovariance(t *testing.T) {
	// Exact identity: V·diag(λ)·Vᵀ = tridiag(Off, Diag, Off) and VᵀV = I, checked with gonum mat products
	// to 1e-12 relative to the largest element.
	for _, N := range []int{1, 2, 3, 7, 32, 101} {
		V := dstBasis(N)
		var vtv mat.Dense
		vtv.Mul(V.T(), V)
		if !mat.EqualApprox(&vtv, identityDense(N), 1e-12) {
			t.Errorf("N=%d: VᵀV is not the identity", N)
		}
		for _, m := range covModels {
			c := NewStepCovariance(m.D, m.dt, m.R, m.s2)
			lam := mat.NewDiagDense(N, c.Eigenvalues(N))
			var rebuilt mat.Dense
			rebuilt.Product(V, lam, V.T())
			want := tridiagonal(c, N)
			scale := c.Diag
			for i := 0; i < N; i++ {
				for j := 0; j < N; j++ {
					if d := math.Abs(rebuilt.At(i, j) - want.At(i, j)); d > 1e-12*scale {
						t.Fatalf("N=%d %+v: element (%d,%d) = %g, want %g", N, m, i, j, rebuilt.At(i, j), want.At(i, j))
					}
				}
			}
		}
	}
}

func TestEigenvaluesMatchGonumEigenSym(t *testing.T) {
	// Reference: gonum mat.EigenSym on the dense tridiagonal matrix, agreement ~1e-10 of the spread.
	for _, N := range []int{1, 2, 5, 50, 200} {
		for _, m := range covModels {
			c := NewStepCovariance(m.D, m.dt, m.R, m.s2)
			var es mat.EigenSym
			if !es.Factorize(tridiagonal(c, N), false) {
				t.Fatal("EigenSym failed")
			}
			ref := es.Values(nil)
			got := c.Eigenvalues(N)
			sort.Float64s(got)
			for i := range got {
				if math.Abs(got[i]-ref[i]) > 1e-10*c.Diag {
					t.Errorf("N=%d %+v: λ[%d] = %g, gonum %g", N, m, i, got[i], ref[i])
				}
			}
			if got[0] < 0 {
				t.Errorf("N=%d %+v: negative eigenvalue %g in a valid model", N, m, got[0])
			}
		}
	}
}

func TestDSTVectorLargeIndexAccuracy(t *testing.T) {
	// The argument reduction must not change the value: compare with the unreduced sine for moderate N,
	// and check orthonormality of two vectors at N = 5000 directly.
	N := 5000
	norm, dot := 0.0, 0.0
	for j := 1; j <= N; j++ {
		a, b := DSTVector(4321, j, N), DSTVector(4322, j, N)
		norm += a * a
		dot += a * b
	}
	if math.Abs(norm-1) > 1e-12 || math.Abs(dot) > 1e-12 {
		t.Errorf("N=%d: |v|² = %.15g, v·w = %g", N, norm, dot)
	}
	for _, jk := range [][2]int{{3, 5}, {17, 19}, {20, 20}} {
		n := 20
		want := math.Sqrt(2/float64(n+1)) * math.Sin(float64(jk[0]*jk[1])*math.Pi/float64(n+1))
		if got := DSTVector(jk[1], jk[0], n); math.Abs(got-want) > 1e-14 {
			t.Errorf("DSTVector(%d,%d,%d) = %g, want %g", jk[1], jk[0], n, got, want)
		}
	}
}

func TestStepCovariancePanics(t *testing.T) {
	for name, f := range map[string]func(){
		"blur>1/4":      func() { NewStepCovariance(1, 1, 0.3, 0) },
		"negative s2":   func() { NewStepCovariance(1, 1, 0, -1) },
		"zero interval": func() { NewStepCovariance(1, 0, 0, 0) },
		"k=0":           func() { StepCovariance{1, 0}.Eigenvalue(0, 3) },
		"j>N":           func() { DSTVector(1, 4, 3) },
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

func identityDense(n int) *mat.Dense {
	d := mat.NewDense(n, n, nil)
	for i := 0; i < n; i++ {
		d.Set(i, i, 1)
	}
	return d
}

// approxRel reports whether got is within rel (relative) of want.
func approxRel(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Abs(want)
}
