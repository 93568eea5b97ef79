package core

import (
	"fmt"
	"math"
)

// Reducing constants of IAPWS R12-08.
const (
	r12TStar   = 647.096 // K
	r12RhoStar = 322.0   // kg/m³
	r12MuStar  = 1e-6    // Pa·s
)

// r12H0 holds H_0…H_3 of the dilute-gas term μ0 (IAPWS R12-08, Table 1).
var r12H0 = [4]float64{1.67752, 2.20462, 0.6366564, -0.241605}

// r12H1 holds the nonzero coefficients H_ij of the residual term μ1 (IAPWS R12-08, Table 2); i is
// the power of (ρ̄ − 1), j the power of (1/T̄ − 1).
var r12H1 = [21]struct {
	i, j int
	h    float64
}{
	{0, 0, 0.520094}, {0, 1, 0.0850895}, {0, 2, -1.08374}, {0, 3, -0.289555},
	{1, 0, 0.222531}, {1, 1, 0.999115}, {1, 2, 1.88797}, {1, 3, 1.26613}, {1, 5, 0.120573},
	{2, 0, -0.281378}, {2, 1, -0.906851}, {2, 2, -0.772479}, {2, 3, -0.489837}, {2, 4, -0.257040},
	{3, 0, 0.161913}, {3, 1, 0.257399},
	{4, 0, -0.0325372}, {4, 3, 0.0698452},
	{5, 4, 0.00872102},
	{6, 3, -0.00435673}, {6, 5, -0.000593264},
}

// WaterViscosityIAPWS returns the dynamic viscosity in Pa·s of ordinary water at temperature T (K)
// and density rho (kg/m³) from the IAPWS 2008 correlation, without the critical enhancement
// (μ2 = 1, which R12-08 recommends for industrial use away from the critical point):
//
//	T̄ = T/647.096 K,  ρ̄ = ρ/(322 kg/m³)
//	μ0 = 100·√T̄ / Σ_{i=0..3} H_i/T̄^i
//	μ1 = exp[ρ̄ · Σ H_ij (ρ̄ − 1)^i (1/T̄ − 1)^j]
//	μ = 1 µPa·s · μ0 · μ1
//
// The correlation is evaluated as it is, without range checks: R12-08 covers the fluid from the
// melting line to 1173.15 K at pressures up to 1000 MPa (with uncertainties from under 1 % to 7 %
// depending on the state point); callers check that (T, rho) is a state they mean. Use Water for
// the liquid with its range enforced. It panics if T or rho is not positive and finite.
//
// References:
//   - IAPWS R12-08, Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary Water
//     Substance, Eqs. (10)–(12), Tables 1 and 2.
//   - Huber M.L. et al. (2009) J. Phys. Chem. Ref. Data 38, 101.
func WaterViscosityIAPWS(T, rho float64) float64 {
	mustPositive("WaterViscosityIAPWS", T, rho)
	return r12MuStar * math.Exp(waterLnMu(T/r12TStar, rho/r12RhoStar))
}

// waterLnMu returns ln(μ0·μ1) at reduced temperature tb and reduced density rb.
func waterLnMu(tb, rb float64) float64 {
	s := 0.0
	for i, h := range r12H0 {
		s += h * powInt(tb, -i)
	}
	x := 1/tb - 1
	r := rb - 1
	q := 0.0
	for _, c := range r12H1 {
		q += c.h * powInt(r, c.i) * powInt(x, c.j)
	}
	return math.Log(100*math.Sqrt(tb)/s) + rb*q
}

// waterLnMuPartials returns ∂ln μ/∂T̄ at fixed ρ̄ and ∂ln μ/∂ρ̄ at fixed T̄ of waterLnMu.
func waterLnMuPartials(tb, rb float64) (dT, dRho float64) {
	s, ds := 0.0, 0.0
	for i, h := range r12H0 {
		s += h * powInt(tb, -i)
		ds -= float64(i) * h * powInt(tb, -i-1)
	}
	x := 1/tb - 1
	r := rb - 1
	q, dqdx, dqdr := 0.0, 0.0, 0.0
	for _, c := range r12H1 {
		ri, xj := powInt(r, c.i), powInt(x, c.j)
		q += c.h * ri * xj
		if c.j > 0 {
			dqdx += c.h * ri * float64(c.j) * powInt(x, c.j-1)
		}
		if c.i > 0 {
			dqdr += c.h * float64(c.i) * powInt(r, c.i-1) * xj
		}
	}
	dxdt := -1 / (tb * tb)
	dT = 0.5/tb - ds/s + rb*dqdx*dxdt
	dRho = q + rb*dqdr
	return dT, dRho
}

// AmbientPressureMPa is the standard atmosphere, 0.101325 MPa, the pressure Water uses when its
// PressureMPa is zero.
const AmbientPressureMPa = 0.101325

// Water is liquid ordinary water at a fixed pressure. Its viscosity is the IAPWS 2008 correlation
// (WaterViscosityIAPWS, μ2 = 1) evaluated at the IAPWS-IF97 region-1 density (WaterDensityIF97) at
// that pressure.
//
// PressureMPa is the absolute pressure in MPa; zero means AmbientPressureMPa (0.101325 MPa). The valid
// pressures are p_s(273.15 K) = 0.000611213 MPa ≤ p ≤ 100 MPa. The valid temperatures are those of
// the liquid at that pressure: from 273.15 K, which we take as the lower limit for the melting point
// (the IF97 region-1 limit; the true melting point is within 0.01 K of it at ambient pressure and falls
// slightly with pressure), to the boiling point T_s(p) of IF97 region 4 (373.124 K at 0.101325 MPa),
// and never above 623.15 K, the upper limit of IF97 region 1. Outside them the methods return a
// *RangeError naming "temperature_K" or "pressure_MPa".
//
// References:
//   - IAPWS R12-08 (viscosity, 2008); Huber M.L. et al. (2009) J. Phys. Chem. Ref. Data 38, 101.
//   - IAPWS R7-97(2012), IAPWS-IF97, regions 1 and 4.
type Water struct {
	PressureMPa float64
}

// Name returns "water".
func (Water) Name() string { return "water" }

// pressure returns the pressure in MPa with zero read as ambient.
func (w Water) pressure() float64 {
	if w.PressureMPa == 0 {
		return AmbientPressureMPa
	}
	return w.PressureMPa
}

// TemperatureRange returns the liquid range [Tmin, Tmax] in K at the medium's pressure (see Water),
// or a *RangeError naming "pressure_MPa" when the pressure is outside p_s(273.15 K) ≤ p ≤ 100 MPa.
func (w Water) TemperatureRange() (Tmin, Tmax float64, err error) {
	p := w.pressure()
	pmin := saturationPressure(if97MinTemperature)
	if err := checkRange("pressure_MPa", p, pmin, if97Region1MaxP,
		"liquid water needs at least the saturation pressure at 273.15 K and at most the IAPWS-IF97 region 1 limit of 100 MPa"); err != nil {
		return 0, 0, err
	}
	Tmax = if97Region1MaxT
	if p < saturationPressure(if97Region1MaxT) {
		Tmax = saturationTemperature(p)
	}
	return if97MinTemperature, Tmax, nil
}

// check returns the pressure in MPa, or a *RangeError when T or the pressure is outside the range.
func (w Water) check(T float64) (float64, error) {
	lo, hi, err := w.TemperatureRange()
	if err != nil {
		return 0, err
	}
	p := w.pressure()
	why := fmt.Sprintf("liquid water at %s MPa: from the melting point (taken as 273.15 K) to the boiling point of IAPWS-IF97 region 4", fmtG(p))
	if hi == if97Region1MaxT {
		why = fmt.Sprintf("liquid water at %s MPa: from the melting point (taken as 273.15 K) to 623.15 K, the upper limit of IAPWS-IF97 region 1", fmtG(p))
	}
	return p, checkRange("temperature_K", T, lo, hi, why)
}

// Viscosity returns η(T) in Pa·s: WaterViscosityIAPWS(T, ρ(T, p)) with ρ from IF97 region 1.
func (w Water) Viscosity(T float64) (float64, error) {
	p, err := w.check(T)
	if err != nil {
		return 0, err
	}
	return WaterViscosityIAPWS(T, 1/region1Volume(T, p)), nil
}

// DLnEtaDT returns d ln η/dT in 1/K along the isobar, analytically:
//
//	d ln η/dT = (1/T*)·∂ln μ/∂T̄ + (ρ/ρ*)·∂ln μ/∂ρ̄ · (d ln ρ/dT),  d ln ρ/dT = −α_v
//
// with α_v the isobaric expansion coefficient of IF97 region 1. About −0.0228 1/K at 298.15 K and
// 0.101325 MPa.
func (w Water) DLnEtaDT(T float64) (float64, error) {
	p, err := w.check(T)
	if err != nil {
		return 0, err
	}
	rb := 1 / region1Volume(T, p) / r12RhoStar
	dT, dRho := waterLnMuPartials(T/r12TStar, rb)
	return dT/r12TStar - dRho*rb*region1ThermalExpansion(T, p), nil
}

// RelativeUncertainty returns 0.01 inside the liquid range and NaN outside it (where Viscosity
// returns an error). The 1 % is IAPWS R12-08's stated uncertainty for the ambient liquid, quoted from
// memory (R12-08 states from under 1 % to 7 % depending on the state point); we apply it to the
// whole liquid range up to 100 MPa, which is our reading, not a statement of R12-08.
func (w Water) RelativeUncertainty(T float64) float64 {
	if _, err := w.check(T); err != nil {
		return math.NaN()
	}
	return 0.01
}

// sr6 holds a_i and b_i of IAPWS SR6-08(2011), Eq. (1).
var sr6 = [4]struct{ a, b float64 }{
	{280.68, -1.9}, {511.45, -7.7}, {61.131, -19.6}, {0.45903, -40},
}

// WaterViscositySR6 returns the viscosity in Pa·s of liquid water at 0.1 MPa and temperature T (K)
// from the simple correlation of IAPWS SR6-08(2011):
//
//	μ = Σ_{i=1..4} a_i·(T/300 K)^b_i  µPa·s
//	a = 280.68, 511.45, 61.131, 0.45903;  b = −1.9, −7.7, −19.6, −40
//
// Valid for 253.15 K ≤ T ≤ 383.15 K (including the supercooled and the metastable superheated
// liquid); outside it a *RangeError names "temperature_K". It is an independent fit, used here to
// cross-check Water.
//
// References:
//   - IAPWS SR6-08(2011), Revised Supplementary Release on Properties of Liquid Water at 0.1 MPa.
//   - Pátek J. et al. (2009) J. Phys. Chem. Ref. Data 38, 21.
func WaterViscositySR6(T float64) (float64, error) {
	if err := checkRange("temperature_K", T, 253.15, 383.15, "IAPWS SR6-08 liquid water at 0.1 MPa"); err != nil {
		return 0, err
	}
	x := T / 300
	mu := 0.0
	for _, c := range sr6 {
		mu += c.a * math.Pow(x, c.b)
	}
	return mu * 1e-6, nil
}
