package main

import (
	"errors"
	"flag"
	"fmt"
	"os"

	"sizebudget/core"
	"sizebudget/uncertainty"
)

// scenarioFlags are the flags that set the fields of a scenario document (uncertainty.Scenario): one
// flag per field, plus -scenario FILE, which reads the document the flags then change. Every
// subcommand that works on a scenario (plan, check, …) defines them with defineScenarioFlags and,
// after parsing, builds its document with Load.
//
// The rule is the same for every field: a flag given on the command line sets its field, a flag not
// given leaves the field as the base document has it. The base is the -scenario file, or the invented
// demo scenario (uncertainty.Demo) when there is none, so that flags alone always describe a complete
// scenario.
type scenarioFlags struct {
	file              *string
	radius, diffusion *quantity
	medium            *mediumFlags
	temp, tempU       *quantity
	tempDist          *choice
	dims              *int
	interval, fps     *quantity
	exposure          *quantity
	frames, tracks    *int
	sigma, pixelU     *quantity
	drift             *quantity
	driftRemoved      *bool
	focusDepth        *quantity
	density           *quantity
	estimator         *choice
	coverage, target  *quantity
	trials            *int
	seed              *uint64
	review            *reviewFlags // nil unless defineReviewFlags was called
}

// reviewFlags are the flags of a reported result under review (sizebudget check).
type reviewFlags struct {
	radius, u, coverage *quantity
	k                   *float64
}

// TemperatureDifference is a difference of temperatures, such as the uncertainty of a temperature,
// in kelvin. A difference of one degree Celsius is one kelvin (SI brochure, 9th edition, 2019,
// 2.3.1), so C and °C are accepted here without the 273.15 offset of Temperature.
var TemperatureDifference = &Dimension{
	Name: "temperature difference", SI: "K", Example: "0.5K",
	Accepted: "K, mK, or C, °C, degC as a difference (e.g. 0.5K, 500mK; 0.5C is 0.5 K)",
	Units: []Unit{
		{"K", 0, 1, 0}, {"mK", -3, 1, 0},
		{"C", 0, 1, 0}, {"°C", 0, 1, 0}, {"degC", 0, 1, 0}, {"℃", 0, 1, 0},
	},
}

// MassDensity is a mass per volume (g/cm³ = g/mL = 1000 kg/m³ exactly, by the definitions of the
// prefixes and of the litre, SI brochure 9th edition, 2019, table 8).
var MassDensity = &Dimension{
	Name: "density", SI: "kg/m3", Example: "1050kg/m3",
	Accepted: "kg/m3 (or kg/m³), g/cm3 (or g/cm³), g/mL (e.g. 1050kg/m3, 1.05g/cm3)",
	Units: []Unit{
		{"kg/m3", 0, 1, 0}, {"kg/m³", 0, 1, 0}, {"kg/m^3", 0, 1, 0},
		{"g/cm3", 3, 1, 0}, {"g/cm³", 3, 1, 0}, {"g/cm^3", 3, 1, 0}, {"g/mL", 3, 1, 0}, {"g/ml", 3, 1, 0},
	},
}

// celsius reads a temperature in degrees Celsius: the text of a Temperature flag is read again with it,
// so that 36.6C becomes exactly the temperature_C = 36.6 of the document (through kelvin it would be
// 36.60000000000002).
var celsius = &Dimension{
	Name: "temperature", SI: "C", Example: Temperature.Example, Accepted: Temperature.Accepted,
	Units: []Unit{
		{"C", 0, 1, 0}, {"°C", 0, 1, 0}, {"degC", 0, 1, 0}, {"℃", 0, 1, 0},
		{"K", 0, 1, -273.15},
	},
}

// scenarioAbout describes, for the -h text of the subcommands that use scenarioFlags, how the flags and
// the -scenario file combine.
const scenarioAbout = `Settings: -scenario FILE reads a scenario document (JSON, "format": "` + uncertainty.Format + `";
see testdata/scenarios/demo.json). Every flag given sets its field of the document; a flag not given
leaves the field as the file has it. Without -scenario, the fields not given are those of the
invented demo scenario (its values are shown as "demo …" below), so flags alone always describe a
complete scenario; the effective scenario is printed with -json. -frames or -tracks replace the
track_lengths groups of a file with tracks of one length. -temp-u is the half-width a of a
rectangular distribution (-temp-dist rect) or the standard uncertainty u of a normal one
(-temp-dist normal). Every uncertainty may be zero (an exactly known input). -visc-u replaces the
relative standard uncertainty of the viscosity: with water or glycerol, not given means the model's
own, and -visc-u 0 leaves the model's uncertainty out while the viscosity still follows the
temperature; -medium custom needs -visc and -visc-u (state your liquid's uncertainty, 0 if exact).`

// defineScenarioFlags defines -scenario and the flags of every field of the scenario document except
// those of a reported result (see defineReviewFlags): -radius, -diffusion, the medium flags of
// defineMediumFlags, -temp, -temp-u, -temp-dist, -dims, -interval, -fps, -exposure, -frames, -tracks,
// -sigma, -pixel-u, -drift, -drift-removed, -focus-depth, -density, -estimator, -coverage, -target,
// -trials and -seed. The usage of each names the demo scenario's value.
func defineScenarioFlags(fs *flag.FlagSet) *scenarioFlags {
	d := uncertainty.Demo()
	demo := func(s string) string { return " (demo " + s + ")" }
	f := &scenarioFlags{
		file:      fs.String("scenario", "", "read the scenario document `file` (JSON); the flags given change it"),
		radius:    defineQuantity(fs, "radius", Length, "", "nominal hydrodynamic `radius`, e.g. 50nm"+demo(fmt.Sprintf("%gnm", d.RadiusNM))),
		diffusion: defineQuantity(fs, "diffusion", DiffusionCoefficient, "", "or the nominal diffusion `coefficient`, e.g. 4.9um2/s (instead of -radius)"),
	}
	f.medium = defineMediumFlags(fs)
	// The medium flags are shared with the viscosity and diffusion subcommands; here -visc-u applies to
	// every medium and has no default of its own.
	if vu := fs.Lookup("visc-u"); vu != nil {
		vu.Usage = "relative standard `uncertainty` of the viscosity, e.g. 2%: replaces the model's own for water or glycerol (not given: the model's; 0 leaves it out); required with -medium custom"
		vu.DefValue = ""
	}
	if m := fs.Lookup("medium"); m != nil {
		m.Usage += demo(d.Medium)
		m.DefValue = ""
	}
	f.temp = defineQuantity(fs, "temp", Temperature, "", "nominal `temperature`, e.g. 25C"+demo(fmt.Sprintf("%gC", d.TemperatureC)))
	f.tempU = defineQuantity(fs, "temp-u", TemperatureDifference, "", "temperature `uncertainty`: half-width (rect) or standard uncertainty (normal)"+demo(fmt.Sprintf("%gK", d.TemperatureUK)))
	f.tempDist = defineChoice(fs, "temp-dist", "", []string{"rect", "normal"}, "`distribution` of the temperature: rect or normal"+demo(d.TemperatureDist))
	f.dims = fs.Int("dims", 0, fmt.Sprintf("number of tracked `axes`, 1 to 3 (demo %d)", d.Dims))
	f.interval = defineQuantity(fs, "interval", Duration, "", "frame `interval` Δt, e.g. 33ms"+demo(fmt.Sprintf("%.4gms, i.e. %.4gfps", 1e3*d.FrameIntervalS, 1/d.FrameIntervalS)))
	f.fps = defineQuantity(fs, "fps", Frequency, "", "or the frame `rate` 1/Δt, e.g. 30fps (instead of -interval)")
	f.exposure = defineQuantity(fs, "exposure", Duration, "", "`exposure` time per frame, 0 to Δt (0 = stroboscopic)"+demo(fmt.Sprintf("%gms", 1e3*d.ExposureS)))
	f.frames = fs.Int("frames", 0, fmt.Sprintf("`positions` per track (displacements = frames − 1; demo %d)", d.Frames))
	f.tracks = fs.Int("tracks", 0, fmt.Sprintf("number of `tracks` (demo %d)", d.Tracks))
	f.sigma = defineQuantity(fs, "sigma", Length, "", "localisation `precision` σ per axis, e.g. 40nm"+demo(fmt.Sprintf("%gnm", d.LocalisationNM)))
	f.pixelU = defineQuantity(fs, "pixel-u", Fraction, "", "relative standard `uncertainty` of the pixel size, e.g. 0.5%"+demo(fmt.Sprintf("%g%%", 100*d.PixelRelU)))
	f.drift = defineQuantity(fs, "drift", Velocity, "", "largest residual drift `speed`, e.g. 10nm/s (demo none)")
	f.driftRemoved = fs.Bool("drift-removed", false, "the mean displacement is subtracted from every track (demo false)")
	f.focusDepth = defineQuantity(fs, "focus-depth", Length, "", "`depth` of the focal slab, e.g. 2um; 0 = not limited (demo 0)")
	f.density = defineQuantity(fs, "density", MassDensity, "", "particle `density`, for the inertia check (not given in a document: 1050kg/m3)")
	f.estimator = defineChoice(fs, "estimator", "", []string{"cve", "known-noise", "msd"}, "`estimator` of D: cve, known-noise or msd"+demo(d.Estimator))
	f.coverage = defineQuantity(fs, "coverage", Fraction, "", "coverage `probability` of the intervals, e.g. 95%"+demo(fmt.Sprintf("%g%%", 100*d.Coverage)))
	f.target = defineQuantity(fs, "target", Fraction, "", "target relative expanded `uncertainty` U/r of the planner, e.g. 5%; 0 = no planning"+demo(fmt.Sprintf("%g%%", 100*d.TargetRelU)))
	f.trials = fs.Int("trials", 0, "Monte Carlo `trials`; 0 = adaptive (JCGM 101 7.9), else 1000 or more (demo 0)")
	f.seed = fs.Uint64("seed", 0, fmt.Sprintf("random `seed` of the Monte Carlo, recorded with the result (demo %d)", d.Seed))
	return f
}

// defineReviewFlags adds the flags of a reported result under review: -reported-radius, -reported-u
// (the reported expanded uncertainty) and its coverage factor -reported-k or coverage probability
// -reported-coverage.
func (f *scenarioFlags) defineReviewFlags(fs *flag.FlagSet) {
	f.review = &reviewFlags{
		radius:   defineQuantity(fs, "reported-radius", Length, "", "the reported hydrodynamic `radius`, e.g. 82nm"),
		u:        defineQuantity(fs, "reported-u", Length, "", "its reported expanded `uncertainty` U, e.g. 1nm"),
		k:        fs.Float64("reported-k", 0, "the `coverage factor` k of -reported-u, e.g. 2"),
		coverage: defineQuantity(fs, "reported-coverage", Fraction, "", "or the coverage `probability` of -reported-u, e.g. 95% (instead of -reported-k; neither: 95%)"),
	}
}

// fieldFlags names, for each field of the document (and each field named by the range errors of core's
// medium models), the flag that sets it.
var fieldFlags = map[string]string{
	"radius_nm": "radius", "diffusion_um2_per_s": "diffusion", "medium": "medium",
	"glycerol_mass_fraction": "glycerol", "pressure_MPa": "pressure",
	"viscosity_mPa_s": "visc", "viscosity_reference_C": "visc-tref", "viscosity_temp_coeff_per_K": "visc-tcoeff",
	"viscosity_temperature_coefficient_per_K": "visc-tcoeff", "viscosity_relative_u": "visc-u",
	"viscosity_relative_uncertainty": "visc-u", "temperature_C": "temp", "temperature_K": "temp",
	"temperature_u_K": "temp-u", "temperature_distribution": "temp-dist", "dims": "dims",
	"frame_interval_s": "interval", "exposure_s": "exposure", "frames": "frames", "tracks": "tracks",
	"localisation_nm": "sigma", "pixel_relative_u": "pixel-u", "drift_um_per_s": "drift",
	"focus_depth_um": "focus-depth", "estimator": "estimator", "coverage": "coverage",
	"target_relative_expanded_uncertainty": "target", "trials": "trials",
	"particle_density_kg_per_m3": "density", "reported_radius_nm": "reported-radius",
	"reported_u_nm": "reported-u", "reported_k": "reported-k", "reported_coverage": "reported-coverage",
	"engine": "engine",
}

// Load returns the scenario of the command line parsed by fs: the -scenario file (or the demo
// scenario), changed by the flags given (see Apply), with the defaults of uncertainty.Scenario filled
// in, and validated (see Validate). Its errors are a *usageError for conflicting or missing flags, an
// error naming the file for a file that cannot be read or is not a valid scenario document, and the
// errors of Validate.
func (f *scenarioFlags) Load(fs *flag.FlagSet) (uncertainty.Scenario, error) {
	s, err := f.Build(fs)
	if err != nil {
		return uncertainty.Scenario{}, err
	}
	return s, f.Validate(fs, s)
}

// Build is Load without the validation, for a subcommand that checks what it needs first.
func (f *scenarioFlags) Build(fs *flag.FlagSet) (uncertainty.Scenario, error) {
	base := uncertainty.Demo()
	if *f.file != "" {
		data, err := os.ReadFile(*f.file)
		if err != nil {
			return uncertainty.Scenario{}, fmt.Errorf("reading the scenario: %w", err)
		}
		if base, err = uncertainty.ParseScenario(data); err != nil {
			return uncertainty.Scenario{}, fmt.Errorf("%s: %w", *f.file, err)
		}
	}
	s, err := f.Apply(fs, base)
	if err != nil {
		return uncertainty.Scenario{}, err
	}
	if *f.file == "" && f.changesDemo(fs) {
		s.Name = "command line (other fields from the invented demo scenario)"
		s.Note = "Settings given as flags; every field not given is the invented demo scenario's. INVENTED: it describes no real sample or instrument."
	}
	return s, nil
}

// Validate validates s (uncertainty.Scenario.Validate). A value out of range is reported by the
// *uncertainty.FieldError or *core.RangeError of the validation, with a note saying where the value
// came from: the flag that set it, the -scenario file or the demo scenario.
func (f *scenarioFlags) Validate(fs *flag.FlagSet, s uncertainty.Scenario) error {
	if err := s.Validate(); err != nil {
		return f.explain(fs, err)
	}
	return nil
}

// changesDemo reports whether a flag that sets a field of the physics or the analysis was given
// (-trials, -seed and flags that are no field, such as -json, leave the demo scenario what it is).
func (f *scenarioFlags) changesDemo(fs *flag.FlagSet) bool {
	for name := range givenFlags(fs) {
		switch name {
		case "trials", "seed", "engine":
		case "fps":
			return true
		default:
			for _, flagName := range fieldFlags {
				if name == flagName {
					return true
				}
			}
		}
	}
	return false
}

// explain adds to a validation error where its field's value came from: the flag that set it, the
// -scenario file, or the demo scenario. The error keeps its type (errors.As finds it).
func (f *scenarioFlags) explain(fs *flag.FlagSet, err error) error {
	var field string
	var fe *uncertainty.FieldError
	var re *core.RangeError
	switch {
	case errors.As(err, &fe):
		field = fe.Field
	case errors.As(err, &re):
		field = re.Field
	}
	name, ok := fieldFlags[field]
	if !ok {
		return err
	}
	given := givenFlags(fs)
	if name == "interval" && given["fps"] {
		name = "fps"
	}
	var note string
	switch {
	case given[name]:
		note = "set by -" + name
	case *f.file != "":
		note = "from " + *f.file
	default:
		note = "-" + name + " not given: the demo scenario's value"
	}
	return &notedError{err: err, note: note}
}

// A notedError is an error with a note in brackets after its message; it unwraps to the error.
type notedError struct {
	err  error
	note string
}

func (e *notedError) Error() string { return e.err.Error() + " [" + e.note + "]" }
func (e *notedError) Unwrap() error { return e.err }

// Apply returns base with every flag given on the command line parsed by fs written into its field,
// and the defaults of uncertainty.Scenario filled in; fields whose flag was not given keep their value.
// Quantities are converted to the units of the document's keys (nm, s, °C, µm²/s, …). Apply does not
// validate the result (Load does), but it refuses with a *usageError what no document can express:
// both -radius and -diffusion, both -interval and -fps, both -reported-k and -reported-coverage, a flag
// of another medium than the document's, and a change of medium without that medium's required flags.
// Changing the medium (-medium) drops the parameters of the base's medium, including its
// viscosity_relative_u.
func (f *scenarioFlags) Apply(fs *flag.FlagSet, base uncertainty.Scenario) (uncertainty.Scenario, error) {
	given := givenFlags(fs)
	s := base.Defaults()
	for _, pair := range [][2]string{{"radius", "diffusion"}, {"interval", "fps"}, {"reported-k", "reported-coverage"}} {
		if given[pair[0]] && given[pair[1]] {
			return s, usagef(fs, "give one of -%s and -%s, not both", pair[0], pair[1])
		}
	}
	switch {
	case f.radius.IsSet():
		s.RadiusNM, s.DiffusionUM2PerS = Length.In(f.radius.SI(), "nm"), 0
	case f.diffusion.IsSet():
		s.RadiusNM, s.DiffusionUM2PerS = 0, DiffusionCoefficient.In(f.diffusion.SI(), "um2/s")
	}
	if err := f.applyMedium(fs, given, &s); err != nil {
		return s, err
	}
	if f.temp.IsSet() {
		c, err := celsius.Parse(f.temp.String())
		if err != nil { // not reached: celsius accepts every spelling of Temperature
			c = f.temp.SI() - 273.15
		}
		s.TemperatureC = c
	}
	if f.tempU.IsSet() {
		s.TemperatureUK = f.tempU.SI()
	}
	if given["temp-dist"] {
		s.TemperatureDist = f.tempDist.Value()
	}
	if given["dims"] {
		s.Dims = *f.dims
	}
	switch {
	case f.interval.IsSet():
		s.FrameIntervalS = f.interval.SI()
	case f.fps.IsSet():
		s.FrameIntervalS = 1 / f.fps.SI()
	}
	if f.exposure.IsSet() {
		s.ExposureS = f.exposure.SI()
	}
	if given["frames"] || given["tracks"] {
		s.TrackLengths = nil
		if given["frames"] {
			s.Frames = *f.frames
		}
		if given["tracks"] {
			s.Tracks = *f.tracks
		}
	}
	if f.sigma.IsSet() {
		s.LocalisationNM = Length.In(f.sigma.SI(), "nm")
	}
	if f.pixelU.IsSet() {
		s.PixelRelU = f.pixelU.SI()
	}
	if f.drift.IsSet() {
		s.DriftUMPerS = Velocity.In(f.drift.SI(), "um/s")
	}
	if given["drift-removed"] {
		s.DriftRemoved = *f.driftRemoved
	}
	if f.focusDepth.IsSet() {
		s.FocusDepthUM = Length.In(f.focusDepth.SI(), "um")
	}
	if f.density.IsSet() {
		s.ParticleDensity = f.density.SI()
	}
	if given["estimator"] {
		s.Estimator = f.estimator.Value()
	}
	if f.coverage.IsSet() {
		s.Coverage = f.coverage.SI()
	}
	if f.target.IsSet() {
		s.TargetRelU = f.target.SI()
	}
	if given["trials"] {
		s.Trials = *f.trials
	}
	if given["seed"] {
		s.Seed = *f.seed
	}
	if r := f.review; r != nil {
		if r.radius.IsSet() {
			s.ReportedRadiusNM = Length.In(r.radius.SI(), "nm")
		}
		if r.u.IsSet() {
			s.ReportedUNM = Length.In(r.u.SI(), "nm")
		}
		if given["reported-k"] {
			s.ReportedK, s.ReportedCoverage = *r.k, 0
		}
		if r.coverage.IsSet() {
			s.ReportedK, s.ReportedCoverage = 0, r.coverage.SI()
		}
	}
	return s.Defaults(), nil
}

// applyMedium writes the medium flags into s.
func (f *scenarioFlags) applyMedium(fs *flag.FlagSet, given map[string]bool, s *uncertainty.Scenario) error {
	m := f.medium
	name := s.Medium
	if given["medium"] && m.name.Value() != s.Medium {
		name = m.name.Value()
		s.Medium = name
		s.GlycerolMassFraction, s.PressureMPa = 0, 0
		s.ViscosityMPaS, s.ViscosityRefC, s.ViscosityTempCoeff, s.ViscosityRelU = 0, nil, 0, nil
		switch {
		case name == "glycerol" && !given["glycerol"]:
			return usagef(fs, "-medium glycerol needs -glycerol, the glycerol mass fraction (e.g. 0.5 or 50%%)")
		case name == "custom" && !given["visc"]:
			return usagef(fs, "-medium custom needs -visc, the viscosity at -visc-tref (e.g. 1.2mPas)")
		case name == "custom" && !given["visc-u"]:
			return usagef(fs, "-medium custom needs -visc-u, the relative standard uncertainty of -visc (e.g. 2%%, or 0 if exact)")
		}
	}
	if given["pressure"] && name != "water" {
		return usagef(fs, "-pressure applies only to -medium water (the medium is %s)", name)
	}
	if given["glycerol"] && name != "glycerol" {
		return usagef(fs, "-glycerol applies only to -medium glycerol (the medium is %s)", name)
	}
	for _, c := range []string{"visc", "visc-tref", "visc-tcoeff"} {
		if given[c] && name != "custom" {
			return usagef(fs, "-%s applies only to -medium custom (the medium is %s)", c, name)
		}
	}
	if m.pressure.IsSet() {
		p := Pressure.In(m.pressure.SI(), "MPa")
		if p == 0 {
			// The document reads 0 as "ambient"; a user who typed 0 means zero.
			return &uncertainty.FieldError{Field: "pressure_MPa", Value: 0.0, Allowed: "a pressure > 0 MPa",
				Why: "0 MPa is not a pressure of liquid water; leave -pressure out for the ambient 0.101325 MPa"}
		}
		s.PressureMPa = p
	}
	if m.glycerol.IsSet() {
		s.GlycerolMassFraction = m.glycerol.SI()
	}
	if m.visc.IsSet() {
		s.ViscosityMPaS = Viscosity.In(m.visc.SI(), "mPa·s")
	}
	if m.viscTRef.IsSet() {
		c, err := celsius.Parse(m.viscTRef.String())
		if err != nil { // not reached: celsius accepts every spelling of Temperature
			c = m.viscTRef.SI() - 273.15
		}
		s.ViscosityRefC = &c
	}
	if m.viscTCoeff.IsSet() {
		s.ViscosityTempCoeff = m.viscTCoeff.SI()
	}
	if m.viscU.IsSet() {
		u := m.viscU.SI()
		s.ViscosityRelU = &u
	}
	return nil
}
