package core

import (
	"errors"
	"fmt"
	"math"
)

// Allowed ranges of a CustomMedium's parameters.
const (
	customMinViscosity = 1e-6 // Pa·s (0.001 mPa·s, below any liquid at room temperature)
	customMaxViscosity = 1e4  // Pa·s (1e7 mPa·s, a very stiff paste)
	customMinTRef      = 200  // K
	customMaxTRef      = 500  // K
	customMaxRelU      = 0.5  // relative standard uncertainty
	customMaxTempCoeff = 0.3  // 1/K, magnitude of d ln η/dT
	// CustomMaxExtrapolationK is how far from TRef, in K, a CustomMedium may be evaluated: the
	// exponential law is a local description of ln η(T), not a model of a liquid over a wide range.
	CustomMaxExtrapolationK = 25
)

// CustomMedium is a liquid described by the user: a viscosity at one temperature, its relative
// standard uncertainty and an optional constant temperature coefficient of ln η:
//
//	η(T) = ViscosityRef · exp(TempCoeff · (T − TRef))
//
// Fields: ViscosityRef in Pa·s at TRef; TRef in K; RelU the relative standard uncertainty of η (the
// user's stated value, returned by RelativeUncertainty at every temperature); TempCoeff = d ln η/dT
// in 1/K (0 = no temperature dependence; ordinary liquids have negative values, water about −0.023).
//
// Allowed (Validate): 0.001 mPa·s ≤ ViscosityRef ≤ 1e7 mPa·s, 200 K ≤ TRef ≤ 500 K, 0 ≤ RelU ≤ 0.5,
// |TempCoeff| ≤ 0.3 1/K, and temperatures within CustomMaxExtrapolationK (25 K) of TRef.
type CustomMedium struct {
	ViscosityRef float64 // Pa·s at TRef
	TRef         float64 // K
	RelU         float64 // relative standard uncertainty of η
	TempCoeff    float64 // d ln η/dT in 1/K, 0 = no temperature dependence
}

// Name returns "custom".
func (CustomMedium) Name() string { return "custom" }

// Validate returns a *RangeError for the first parameter outside its allowed range. The viscosity is
// reported in mPa·s, as a user would type it, under the field name "viscosity_mPa_s"; the others are
// "reference_temperature_K", "viscosity_relative_uncertainty" and
// "viscosity_temperature_coefficient_per_K".
func (c CustomMedium) Validate() error {
	if err := checkRange("viscosity_mPa_s", c.ViscosityRef*1e3, customMinViscosity*1e3, customMaxViscosity*1e3,
		"custom medium viscosity at the reference temperature"); err != nil {
		return err
	}
	if err := checkRange("reference_temperature_K", c.TRef, customMinTRef, customMaxTRef,
		"custom medium reference temperature"); err != nil {
		return err
	}
	if err := checkRange("viscosity_relative_uncertainty", c.RelU, 0, customMaxRelU,
		"relative standard uncertainty of the custom viscosity"); err != nil {
		return err
	}
	return checkRange("viscosity_temperature_coefficient_per_K", c.TempCoeff, -customMaxTempCoeff, customMaxTempCoeff,
		"d ln η/dT of the custom medium")
}

func (c CustomMedium) check(T float64) error {
	if err := c.Validate(); err != nil {
		return err
	}
	return checkRange("temperature_K", T, c.TRef-CustomMaxExtrapolationK, c.TRef+CustomMaxExtrapolationK,
		"a custom medium is evaluated within 25 K of its reference temperature")
}

// Viscosity returns η(T) in Pa·s, or the error of Validate, or a *RangeError naming "temperature_K"
// when T is more than 25 K from TRef.
func (c CustomMedium) Viscosity(T float64) (float64, error) {
	if err := c.check(T); err != nil {
		return 0, err
	}
	return c.ViscosityRef * math.Exp(c.TempCoeff*(T-c.TRef)), nil
}

// DLnEtaDT returns TempCoeff (1/K), with the same errors as Viscosity.
func (c CustomMedium) DLnEtaDT(T float64) (float64, error) {
	if err := c.check(T); err != nil {
		return 0, err
	}
	return c.TempCoeff, nil
}

// RelativeUncertainty returns RelU, the user's stated value, at every temperature.
func (c CustomMedium) RelativeUncertainty(T float64) float64 { return c.RelU }

// ErrUnknownMedium is wrapped by MediumByName for a name it does not know.
var ErrUnknownMedium = errors.New(`unknown medium: the allowed names are "water" and "glycerol" (a custom medium is built as a CustomMedium)`)

// MediumByName returns the built-in medium called name: "water" (Water at pressureMPa, 0 meaning
// 0.101325 MPa; glycerolFraction is ignored) or "glycerol" (GlycerolWater with glycerol mass fraction
// glycerolFraction; pressureMPa is ignored). The parameter that matters is checked: a *RangeError
// names "pressure_MPa" or "glycerol_mass_fraction". Any other name returns an error wrapping
// ErrUnknownMedium that names the allowed names.
func MediumByName(name string, glycerolFraction, pressureMPa float64) (Medium, error) {
	switch name {
	case "water":
		w := Water{PressureMPa: pressureMPa}
		if _, _, err := w.TemperatureRange(); err != nil {
			return nil, err
		}
		return w, nil
	case "glycerol":
		if err := checkRange("glycerol_mass_fraction", glycerolFraction, 0, 1,
			"glycerol mass fraction of Cheng's (2008) correlation"); err != nil {
			return nil, err
		}
		return GlycerolWater{MassFraction: glycerolFraction}, nil
	}
	return nil, fmt.Errorf("%q: %w", name, ErrUnknownMedium)
}
