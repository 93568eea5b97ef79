package core

import (
	"math"
	"testing"
)

func TestWaterDensityIF97Table5(t *testing.T) {
	// IAPWS-IF97 Table 5 (region 1 check values), as printed in REFERENCES.md §5; tolerance half a
	// unit in the last printed digit.
	for _, c := range []struct {
		T, p, v, tol float64
	}{
		{300, 3, 0.00100215168, 0.5e-11},
		{300, 80, 0.000971180894, 0.5e-12},
		{500, 3, 0.0012024180, 0.5e-10},
	} {
		rho, err := WaterDensityIF97(c.T, c.p)
		if err != nil {
			t.Fatalf("WaterDensityIF97(%g, %g): %v", c.T, c.p, err)
		}
		if v := 1 / rho; math.Abs(v-c.v) > c.tol {
			t.Errorf("v(%g K, %g MPa) = %.12g m³/kg, IF97 Table 5: %.12g", c.T, c.p, v, c.v)
		}
	}
}

func TestWaterSaturationPressureIF97Table35(t *testing.T) {
	// IAPWS-IF97 Table 35 (region 4 check values of p_s(T)), from memory; nine significant digits,
	// tolerance half a unit in the ninth.
	for _, c := range []struct{ T, p, tol float64 }{
		{300, 0.353658941e-2, 0.5e-11},
		{500, 0.263889776e1, 0.5e-8},
		{600, 0.123443146e2, 0.5e-7},
	} {
		p, err := WaterSaturationPressureIF97(c.T)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(p-c.p) > c.tol {
			t.Errorf("p_s(%g K) = %.10g MPa, IF97 Table 35: %.9g", c.T, p, c.p)
		}
	}
}

func TestWaterSaturationTemperatureIF97Table36(t *testing.T) {
	// IAPWS-IF97 Table 36 (region 4 check values of T_s(p)), from memory; tolerance half a unit in
	// the ninth significant digit.
	for _, c := range []struct{ p, T float64 }{
		{0.1, 0.372755919e3},
		{1, 0.453035632e3},
		{10, 0.584149488e3},
	} {
		T, err := WaterSaturationTemperatureIF97(c.p)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(T-c.T) > 0.5e-6 {
			t.Errorf("T_s(%g MPa) = %.10g K, IF97 Table 36: %.9g", c.p, T, c.T)
		}
	}
}

func TestWaterSaturationRoundTrip(t *testing.T) {
	// Exact identity: IF97 Eq. (31) is the algebraic inverse of Eq. (30), so T_s(p_s(T)) = T.
	for T := 273.15; T <= 647.0; T += 7.3 {
		p := saturationPressure(T)
		if got := saturationTemperature(p); math.Abs(got-T)/T > 1e-12 {
			t.Errorf("T_s(p_s(%g)) = %.15g", T, got)
		}
	}
}

func TestWaterSaturationPressureAtTriplePoint(t *testing.T) {
	// IAPWS-IF97 gives p_s(273.15 K) = 611.213 Pa (the quoted lower pressure limit of region 4, from
	// memory); tolerance half a unit in the last digit.
	if p := saturationPressure(273.15); math.Abs(p-611.213e-6) > 0.5e-9 {
		t.Errorf("p_s(273.15 K) = %.9g MPa, want 0.000611213", p)
	}
}

func TestRegion1ThermalExpansionRichardson(t *testing.T) {
	// α_v = ∂ln v/∂T at fixed p against a sixth-order finite difference of ln v (see
	// richardsonDerivative); analytic-versus-numeric, tolerance 1e-9 relative to max(|α_v|, 1e-4 1/K)
	// because α_v passes through zero at the density maximum near 277.1 K.
	for _, p := range []float64{0.101325, 3, 40, 100} {
		for _, T := range []float64{274, 277.13, 300, 350, 450, 600} {
			if p < saturationPressure(T+0.4) {
				continue
			}
			want := richardsonDerivative(func(T float64) float64 { return math.Log(region1Volume(T, p)) }, T, 0.4)
			if got := region1ThermalExpansion(T, p); math.Abs(got-want) > 1e-9*math.Max(math.Abs(want), 1e-4) {
				t.Errorf("α_v(%g K, %g MPa) = %.12g, finite difference %.12g", T, p, got, want)
			}
		}
	}
}

func TestWaterDensityMaximum(t *testing.T) {
	// Liquid water at atmospheric pressure is densest at 3.98 °C (from memory): α_v changes sign
	// between 3.8 °C and 4.2 °C.
	const p = 0.101325
	if lo, hi := region1ThermalExpansion(276.95, p), region1ThermalExpansion(277.35, p); !(lo < 0 && hi > 0) {
		t.Errorf("α_v(3.8 °C) = %g, α_v(4.2 °C) = %g: want a sign change", lo, hi)
	}
}

func TestWaterDensityIF97Range(t *testing.T) {
	for _, c := range []struct {
		T, p  float64
		field string
	}{
		{273.14, 1, "temperature_K"},
		{623.16, 50, "temperature_K"},
		{math.NaN(), 1, "temperature_K"},
		{300, 0.003, "pressure_MPa"}, // below p_s(300 K) = 0.00354 MPa: vapour
		{500, 2.6, "pressure_MPa"},   // below p_s(500 K) = 2.639 MPa: vapour
		{300, 100.01, "pressure_MPa"},
		{300, 0, "pressure_MPa"},
		{300, math.Inf(1), "pressure_MPa"},
	} {
		_, err := WaterDensityIF97(c.T, c.p)
		wantRangeError(t, "WaterDensityIF97", err, c.field)
	}
	// The region's corners are inside.
	for _, c := range [][2]float64{{273.15, 100}, {623.15, 100}, {500, saturationPressure(500)}} {
		if _, err := WaterDensityIF97(c[0], c[1]); err != nil {
			t.Errorf("WaterDensityIF97(%g, %g): %v", c[0], c[1], err)
		}
	}
	_, err := WaterSaturationPressureIF97(650)
	wantRangeError(t, "WaterSaturationPressureIF97(650)", err, "temperature_K")
	_, err = WaterSaturationTemperatureIF97(23)
	wantRangeError(t, "WaterSaturationTemperatureIF97(23)", err, "pressure_MPa")
	_, err = WaterSaturationTemperatureIF97(0.0006)
	wantRangeError(t, "WaterSaturationTemperatureIF97(0.0006)", err, "pressure_MPa")
}

func BenchmarkWaterDensityIF97(b *testing.B) {
	for b.Loop() {
		_, _ = WaterDensityIF97(298.15, 0.101325)
	}
}
