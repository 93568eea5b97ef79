package core

import "math"

// Range of Cheng's correlation in °C.
const (
	glycerolMinT = 273.15 // K, 0 °C
	glycerolMaxT = 373.15 // K, 100 °C
)

// GlycerolWater is a glycerol–water mixture with glycerol mass fraction MassFraction (0 = pure water,
// 1 = pure glycerol). Its viscosity is Cheng's correlation, with t = T − 273.15 K in °C and
// Cm = MassFraction:
//
//	μ_w = 1.790·exp[(−1230 − t)·t/(36100 + 360t)] mPa·s
//	μ_g = 12100·exp[(−1233 + t)·t/(9900 + 70t)] mPa·s
//	a = 0.705 − 0.0017t,  b = (4.9 + 0.036t)·a^2.5
//	α = 1 − Cm + a·b·Cm(1 − Cm)/(a·Cm + b(1 − Cm))
//	μ = μ_w^α · μ_g^(1−α)
//
// Valid for 0 ≤ Cm ≤ 1 and 0–100 °C (273.15–373.15 K); outside it the methods return a *RangeError
// naming "glycerol_mass_fraction" or "temperature_K". Cheng states the accuracy as a few per cent.
//
// References:
//   - Cheng N.-S. (2008) Formula for the viscosity of a glycerol−water mixture.
//     Ind. Eng. Chem. Res. 47, 3285–3288.
type GlycerolWater struct {
	MassFraction float64
}

// Name returns "glycerol".
func (GlycerolWater) Name() string { return "glycerol" }

func (g GlycerolWater) check(T float64) error {
	if err := checkRange("glycerol_mass_fraction", g.MassFraction, 0, 1,
		"glycerol mass fraction of Cheng's (2008) correlation"); err != nil {
		return err
	}
	return checkRange("temperature_K", T, glycerolMinT, glycerolMaxT,
		"Cheng's (2008) glycerol–water correlation covers 0–100 °C")
}

// chengTerms holds the pieces of Cheng's correlation and their derivatives with respect to t (°C).
type chengTerms struct {
	lnMuW, lnMuG   float64 // ln of μ_w and μ_g in mPa·s
	dLnMuW, dLnMuG float64 // their t-derivatives
	alpha, dAlpha  float64
}

func cheng(t, cm float64) chengTerms {
	var c chengTerms
	// ln μ_w = ln 1.790 + u/v with u = (−1230 − t)t, v = 36100 + 360t.
	u, du := (-1230-t)*t, -1230-2*t
	v, dv := 36100+360*t, 360.0
	c.lnMuW = math.Log(1.790) + u/v
	c.dLnMuW = (du*v - u*dv) / (v * v)
	// ln μ_g = ln 12100 + u/v with u = (−1233 + t)t, v = 9900 + 70t.
	u, du = (-1233+t)*t, -1233+2*t
	v, dv = 9900+70*t, 70.0
	c.lnMuG = math.Log(12100) + u/v
	c.dLnMuG = (du*v - u*dv) / (v * v)
	// α = 1 − Cm + Cm(1 − Cm)·g with g = a·b/(a·Cm + b(1 − Cm)).
	a, da := 0.705-0.0017*t, -0.0017
	k, dk := 4.9+0.036*t, 0.036
	b := k * math.Pow(a, 2.5)
	db := dk*math.Pow(a, 2.5) + k*2.5*math.Pow(a, 1.5)*da
	den := a*cm + b*(1-cm)
	dden := da*cm + db*(1-cm)
	g := a * b / den
	dg := ((da*b+a*db)*den - a*b*dden) / (den * den)
	c.alpha = 1 - cm + cm*(1-cm)*g
	c.dAlpha = cm * (1 - cm) * dg
	return c
}

// Viscosity returns η(T) in Pa·s.
func (g GlycerolWater) Viscosity(T float64) (float64, error) {
	if err := g.check(T); err != nil {
		return 0, err
	}
	c := cheng(T-273.15, g.MassFraction)
	return 1e-3 * math.Exp(c.alpha*c.lnMuW+(1-c.alpha)*c.lnMuG), nil
}

// DLnEtaDT returns d ln η/dT in 1/K, analytically:
//
//	d ln μ/dt = α'·(ln μ_w − ln μ_g) + α·(ln μ_w)' + (1 − α)·(ln μ_g)'
//
// (a kelvin and a degree Celsius are the same step).
func (g GlycerolWater) DLnEtaDT(T float64) (float64, error) {
	if err := g.check(T); err != nil {
		return 0, err
	}
	c := cheng(T-273.15, g.MassFraction)
	return c.dAlpha*(c.lnMuW-c.lnMuG) + c.alpha*c.dLnMuW + (1-c.alpha)*c.dLnMuG, nil
}

// RelativeUncertainty returns 0.03 inside the valid range and NaN outside it (where Viscosity returns
// an error). Cheng states the accuracy of the correlation as "a few per cent"; 3 % as a relative
// standard uncertainty is our reading of that statement, not a figure of the paper.
func (g GlycerolWater) RelativeUncertainty(T float64) float64 {
	if g.check(T) != nil {
		return math.NaN()
	}
	return 0.03
}

// GlycerolWaterDensity returns the density in kg/m³ of a glycerol–water mixture of glycerol mass
// fraction Cm at temperature T (K), from Cheng's pure-component densities (t in °C) mixed by
// additivity of volumes:
//
//	ρ_g = 1277 − 0.654t kg/m³
//	ρ_w = 1000·[1 − (|t − 4|/622)^1.7] kg/m³
//	1/ρ = Cm/ρ_g + (1 − Cm)/ρ_w
//
// Volume additivity (ideal mixing) is an approximation: it ignores the contraction on mixing, so it
// reads low in the middle of the range (by about 1 % near Cm = 0.5 at 20 °C, from memory). Valid for
// 0 ≤ Cm ≤ 1 and 0–100 °C; outside it a *RangeError names "glycerol_mass_fraction" or "temperature_K".
//
// References:
//   - Cheng N.-S. (2008) Ind. Eng. Chem. Res. 47, 3285–3288 (pure-component densities).
func GlycerolWaterDensity(T, Cm float64) (float64, error) {
	if err := (GlycerolWater{MassFraction: Cm}).check(T); err != nil {
		return 0, err
	}
	t := T - 273.15
	rg := 1277 - 0.654*t
	rw := 1000 * (1 - math.Pow(math.Abs(t-4)/622, 1.7))
	return 1 / (Cm/rg + (1-Cm)/rw), nil
}
