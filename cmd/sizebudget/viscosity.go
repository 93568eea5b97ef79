package main

import (
	"io"

	"sizebudget/core"
)

const viscosityAbout = `Viscosity prints the dynamic viscosity η of the medium at the temperature -temp, its relative
standard uncertainty (the model's own), and d ln η/dT, the sensitivity that makes temperature the
largest term of most uncertainty budgets (near 25 °C water thins by about 2.3 % per kelvin).

` + mediumHelp + `

Without -json the result is a table with units; with -json it is one JSON object with the keys
medium, temperature_K, temperature_C, viscosity_mPa_s, relative_uncertainty,
viscosity_standard_uncertainty_mPa_s and dlneta_dT_per_K, plus the parameters of the medium
(pressure_MPa; glycerol_mass_fraction; reference_viscosity_mPa_s, reference_temperature_K and
viscosity_temperature_coefficient_per_K).`

// viscosityReport is the result of the viscosity subcommand, as written with -json.
type viscosityReport struct {
	mediumFields
	TemperatureK            float64 `json:"temperature_K"`
	TemperatureC            float64 `json:"temperature_C"`
	ViscosityMPaS           float64 `json:"viscosity_mPa_s"`
	RelativeUncertainty     float64 `json:"relative_uncertainty"`
	StandardUncertaintyMPaS float64 `json:"viscosity_standard_uncertainty_mPa_s"`
	DLnEtaDTPerK            float64 `json:"dlneta_dT_per_K"`
}

// runViscosity is the viscosity subcommand.
func runViscosity(args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet("viscosity", "-temp T [-medium water|glycerol|custom] [medium flags] [-json]", viscosityAbout, stderr)
	temp := defineQuantity(fs, "temp", Temperature, "", "`temperature` of the medium, e.g. 25C or 298.15K (required)")
	media := defineMediumFlags(fs)
	asJSON := fs.Bool("json", false, "print one JSON object instead of a table")
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if !temp.IsSet() {
		return usagef(fs, "missing -temp, the temperature (e.g. 25C or 298.15K)")
	}
	m, err := media.Medium(fs)
	if err != nil {
		return err
	}
	rep, err := viscosityAt(m, temp.SI())
	if err != nil {
		return err
	}
	if *asJSON {
		return writeJSON(stdout, rep)
	}
	var t table
	rep.addRows(&t)
	t.add("temperature", rep.TemperatureK, "K")
	t.add("", rep.TemperatureC, "°C")
	t.add("viscosity", rep.ViscosityMPaS, "mPa·s")
	t.add("standard uncertainty", rep.StandardUncertaintyMPaS, "mPa·s")
	t.add("relative uncertainty", 100*rep.RelativeUncertainty, "%")
	t.add("d ln η/dT", rep.DLnEtaDTPerK, "1/K")
	return t.write(stdout)
}

// viscosityAt evaluates the medium m at temperature T (K). Its errors are those of m (a
// *core.RangeError outside the model's range).
func viscosityAt(m core.Medium, T float64) (viscosityReport, error) {
	eta, err := m.Viscosity(T)
	if err != nil {
		return viscosityReport{}, err
	}
	dln, err := m.DLnEtaDT(T)
	if err != nil {
		return viscosityReport{}, err
	}
	u := m.RelativeUncertainty(T)
	rep := viscosityReport{
		mediumFields:            describeMedium(m),
		TemperatureK:            T,
		TemperatureC:            Temperature.In(T, "C"),
		ViscosityMPaS:           Viscosity.In(eta, "mPa·s"),
		RelativeUncertainty:     u,
		StandardUncertaintyMPaS: Viscosity.In(u*eta, "mPa·s"),
		DLnEtaDTPerK:            dln,
	}
	return rep, checkFinite(map[string]float64{"viscosity": eta, "relative uncertainty": u, "d ln η/dT": dln})
}
