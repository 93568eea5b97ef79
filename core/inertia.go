package core

import "fmt"

// InertiaMargin is how many momentum relaxation times the frame interval and the exposure must each
// span for the overdamped (Stokes–Einstein) description to hold. Our choice: at 100·τ_p the
// ballistic part of the mean-squared displacement, of relative size τ_p/Δt, is below 1 %.
const InertiaMargin = 100

// MomentumRelaxation returns τ_p = m/(6πηa) = 2ρ_p a²/(9η) in s, the time over which a sphere of radius
// a (m) and density rhoP (kg/m³) forgets its velocity in a liquid of viscosity eta (Pa·s). (The added
// mass of the displaced liquid, ρ_f/2, lengthens it by a factor (1 + ρ_f/(2ρ_p)); it is left out.)
//
// References:
//   - Langevin P. (1908) C. R. Acad. Sci. 146, 530 (the relaxation time of the velocity).
func MomentumRelaxation(rhoP, a, eta float64) float64 {
	mustPositive("MomentumRelaxation", rhoP, a, eta)
	return 2 * rhoP * a * a / (9 * eta)
}

// CheckInertia returns an error when the frame interval or a non-zero exposure (s) is shorter than
// InertiaMargin momentum relaxation times tau (s); exposure 0 means a stroboscopic snapshot and is not
// checked.
func CheckInertia(tau, interval, exposure float64) error {
	if interval < InertiaMargin*tau {
		return fmt.Errorf("frame_interval_s = %g is not ≫ the momentum relaxation time %.3g s (need ≥ %g·τ_p = %.3g s)", interval, tau, float64(InertiaMargin), InertiaMargin*tau)
	}
	if exposure > 0 && exposure < InertiaMargin*tau {
		return fmt.Errorf("exposure_s = %g is not ≫ the momentum relaxation time %.3g s (need ≥ %g·τ_p = %.3g s)", exposure, tau, float64(InertiaMargin), InertiaMargin*tau)
	}
	return nil
}
