package uncertainty

import "sizebudget/core"

// defaultCustomRefC is the reference temperature of a custom medium's viscosity when none is given.
const defaultCustomRefC = 25.0

// MediumModel returns the medium of the scenario as a core.Medium.
func (s Scenario) MediumModel() (core.Medium, error) {
	switch s.Medium {
	case "custom":
		ref := defaultCustomRefC
		if s.ViscosityRefC != nil {
			ref = *s.ViscosityRefC
		}
		u := 0.0
		if s.ViscosityRelU != nil {
			u = *s.ViscosityRelU
		}
		c := core.CustomMedium{ViscosityRef: s.ViscosityMPaS * 1e-3, TRef: ref + 273.15, RelU: u, TempCoeff: s.ViscosityTempCoeff}
		if err := c.Validate(); err != nil {
			return nil, err
		}
		return c, nil
	default:
		return core.MediumByName(s.Medium, s.GlycerolMassFraction, s.PressureMPa)
	}
}

// viscosityRelU is the relative standard uncertainty of the viscosity used in the budget: the
// scenario's own value when given (0 leaves the model's uncertainty out), else the model's.
func (s Scenario) viscosityRelU(m core.Medium, T float64) float64 {
	if s.ViscosityRelU != nil {
		return *s.ViscosityRelU
	}
	return m.RelativeUncertainty(T)
}
