package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"slices"
	"strings"

	"sizebudget/core"
)

// newFlagSet returns the flag set of the subcommand name. It reports errors instead of exiting, writes
// to stderr, and its usage (printed for -h) reads
//
//	usage: sizebudget <name> <synopsis>
//
//	<about>
//
//	flags:
//	  …
//	units: …
//	exit status: …
func newFlagSet(name, synopsis, about string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		w := fs.Output()
		fmt.Fprintf(w, "usage: sizebudget %s %s\n\n%s\n\nflags:\n", name, synopsis, strings.TrimSpace(about))
		fs.PrintDefaults()
		if dims := flagDimensions(fs); len(dims) > 0 {
			fmt.Fprintln(w, "\nunits (a number and a unit, no space needed; unit symbols are case-sensitive):")
			for _, d := range dims {
				fmt.Fprintf(w, "  %-24s %s\n", d.Name, d.Accepted)
			}
		}
		fmt.Fprint(w, "\n"+exitStatusHelp)
	}
	return fs
}

// exitStatusHelp ends every usage text.
const exitStatusHelp = "exit status: 0 success, 1 a value outside its allowed range, 2 bad usage, 3 internal error\n"

// flagDimensions returns the dimensions of the quantity flags of fs, each once, in flag order.
func flagDimensions(fs *flag.FlagSet) []*Dimension {
	var dims []*Dimension
	fs.VisitAll(func(f *flag.Flag) {
		if q, ok := f.Value.(*quantity); ok && !slices.Contains(dims, q.dim) {
			dims = append(dims, q.dim)
		}
	})
	return dims
}

// parseFlags parses the arguments of a subcommand. For -h or -help it prints the usage and returns
// flag.ErrHelp; for an unknown flag, a malformed value or a stray argument it returns a *usageError.
// Package flag's own printing of errors is silenced: main reports every error once.
func parseFlags(fs *flag.FlagSet, args []string) error {
	out := fs.Output()
	fs.SetOutput(io.Discard)
	err := fs.Parse(args)
	fs.SetOutput(out)
	switch {
	case errors.Is(err, flag.ErrHelp):
		fs.Usage()
		return flag.ErrHelp
	case err != nil:
		return &usageError{Cmd: "sizebudget " + fs.Name(), Err: err}
	case fs.NArg() > 0:
		return usagef(fs, "unexpected argument %q (flags are written -name value)", fs.Arg(0))
	}
	return nil
}

// usagef returns a *usageError of the subcommand of fs (or of sizebudget itself when fs is nil).
func usagef(fs *flag.FlagSet, format string, a ...any) error {
	cmd := "sizebudget"
	if fs != nil {
		cmd += " " + fs.Name()
	}
	return &usageError{Cmd: cmd, Err: fmt.Errorf(format, a...)}
}

// givenFlags returns the names of the flags that were set on the command line.
func givenFlags(fs *flag.FlagSet) map[string]bool {
	given := map[string]bool{}
	fs.Visit(func(f *flag.Flag) { given[f.Name] = true })
	return given
}

// A quantity is a flag.Value holding a physical quantity of one Dimension, kept in SI units. Its
// text is parsed by Dimension.Parse, so a malformed value is reported by package flag as
// `invalid value "25" for flag -temp: …` followed by the accepted units.
type quantity struct {
	dim  *Dimension
	si   float64
	text string
	set  bool
}

// defineQuantity defines the flag -name of dimension dim on fs. def is the default as it would be
// typed ("25C"), or "" for none; it panics if def does not parse (a programming error).
func defineQuantity(fs *flag.FlagSet, name string, dim *Dimension, def, usage string) *quantity {
	q := &quantity{dim: dim, text: def}
	if def != "" {
		v, err := dim.Parse(def)
		if err != nil {
			panic(fmt.Sprintf("sizebudget: default of -%s: %v", name, err))
		}
		q.si = v
	}
	fs.Var(q, name, usage)
	return q
}

// Set parses s; it implements flag.Value.
func (q *quantity) Set(s string) error {
	v, err := q.dim.Parse(s)
	if err != nil {
		return err
	}
	q.si, q.text, q.set = v, strings.TrimSpace(s), true
	return nil
}

// String returns the text as given (or the default); it implements flag.Value.
func (q *quantity) String() string {
	if q == nil {
		return ""
	}
	return q.text
}

// Get returns the SI value as a float64; it implements flag.Getter.
func (q *quantity) Get() any { return q.si }

// SI returns the value in the SI unit of the dimension (the default when the flag was not given).
func (q *quantity) SI() float64 { return q.si }

// IsSet reports whether the flag was given on the command line.
func (q *quantity) IsSet() bool { return q.set }

// A choice is a flag.Value that accepts one of a fixed list of words.
type choice struct {
	allowed []string
	value   string
}

// defineChoice defines the flag -name on fs, accepting one of allowed, with default def.
func defineChoice(fs *flag.FlagSet, name, def string, allowed []string, usage string) *choice {
	c := &choice{allowed: allowed, value: def}
	fs.Var(c, name, usage)
	return c
}

// Set accepts s if it is one of the allowed words; it implements flag.Value.
func (c *choice) Set(s string) error {
	if !slices.Contains(c.allowed, s) {
		return fmt.Errorf("want one of %s", strings.Join(c.allowed, ", "))
	}
	c.value = s
	return nil
}

// String returns the chosen word; it implements flag.Value.
func (c *choice) String() string {
	if c == nil {
		return ""
	}
	return c.value
}

// Value returns the chosen word.
func (c *choice) Value() string { return c.value }

// mediumFlags are the flags that choose the liquid: -medium and the parameters of each medium. Every
// subcommand that needs a viscosity defines them with defineMediumFlags and, after parsing, builds
// the core.Medium with Medium.
type mediumFlags struct {
	name               *choice
	pressure, glycerol *quantity
	// The custom medium: η(T) = visc·exp(viscTCoeff·(T − viscTRef)), relative uncertainty viscU.
	visc, viscU, viscTRef, viscTCoeff *quantity
}

// Medium names, as accepted by -medium.
var mediumNames = []string{"water", "glycerol", "custom"}

// customFlags are the flags that belong to -medium custom only.
var customFlags = []string{"visc", "visc-u", "visc-tref", "visc-tcoeff"}

// mediumHelp describes the media, for the about text of the subcommands that use mediumFlags.
const mediumHelp = `Media (-medium):
  water     liquid water, IAPWS 2008 viscosity at the IAPWS-IF97 density, at -pressure
            (default 0.101325MPa); relative standard uncertainty 1 %.
  glycerol  glycerol–water mixture, Cheng (2008), 0–100 °C; -glycerol (mass fraction) is
            required; relative standard uncertainty 3 %.
  custom    your own liquid: η(T) = η_ref·exp(c·(T − T_ref)) with η_ref = -visc (required),
            T_ref = -visc-tref (default 25C), c = -visc-tcoeff (default 0/K: no temperature
            dependence; water is about -0.023/K) and relative standard uncertainty -visc-u
            (default 0: state yours); valid within 25 K of T_ref.
A flag that belongs to another medium than the chosen one is refused.`

// defineMediumFlags defines -medium, -pressure, -glycerol, -visc, -visc-u, -visc-tref and
// -visc-tcoeff on fs.
func defineMediumFlags(fs *flag.FlagSet) *mediumFlags {
	return &mediumFlags{
		name:       defineChoice(fs, "medium", "water", mediumNames, "the `liquid`: water, glycerol or custom"),
		pressure:   defineQuantity(fs, "pressure", Pressure, "0.101325MPa", "absolute `pressure` of the water (water only)"),
		glycerol:   defineQuantity(fs, "glycerol", Fraction, "", "glycerol mass `fraction`, e.g. 0.5 or 50% (glycerol only, required)"),
		visc:       defineQuantity(fs, "visc", Viscosity, "", "`viscosity` at -visc-tref, e.g. 1.2mPas (custom only, required)"),
		viscU:      defineQuantity(fs, "visc-u", Fraction, "0", "relative standard `uncertainty` of -visc, e.g. 2% (custom only)"),
		viscTRef:   defineQuantity(fs, "visc-tref", Temperature, "25C", "reference `temperature` of -visc (custom only)"),
		viscTCoeff: defineQuantity(fs, "visc-tcoeff", TemperatureCoefficient, "0/K", "temperature `coefficient` d ln η/dT of -visc, e.g. -0.023/K or -2.3%/K (custom only)"),
	}
}

// Medium builds the medium chosen on the command line parsed by fs. It returns a *usageError when a
// flag of another medium is given or a required one is missing, and the *core.RangeError of core
// when a parameter is outside its allowed range.
func (m *mediumFlags) Medium(fs *flag.FlagSet) (core.Medium, error) {
	given := givenFlags(fs)
	name := m.name.Value()
	if given["pressure"] && name != "water" {
		return nil, usagef(fs, "-pressure applies only to -medium water (the medium is %s)", name)
	}
	if given["glycerol"] && name != "glycerol" {
		return nil, usagef(fs, "-glycerol applies only to -medium glycerol (the medium is %s)", name)
	}
	for _, f := range customFlags {
		if given[f] && name != "custom" {
			return nil, usagef(fs, "-%s applies only to -medium custom (the medium is %s)", f, name)
		}
	}
	switch name {
	case "glycerol":
		if !given["glycerol"] {
			return nil, usagef(fs, "-medium glycerol needs -glycerol, the glycerol mass fraction (e.g. 0.5 or 50%%)")
		}
		return core.MediumByName("glycerol", m.glycerol.SI(), 0)
	case "custom":
		if !given["visc"] {
			return nil, usagef(fs, "-medium custom needs -visc, the viscosity at -visc-tref (e.g. 1.2mPas)")
		}
		c := core.CustomMedium{
			ViscosityRef: m.visc.SI(),
			TRef:         m.viscTRef.SI(),
			RelU:         m.viscU.SI(),
			TempCoeff:    m.viscTCoeff.SI(),
		}
		if err := c.Validate(); err != nil {
			return nil, err
		}
		return c, nil
	}
	p := Pressure.In(m.pressure.SI(), "MPa")
	if p == 0 {
		// core.Water reads a zero pressure as "ambient"; a user who typed 0MPa means zero, which is
		// outside the liquid range. Let core name the range, then report the value typed.
		_, _, err := core.Water{PressureMPa: -1}.TemperatureRange()
		var re *core.RangeError
		if !errors.As(err, &re) {
			return nil, errors.New("pressure_MPa = 0 is not a pressure of liquid water")
		}
		re.Value = 0
		return nil, re
	}
	return core.MediumByName("water", 0, p)
}
