package core

// Medium is a liquid whose dynamic viscosity depends on temperature. Temperatures are absolute (K),
// viscosities in Pa·s. Methods return a *RangeError outside the model's valid range.
type Medium interface {
	// Name is a short lower-case identifier: "water", "glycerol", "custom".
	Name() string
	// Viscosity returns η(T) in Pa·s.
	Viscosity(T float64) (float64, error)
	// DLnEtaDT returns d ln η / dT in 1/K at T (negative for ordinary liquids).
	DLnEtaDT(T float64) (float64, error)
	// RelativeUncertainty returns the relative standard uncertainty of η(T) that the model itself
	// carries (its stated accuracy, or the user's stated value for a custom medium).
	RelativeUncertainty(T float64) float64
}
