package core

import "math"

// FaxenMinDistance is the smallest centre-to-wall distance, in radii, at which FaxenParallel is
// accepted. Faxén's series is poor below z/a ≈ 1.5 (REFERENCES.md §4).
const FaxenMinDistance = 1.5

// BrennerMinDistance is the smallest centre-to-wall distance, in radii, at which
// BrennerPerpendicular is accepted. The series is exact for every z > a, but closer than 1 % of a
// radius from contact it needs tens of thousands of terms and lubrication effects dominate.
const BrennerMinDistance = 1.01

// FaxenParallel returns D∥/D₀, the factor by which a plane wall hinders diffusion parallel to it, for a
// sphere of radius a whose centre is at distance z from the wall (same length unit):
//
//	D∥/D₀ = 1 − (9/16)(a/z) + (1/8)(a/z)³ − (45/256)(a/z)⁴ − (1/16)(a/z)⁵
//
// Valid for z/a ≥ FaxenMinDistance; below it a *RangeError on "wall_distance_radii" is returned.
//
// References:
//   - Faxén H. (1923) Ark. Mat. Astron. Fys. 17(27); as given in Happel J. & Brenner H., Low Reynolds
//     Number Hydrodynamics (1965), eq. 7-4.28 (from memory).
func FaxenParallel(a, z float64) (float64, error) {
	if !(a > 0) || math.IsInf(a, 0) {
		return 0, &RangeError{Field: "radius_m", Value: a, Min: 0, Max: math.MaxFloat64, Why: "radius must be positive"}
	}
	if err := checkRange("wall_distance_radii", z/a, FaxenMinDistance, math.MaxFloat64, "Faxén series validity"); err != nil {
		return 0, err
	}
	s := a / z
	s3 := s * s * s
	return 1 - 9.0/16*s + s3/8 - 45.0/256*s3*s - s3*s*s/16, nil
}

// BrennerPerpendicular returns D⊥/D₀ = 1/λ, the hindrance of diffusion perpendicular to a plane wall
// for a sphere of radius a whose centre is at distance z from it, from Brenner's exact series:
//
//	α = arccosh(z/a)
//	λ = (4/3) sinh α Σ_{n≥1} n(n+1)/((2n−1)(2n+3)) ·
//	        [ (2 sinh((2n+1)α) + (2n+1) sinh 2α) / (4 sinh²((n+½)α) − (2n+1)² sinh²α) − 1 ]
//
// The sum is taken until a term is below 1e-16 of the total. Valid for z/a ≥ BrennerMinDistance;
// closer, a *RangeError on "wall_distance_radii" is returned.
//
// References:
//   - Brenner H. (1961) The slow motion of a sphere through a viscous fluid towards a plane surface.
//     Chem. Eng. Sci. 16, 242–251.
func BrennerPerpendicular(a, z float64) (float64, error) {
	if !(a > 0) || math.IsInf(a, 0) {
		return 0, &RangeError{Field: "radius_m", Value: a, Min: 0, Max: math.MaxFloat64, Why: "radius must be positive"}
	}
	if err := checkRange("wall_distance_radii", z/a, BrennerMinDistance, math.MaxFloat64, "Brenner series evaluated from near contact outwards"); err != nil {
		return 0, err
	}
	alpha := math.Acosh(z / a)
	if alpha > 300 {
		// Far from the wall: the method-of-reflections limit 1 − 9a/(8z) is exact to (a/z)³ and the
		// hyperbolic functions would overflow.
		return 1 - 9.0/8*a/z, nil
	}
	sh := math.Sinh(alpha)
	sum := 0.0
	for n := 1; n < 1_000_000; n++ {
		fn := float64(n)
		m := 2*fn + 1
		num := 2*math.Sinh(m*alpha) + m*math.Sinh(2*alpha)
		shh := math.Sinh((fn + 0.5) * alpha)
		den := 4*shh*shh - m*m*sh*sh
		if math.IsInf(num, 0) || math.IsInf(den, 0) {
			break // the bracket has decayed to exp(−(2n+1)α)-small terms long before this
		}
		term := fn * (fn + 1) / ((2*fn - 1) * (2*fn + 3)) * (num/den - 1)
		sum += term
		if math.Abs(term) < 1e-16*math.Abs(sum) {
			break
		}
	}
	lambda := 4.0 / 3 * sh * sum
	return 1 / lambda, nil
}
