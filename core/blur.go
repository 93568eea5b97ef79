package core

import (
	"errors"
	"math"
)

// Blur returns the motion-blur coefficient R of the recording, dimensionless, for continuous
// illumination during the exposure t_E ≤ Δt:
//
//	R = t_E / (6Δt)
//
// R is 0 for an instantaneous exposure and 1/6 for an exposure that lasts the whole frame. It enters
// the displacement statistics as ⟨dx²⟩ = 2DΔt(1 − 2R) + 2σ² and ⟨dx_i dx_{i+1}⟩ = −(σ² − 2RDΔt).
// The value is meaningful only for a valid recording (see Validate).
//
// References:
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
func (r Recording) Blur() float64 {
	return r.Exposure / (6 * r.Interval)
}

// IlluminationBlur returns the motion-blur coefficient R of an arbitrary illumination profile within
// one frame: the frame interval is cut into len(profile) equal parts and profile[j] ≥ 0 is the
// (relative) light intensity during part j. With S(t) the cumulative normalised exposure (S(0) = 0,
// S(Δt) = 1),
//
//	R = (1/Δt) ∫₀^Δt S(t)[1 − S(t)] dt,   0 ≤ R ≤ 1/4,
//
// evaluated exactly (S is piecewise linear). Continuous illumination over t_E gives t_E/(6Δt); two short
// flashes at the very start and end of the frame approach the upper bound 1/4.
//
// It returns an error if the profile is empty, has a negative or non-finite entry, or carries no light.
//
// References:
//   - Berglund A.J. (2010) Statistics of camera-based single-particle tracking. Phys. Rev. E 82, 011917.
func IlluminationBlur(profile []float64) (float64, error) {
	if len(profile) == 0 {
		return 0, errors.New("core: illumination profile is empty")
	}
	var total float64
	for _, w := range profile {
		if err := checkRange("illumination", w, 0, math.MaxFloat64, "relative intensity, non-negative and finite"); err != nil {
			return 0, err
		}
		total += w
	}
	if !(total > 0) || math.IsInf(total, 1) {
		return 0, errors.New("core: illumination profile carries no light (or overflows)")
	}
	// On a part where S rises linearly from c to c+h, the mean of S(1−S) is c + h/2 − (c² + ch + h²/3).
	var sum, c float64
	for _, w := range profile {
		h := w / total
		sum += c + h/2 - (c*c + c*h + h*h/3)
		c += h
	}
	return sum / float64(len(profile)), nil
}
