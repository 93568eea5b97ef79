package main

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// A Unit is one accepted spelling of a unit and its conversion to the SI unit of its dimension:
//
//	si = value·10^Exp10·Mul + Offset
//
// The power of ten is applied to the decimal text, not by a floating-point multiplication: "0.05um"
// is read as the decimal 0.05e-6, so it gives the same float64 as "5e-8m" (the one nearest to the
// decimal value), whichever unit a user prefers. Mul is 1 except for units that are not a power of
// ten of the SI unit (atm).
type Unit struct {
	Symbol string
	Exp10  int
	Mul    float64
	Offset float64
}

// A Dimension is a kind of physical quantity together with the unit spellings sizebudget accepts for
// it on the command line. Parse turns "50nm" into 5e-8 (SI); Format writes an SI value back in the SI
// unit so that Parse reads the same value again.
type Dimension struct {
	Name     string // the quantity, as used in messages ("temperature")
	SI       string // symbol of the SI unit; one of Units, with Mul = Div = 1 and no offset
	Units    []Unit
	Accepted string // the spellings, as listed in messages and in -h
	Example  string // a typical value, for messages
}

// The dimensions of sizebudget's command-line quantities. Unit definitions are exact by the SI
// brochure (9th edition, 2019): °C is K − 273.15, 1 bar = 1e5 Pa, 1 atm = 101325 Pa, 1 cP = 1 mPa·s.
// The micro prefix may be written u, µ (U+00B5 MICRO SIGN) or μ (U+03BC GREEK SMALL LETTER MU).
var (
	Temperature = &Dimension{
		Name: "temperature", SI: "K", Example: "25C",
		Accepted: "K, C, °C or degC (e.g. 298.15K, 25C)",
		Units: []Unit{
			{"K", 0, 1, 0},
			{"C", 0, 1, 273.15}, {"°C", 0, 1, 273.15}, {"degC", 0, 1, 273.15}, {"℃", 0, 1, 273.15},
		},
	}
	Length = &Dimension{
		Name: "length", SI: "m", Example: "50nm",
		Accepted: "m, cm, mm, um (or µm), nm (e.g. 50nm, 0.05um, 5e-8m)",
		Units:    withMicro([]Unit{{"m", 0, 1, 0}, {"cm", -2, 1, 0}, {"mm", -3, 1, 0}, {"um", -6, 1, 0}, {"nm", -9, 1, 0}}),
	}
	Duration = &Dimension{
		Name: "time", SI: "s", Example: "33ms",
		Accepted: "s, ms, us (or µs), ns (e.g. 33ms, 0.033s, 100us)",
		Units:    withMicro([]Unit{{"s", 0, 1, 0}, {"ms", -3, 1, 0}, {"us", -6, 1, 0}, {"ns", -9, 1, 0}}),
	}
	Frequency = &Dimension{
		Name: "frequency", SI: "Hz", Example: "30Hz",
		Accepted: "Hz, kHz or fps (frames per second; e.g. 30Hz, 30fps)",
		Units:    []Unit{{"Hz", 0, 1, 0}, {"kHz", 3, 1, 0}, {"fps", 0, 1, 0}},
	}
	Viscosity = &Dimension{
		Name: "viscosity", SI: "Pa·s", Example: "0.89mPas",
		Accepted: "Pa·s, mPa·s, µPa·s (the dot may be written ., ·, * or left out: 0.89mPas, 0.89mPa.s) or cP (e.g. 0.89cP)",
		Units:    viscosityUnits(),
	}
	DiffusionCoefficient = &Dimension{
		Name: "diffusion coefficient", SI: "m2/s", Example: "4.9um2/s",
		Accepted: "m2/s, cm2/s, mm2/s, um2/s (or µm²/s), nm2/s; the square as 2, ² or ^2 (e.g. 4.9um2/s, 4.9e-12m2/s)",
		Units:    squaredPerSecond(),
	}
	Velocity = &Dimension{
		Name: "velocity", SI: "m/s", Example: "10nm/s",
		Accepted: "m/s, mm/s, um/s (or µm/s), nm/s (e.g. 10nm/s, 0.01um/s)",
		Units:    withMicro([]Unit{{"m/s", 0, 1, 0}, {"mm/s", -3, 1, 0}, {"um/s", -6, 1, 0}, {"nm/s", -9, 1, 0}}),
	}
	Pressure = &Dimension{
		Name: "pressure", SI: "Pa", Example: "0.101325MPa",
		Accepted: "Pa, hPa, kPa, MPa, mbar, bar or atm (e.g. 0.101325MPa, 1bar, 101.325kPa)",
		Units: []Unit{
			{"Pa", 0, 1, 0}, {"hPa", 2, 1, 0}, {"kPa", 3, 1, 0}, {"MPa", 6, 1, 0},
			{"mbar", 2, 1, 0}, {"bar", 5, 1, 0}, {"atm", 0, 101325, 0},
		},
	}
	Fraction = &Dimension{
		Name: "fraction", SI: "", Example: "5%",
		Accepted: "a plain fraction or a percentage (e.g. 0.05 or 5%)",
		Units:    []Unit{{"", 0, 1, 0}, {"%", -2, 1, 0}},
	}
	TemperatureCoefficient = &Dimension{
		Name: "temperature coefficient", SI: "/K", Example: "-0.023/K",
		Accepted: "/K, K-1, K^-1, K⁻¹ or %/K (e.g. -0.023/K, -2.3%/K)",
		Units:    []Unit{{"/K", 0, 1, 0}, {"K-1", 0, 1, 0}, {"K^-1", 0, 1, 0}, {"K⁻¹", 0, 1, 0}, {"%/K", -2, 1, 0}},
	}
)

// Dimensions lists every Dimension above, for tests and help texts.
var Dimensions = []*Dimension{
	Temperature, Length, Duration, Frequency, Viscosity, DiffusionCoefficient, Velocity, Pressure,
	Fraction, TemperatureCoefficient,
}

// microSpellings are the ways of writing the micro prefix besides ASCII "u".
var microSpellings = []string{"µ", "μ"}

// withMicro adds, for every unit whose symbol starts with the ASCII micro prefix "u", the same unit
// spelt with µ and μ.
func withMicro(us []Unit) []Unit {
	out := append([]Unit(nil), us...)
	for _, u := range us {
		if rest, ok := strings.CutPrefix(u.Symbol, "u"); ok {
			for _, m := range microSpellings {
				out = append(out, Unit{m + rest, u.Exp10, u.Mul, u.Offset})
			}
		}
	}
	return out
}

// viscosityUnits returns Pa·s, mPa·s and µPa·s with every accepted way of writing the product, and cP.
func viscosityUnits() []Unit {
	var us []Unit
	for _, p := range []struct {
		prefix string
		exp    int
	}{{"", 0}, {"m", -3}, {"u", -6}} {
		for _, dot := range []string{"·", "", ".", "*", "⋅", " "} {
			us = append(us, Unit{p.prefix + "Pa" + dot + "s", p.exp, 1, 0})
		}
	}
	return withMicro(append(us, Unit{"cP", -3, 1, 0}))
}

// squaredPerSecond returns the units of a diffusion coefficient, area per time.
func squaredPerSecond() []Unit {
	var us []Unit
	for _, p := range []struct {
		prefix string
		exp    int
	}{{"", 0}, {"c", -4}, {"m", -6}, {"u", -12}, {"n", -18}} {
		for _, sq := range []string{"2", "²", "^2"} {
			us = append(us, Unit{p.prefix + "m" + sq + "/s", p.exp, 1, 0})
		}
	}
	return withMicro(us)
}

// unit returns the Unit spelt symbol.
func (d *Dimension) unit(symbol string) (Unit, bool) {
	for _, u := range d.Units {
		if u.Symbol == symbol {
			return u, true
		}
	}
	return Unit{}, false
}

// Parse reads a quantity written as a number followed by a unit, such as "25C", "50 nm" or
// "4.9µm²/s", and returns its value in the SI unit of d. Space around the text and between the
// number and the unit is allowed; unit symbols are case-sensitive (mPa is not MPa). The number is a
// decimal with an optional exponent (5e-8m). A bare number is accepted only where the SI unit is
// dimensionless (Fraction).
//
// Parse returns an error, naming the accepted spellings, for an empty text, a missing number, NaN or
// infinity, an unknown or missing unit, trailing text, and a value whose SI magnitude overflows or
// falls below the smallest normal float64 (2.2e-308). It does not judge whether the value makes sense
// physically: range checks belong to the caller.
func (d *Dimension) Parse(s string) (float64, error) {
	t := strings.TrimSpace(s)
	if t == "" {
		return 0, fmt.Errorf("empty %s: want a number and a unit, %s", d.Name, d.Accepted)
	}
	n := numberPrefix(t)
	if n == 0 {
		if nonFiniteWord(t) {
			return 0, fmt.Errorf("%q is not a finite number: want a %s such as %s", s, d.Name, d.Example)
		}
		return 0, fmt.Errorf("%q does not start with a number: want a %s such as %s; units: %s", s, d.Name, d.Example, d.Accepted)
	}
	symbol := strings.TrimLeft(t[n:], " \t")
	u, ok := d.unit(symbol)
	if !ok {
		if symbol == "" {
			return 0, fmt.Errorf("%q has no unit: a %s needs one: %s", s, d.Name, d.Accepted)
		}
		return 0, fmt.Errorf("unknown unit %q for a %s: use %s", symbol, d.Name, d.Accepted)
	}
	v, err := parseScaled(t[:n], u.Exp10)
	if err != nil {
		return 0, fmt.Errorf("%q is %v", s, err)
	}
	si := v*u.Mul + u.Offset
	if math.IsInf(si, 0) || math.IsNaN(si) {
		return 0, fmt.Errorf("%q is too large a %s", s, d.Name)
	}
	if si != 0 && math.Abs(si) < minNormal {
		return 0, fmt.Errorf("%q is too close to zero to be represented", s)
	}
	return si, nil
}

// parseScaled returns the float64 nearest to the decimal number num times 10^exp10, shifting the
// decimal exponent rather than multiplying. It fails when the result overflows, or underflows to
// zero from a nonzero number.
func parseScaled(num string, exp10 int) (float64, error) {
	mant, exp, hasExp := strings.Cut(strings.ToLower(num), "e")
	e := int64(0)
	if hasExp {
		var err error
		if e, err = strconv.ParseInt(exp, 10, 32); err != nil {
			e = math.MaxInt32 // the exponent alone is out of range: keep its sign
			if strings.HasPrefix(exp, "-") {
				e = math.MinInt32
			}
		}
	}
	e += int64(exp10)
	nonzero := strings.ContainsAny(mant, "123456789")
	v, err := strconv.ParseFloat(mant+"e"+strconv.FormatInt(e, 10), 64)
	switch {
	case err != nil || math.IsInf(v, 0):
		return 0, errors.New("too large a number")
	case v == 0 && nonzero:
		return 0, errors.New("too close to zero to be represented")
	}
	return v, nil
}

// minNormal is the smallest positive normal float64, 2^−1022.
const minNormal = 0x1p-1022

// In converts the SI value si to the unit spelt symbol, (si − Offset)/Mul·10^−Exp10, the power of
// ten again applied to the decimal (the shortest one that reads back as the same float64), so that
// Length.In(5e-8, "nm") is exactly 50. It panics if d has no such unit (a programming error).
func (d *Dimension) In(si float64, symbol string) float64 {
	v, _ := strconv.ParseFloat(d.decimalIn(si, symbol), 64)
	return v
}

// FormatIn writes the SI value si in the unit spelt symbol: the shortest decimal that Parse reads
// back as si ("50nm" for 5e-8 m). For units that are a power of ten of the SI unit the round trip is
// exact; with a factor or an offset (atm, °C) it is exact to rounding.
func (d *Dimension) FormatIn(si float64, symbol string) string {
	return d.decimalIn(si, symbol) + symbol
}

// Format writes the SI value si in the SI unit of d, so that Parse(Format(si)) == si exactly.
func (d *Dimension) Format(si float64) string { return d.FormatIn(si, d.SI) }

// decimalIn returns the number part of FormatIn.
func (d *Dimension) decimalIn(si float64, symbol string) string {
	u, ok := d.unit(symbol)
	if !ok {
		panic(fmt.Sprintf("sizebudget: %s has no unit %q", d.Name, symbol))
	}
	v := si
	if u.Offset != 0 || u.Mul != 1 {
		v = (si - u.Offset) / u.Mul
	}
	return shiftDecimal(strconv.FormatFloat(v, 'e', -1, 64), -u.Exp10)
}

// shiftDecimal multiplies the number s, written by strconv.FormatFloat in the 'e' format, by
// 10^shift by moving its decimal point, and writes it plainly (no exponent) when its exponent is
// between −5 and 20, like the 'g' format. NaN and infinities are returned as they are.
func shiftDecimal(s string, shift int) string {
	mant, exp, ok := strings.Cut(s, "e")
	if !ok {
		return s // NaN, ±Inf
	}
	e, _ := strconv.Atoi(exp)
	e += shift
	sign := ""
	if strings.HasPrefix(mant, "-") {
		sign, mant = "-", mant[1:]
	}
	digits := strings.Replace(mant, ".", "", 1)
	if digits == "0" {
		return sign + "0"
	}
	if e < -5 || e > 20 {
		if len(digits) > 1 {
			digits = digits[:1] + "." + digits[1:]
		}
		return fmt.Sprintf("%s%se%+03d", sign, digits, e)
	}
	point := 1 + e // digits before the decimal point
	switch {
	case point <= 0:
		return sign + "0." + strings.Repeat("0", -point) + digits
	case point >= len(digits):
		return sign + digits + strings.Repeat("0", point-len(digits))
	}
	return sign + digits[:point] + "." + digits[point:]
}

// numberPrefix returns the length of the longest prefix of s that is a decimal number:
//
//	[+-] (digits [. digits] | . digits) [(e|E) [+-] digits]
//
// and 0 if s does not start with one. An "e" not followed by digits is left for the unit.
func numberPrefix(s string) int {
	i := 0
	if i < len(s) && (s[i] == '+' || s[i] == '-') {
		i++
	}
	digits := 0
	for i < len(s) && isDigit(s[i]) {
		i++
		digits++
	}
	if i < len(s) && s[i] == '.' {
		i++
		for i < len(s) && isDigit(s[i]) {
			i++
			digits++
		}
	}
	if digits == 0 {
		return 0
	}
	if i < len(s) && (s[i] == 'e' || s[i] == 'E') {
		j := i + 1
		if j < len(s) && (s[j] == '+' || s[j] == '-') {
			j++
		}
		k := j
		for k < len(s) && isDigit(s[k]) {
			k++
		}
		if k > j {
			i = k
		}
	}
	return i
}

func isDigit(c byte) bool { return '0' <= c && c <= '9' }

// nonFiniteWord reports whether s starts with a spelling of NaN or infinity.
func nonFiniteWord(s string) bool {
	s = strings.ToLower(strings.TrimLeft(s, "+-"))
	return strings.HasPrefix(s, "nan") || strings.HasPrefix(s, "inf") || strings.HasPrefix(s, "∞")
}
