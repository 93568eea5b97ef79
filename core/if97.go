package core

import (
	"fmt"
	"math"
)

// Limits of IAPWS-IF97 region 1 (compressed liquid) and region 4 (saturation line).
const (
	if97MinTemperature    = 273.15   // K, lower limit of regions 1 and 4
	if97Region1MaxT       = 623.15   // K, upper limit of region 1
	if97Region1MaxP       = 100      // MPa, upper limit of region 1
	if97CriticalT         = 647.096  // K, upper limit of region 4
	if97CriticalP         = 22.064   // MPa, upper limit of region 4
	if97Region1PStar      = 16.53    // MPa, reducing pressure of region 1
	if97Region1TStar      = 1386     // K, reducing temperature of region 1
	if97SpecificGasConstR = 0.461526 // kJ/(kg·K), specific gas constant of ordinary water in IF97
)

// if97Region1 holds the exponents I, J and coefficients n of the region-1 Gibbs free energy
// (IAPWS-IF97, Table 2).
var if97Region1 = [34]struct {
	I, J int
	n    float64
}{
	{0, -2, 0.14632971213167}, {0, -1, -0.84548187169114}, {0, 0, -3.7563603672040},
	{0, 1, 3.3855169168385}, {0, 2, -0.95791963387872}, {0, 3, 0.15772038513228},
	{0, 4, -1.6616417199501e-2}, {0, 5, 8.1214629983568e-4}, {1, -9, 2.8319080123804e-4},
	{1, -7, -6.0706301565874e-4}, {1, -1, -1.8990068218419e-2}, {1, 0, -3.2529748770505e-2},
	{1, 1, -2.1841717175414e-2}, {1, 3, -5.2838357969930e-5}, {2, -3, -4.7184321073267e-4},
	{2, 0, -3.0001780793026e-4}, {2, 1, 4.7661393906987e-5}, {2, 3, -4.4141845330846e-6},
	{2, 17, -7.2694996297594e-16}, {3, -4, -3.1679644845054e-5}, {3, 0, -2.8270797985312e-6},
	{3, 6, -8.5205128120103e-10}, {4, -5, -2.2425281908000e-6}, {4, -2, -6.5171222895601e-7},
	{4, 10, -1.4341729937924e-13}, {5, -8, -4.0516996860117e-7}, {8, -11, -1.2734301741641e-9},
	{8, -6, -1.7424871230634e-10}, {21, -29, -6.8762131295531e-19}, {23, -31, 1.4478307828521e-20},
	{29, -38, 2.6335781662795e-23}, {30, -39, -1.1947622640071e-23}, {31, -40, 1.8228094581404e-24},
	{32, -41, -9.3537087292458e-26},
}

// if97Region4 holds the coefficients n1…n10 of the saturation-line equation (IAPWS-IF97, Table 34);
// index 0 is unused so that if97Region4[i] is n_i.
var if97Region4 = [11]float64{
	0,
	0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2, 0.12020824702470e5,
	-0.32325550322333e7, 0.14915108613530e2, -0.48232657361591e4, 0.40511340542057e6,
	-0.23855557567849, 0.65017534844798e3,
}

// WaterDensityIF97 returns the density in kg/m³ of liquid water at temperature T (K) and pressure
// pMPa (MPa) from the IAPWS-IF97 region-1 Gibbs free energy:
//
//	π = p/16.53 MPa,  τ = 1386 K/T
//	γ_π = −Σ n_i I_i (7.1 − π)^(I_i−1) (τ − 1.222)^J_i
//	v = π·γ_π·R·T/p,  R = 0.461526 kJ/(kg·K),  ρ = 1/v
//
// Valid in region 1: 273.15 K ≤ T ≤ 623.15 K and p_s(T) ≤ p ≤ 100 MPa, where p_s is the saturation
// pressure of WaterSaturationPressureIF97 (the liquid must not be above its boiling point). Outside it
// a *RangeError names "temperature_K" or "pressure_MPa".
//
// References:
//   - IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997 for the
//     Thermodynamic Properties of Water and Steam (IAPWS-IF97), region 1, Eqs. (7) and Table 2.
//   - Wagner W. et al. (2000) J. Eng. Gas Turbines Power 122, 150.
func WaterDensityIF97(T, pMPa float64) (float64, error) {
	if err := checkRange("temperature_K", T, if97MinTemperature, if97Region1MaxT,
		"IAPWS-IF97 region 1 temperature range"); err != nil {
		return 0, err
	}
	ps := saturationPressure(T)
	if err := checkRange("pressure_MPa", pMPa, ps, if97Region1MaxP,
		fmt.Sprintf("IAPWS-IF97 region 1: liquid needs p ≥ saturation pressure %s MPa at %s K", fmtG(ps), fmtG(T))); err != nil {
		return 0, err
	}
	return 1 / region1Volume(T, pMPa), nil
}

// region1Volume returns the specific volume in m³/kg of IF97 region 1, without range checks.
func region1Volume(T, pMPa float64) float64 {
	pi := pMPa / if97Region1PStar
	gp, _ := region1GammaPi(pi, if97Region1TStar/T)
	// kJ/kg divided by MPa is 1e-3 m³/kg.
	return pi * gp * if97SpecificGasConstR * T / pMPa * 1e-3
}

// region1ThermalExpansion returns the isobaric cubic expansion coefficient α_v = (∂ln v/∂T)_p in 1/K
// of IF97 region 1 (IAPWS-IF97, Table 3):
//
//	α_v = (1/T)·(1 − τ·γ_πτ/γ_π)
func region1ThermalExpansion(T, pMPa float64) float64 {
	tau := if97Region1TStar / T
	gp, gpt := region1GammaPi(pMPa/if97Region1PStar, tau)
	return (1 - tau*gpt/gp) / T
}

// region1GammaPi returns γ_π and γ_πτ of the region-1 dimensionless Gibbs free energy.
func region1GammaPi(pi, tau float64) (gp, gpt float64) {
	a := 7.1 - pi
	b := tau - 1.222
	for _, c := range if97Region1 {
		if c.I == 0 {
			continue
		}
		t := -c.n * float64(c.I) * powInt(a, c.I-1)
		gp += t * powInt(b, c.J)
		if c.J != 0 {
			gpt += t * float64(c.J) * powInt(b, c.J-1)
		}
	}
	return gp, gpt
}

// powInt returns x^n for an integer n by repeated squaring (x^0 = 1).
func powInt(x float64, n int) float64 {
	if n < 0 {
		return 1 / powInt(x, -n)
	}
	r := 1.0
	for n > 0 {
		if n&1 == 1 {
			r *= x
		}
		x *= x
		n >>= 1
	}
	return r
}

// WaterSaturationPressureIF97 returns the saturation (boiling) pressure of water in MPa at
// temperature T (K), from the IAPWS-IF97 region-4 equation solved for p:
//
//	θ = T + n9/(T − n10)
//	A = θ² + n1·θ + n2,  B = n3·θ² + n4·θ + n5,  C = n6·θ² + n7·θ + n8
//	p_s = [2C / (−B + √(B² − 4AC))]⁴ MPa
//
// Valid for 273.15 K ≤ T ≤ 647.096 K (the critical temperature); outside it a *RangeError names
// "temperature_K".
//
// References:
//   - IAPWS R7-97(2012), IAPWS-IF97, region 4, Eqs. (29)–(30) and Table 34.
func WaterSaturationPressureIF97(T float64) (float64, error) {
	if err := checkRange("temperature_K", T, if97MinTemperature, if97CriticalT,
		"IAPWS-IF97 region 4 (saturation line) temperature range"); err != nil {
		return 0, err
	}
	return saturationPressure(T), nil
}

func saturationPressure(T float64) float64 {
	n := &if97Region4
	th := T + n[9]/(T-n[10])
	A := th*th + n[1]*th + n[2]
	B := n[3]*th*th + n[4]*th + n[5]
	C := n[6]*th*th + n[7]*th + n[8]
	x := 2 * C / (-B + math.Sqrt(B*B-4*A*C))
	x *= x
	return x * x
}

// WaterSaturationTemperatureIF97 returns the saturation (boiling) temperature of water in K at
// pressure pMPa (MPa), from the IAPWS-IF97 region-4 equation solved for T (the exact inverse of
// WaterSaturationPressureIF97):
//
//	β = p^(1/4)
//	E = β² + n3·β + n6,  F = n1·β² + n4·β + n7,  G = n2·β² + n5·β + n8
//	D = 2G / (−F − √(F² − 4EG))
//	T_s = [n10 + D − √((n10 + D)² − 4(n9 + n10·D))]/2
//
// Valid for p_s(273.15 K) = 0.000611213 MPa ≤ p ≤ 22.064 MPa (the critical pressure); outside it a
// *RangeError names "pressure_MPa".
//
// References:
//   - IAPWS R7-97(2012), IAPWS-IF97, region 4, Eq. (31) and Table 34.
func WaterSaturationTemperatureIF97(pMPa float64) (float64, error) {
	if err := checkRange("pressure_MPa", pMPa, saturationPressure(if97MinTemperature), if97CriticalP,
		"IAPWS-IF97 region 4 (saturation line) pressure range"); err != nil {
		return 0, err
	}
	return saturationTemperature(pMPa), nil
}

func saturationTemperature(pMPa float64) float64 {
	n := &if97Region4
	be := math.Sqrt(math.Sqrt(pMPa))
	E := be*be + n[3]*be + n[6]
	F := n[1]*be*be + n[4]*be + n[7]
	G := n[2]*be*be + n[5]*be + n[8]
	D := 2 * G / (-F - math.Sqrt(F*F-4*E*G))
	s := n[10] + D
	return (s - math.Sqrt(s*s-4*(n[9]+n[10]*D))) / 2
}
