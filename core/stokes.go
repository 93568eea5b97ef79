package core

import "math"

// Boltzmann is the Boltzmann constant k_B in J/K, exact in the SI since 2019.
//
// References:
//   - BIPM, The International System of Units (SI), 9th edition, 2019.
const Boltzmann = 1.380649e-23

// Diffusion returns the Stokes–Einstein diffusion coefficient in m²/s of a sphere of radius r (m) in a
// medium of dynamic viscosity eta (Pa·s) at absolute temperature T (K), stick boundary condition:
//
//	D = k_B·T / (6π·η·r)
//
// Valid for r, eta, T > 0 (it panics otherwise: callers validate user input first).
//
// References:
//   - Einstein A. (1905) Ann. Phys. 17, 549.
func Diffusion(T, eta, r float64) float64 {
	mustPositive("Diffusion", T, eta, r)
	return Boltzmann * T / (6 * math.Pi * eta * r)
}

// Radius inverts Stokes–Einstein: the hydrodynamic radius in m of a sphere whose diffusion coefficient
// is D (m²/s) at temperature T (K) in viscosity eta (Pa·s):
//
//	r = k_B·T / (6π·η·D)
func Radius(T, eta, D float64) float64 {
	mustPositive("Radius", T, eta, D)
	return Boltzmann * T / (6 * math.Pi * eta * D)
}

// Friction returns the Stokes friction coefficient f = 6π·η·r in kg/s.
func Friction(eta, r float64) float64 {
	mustPositive("Friction", eta, r)
	return 6 * math.Pi * eta * r
}

// Mobility returns the mobility b = 1/f = D/(k_B·T) in s/kg (Einstein relation).
func Mobility(eta, r float64) float64 {
	return 1 / Friction(eta, r)
}

func mustPositive(fn string, xs ...float64) {
	for _, x := range xs {
		if !(x > 0) || math.IsInf(x, 1) {
			panic("core: " + fn + ": argument must be positive and finite")
		}
	}
}
