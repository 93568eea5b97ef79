package uncertainty

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

func TestQuantilesAgainstDistuv(t *testing.T) {
	// The engine's distribution functions equal gonum distuv's to ~1e-12 (same mathext underneath).
	for _, p := range []float64{1e-6, 0.025, 0.3, 0.5, 0.8, 0.975, 0.999999} {
		if a, b := normalQuantile(p), distuv.UnitNormal.Quantile(p); math.Abs(a-b) > 1e-12*(1+math.Abs(b)) {
			t.Errorf("normal quantile %g: %v vs %v", p, a, b)
		}
		for _, nu := range []float64{1, 2.5, 9, 100, 1e6} {
			a, b := studentQuantile(p, nu), distuv.StudentsT{Mu: 0, Sigma: 1, Nu: nu}.Quantile(p)
			if math.Abs(a-b) > 1e-10*(1+math.Abs(b)) {
				t.Errorf("t quantile p=%g ν=%g: %v vs %v", p, nu, a, b)
			}
		}
	}
	for _, x := range []float64{-6, -1.96, 0, 0.7, 3} {
		if a, b := normalCDF(x), distuv.UnitNormal.CDF(x); math.Abs(a-b) > 1e-15 {
			t.Errorf("Φ(%g): %v vs %v", x, a, b)
		}
		if a, b := normalPDF(x), distuv.UnitNormal.Prob(x); math.Abs(a-b) > 1e-15 {
			t.Errorf("φ(%g): %v vs %v", x, a, b)
		}
	}
	for _, k := range []float64{1, 2, 3, 50} {
		for _, x := range []float64{0.01, 1, 2.5, 40, 80} {
			if a, b := chiSquaredCDF(k, x), (distuv.ChiSquared{K: k}).CDF(x); math.Abs(a-b) > 1e-12 {
				t.Errorf("χ²(%g) CDF(%g): %v vs %v", k, x, a, b)
			}
		}
	}
	// Published table value: t_{0.975}(1) = 12.706 (any t table; e.g. JCGM 100 Table G.2: 12.71).
	if v := studentQuantile(0.975, 1); math.Abs(v-12.706) > 0.0005 {
		t.Errorf("t_0.975(1) = %v", v)
	}
}
