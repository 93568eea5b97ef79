package main

import (
	"bufio"
	"math"
	"os"
	"strconv"
	"strings"
	"testing"
)

// dimensionKeys names the dimensions in testdata/units.txt.
var dimensionKeys = map[string]*Dimension{
	"temperature": Temperature,
	"length":      Length,
	"time":        Duration,
	"frequency":   Frequency,
	"viscosity":   Viscosity,
	"diffusion":   DiffusionCoefficient,
	"velocity":    Velocity,
	"pressure":    Pressure,
	"fraction":    Fraction,
	"tempcoeff":   TemperatureCoefficient,
}

// unitCase is one line of testdata/units.txt.
type unitCase struct {
	line    int
	dim     string
	input   string
	want    float64 // expected SI value when errText is empty
	isError bool
	errText string // text the error message must contain
}

// readUnitCases reads testdata/units.txt (format described in the file).
func readUnitCases(tb testing.TB) []unitCase {
	tb.Helper()
	f, err := os.Open("testdata/units.txt")
	if err != nil {
		tb.Fatal(err)
	}
	defer f.Close()
	var cases []unitCase
	sc := bufio.NewScanner(f)
	for n := 1; sc.Scan(); n++ {
		line := strings.TrimSpace(sc.Text())
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		dim, rest, _ := strings.Cut(line, " ")
		if dimensionKeys[dim] == nil {
			tb.Fatalf("units.txt:%d: unknown dimension %q", n, dim)
		}
		q, err := strconv.QuotedPrefix(rest)
		if err != nil {
			tb.Fatalf("units.txt:%d: %v", n, err)
		}
		input, _ := strconv.Unquote(q)
		c := unitCase{line: n, dim: dim, input: input}
		expect := strings.TrimSpace(rest[len(q):])
		if text, ok := strings.CutPrefix(expect, "error"); ok {
			c.isError = true
			if text = strings.TrimSpace(text); text != "" {
				if c.errText, err = strconv.Unquote(text); err != nil {
					tb.Fatalf("units.txt:%d: %v", n, err)
				}
			}
		} else if c.want, err = strconv.ParseFloat(expect, 64); err != nil {
			tb.Fatalf("units.txt:%d: %v", n, err)
		}
		cases = append(cases, c)
	}
	if err := sc.Err(); err != nil {
		tb.Fatal(err)
	}
	return cases
}

func TestParseTable(t *testing.T) {
	cases := readUnitCases(t)
	if len(cases) < 50 {
		t.Fatalf("only %d cases read from testdata/units.txt", len(cases))
	}
	for _, c := range cases {
		got, err := dimensionKeys[c.dim].Parse(c.input)
		switch {
		case c.isError && err == nil:
			t.Errorf("units.txt:%d: %s.Parse(%q) = %g, want an error", c.line, c.dim, c.input, got)
		case c.isError && !strings.Contains(err.Error(), c.errText):
			t.Errorf("units.txt:%d: %s.Parse(%q) error %q does not contain %q", c.line, c.dim, c.input, err, c.errText)
		case !c.isError && err != nil:
			t.Errorf("units.txt:%d: %s.Parse(%q): %v", c.line, c.dim, c.input, err)
		case !c.isError && !closeRel(got, c.want, 1e-12):
			// Unit definitions are exact, so only rounding separates the two (tolerance for analytic
			// identities, 1e-12 relative).
			t.Errorf("units.txt:%d: %s.Parse(%q) = %.17g, want %.17g", c.line, c.dim, c.input, got, c.want)
		}
	}
}

// closeRel reports whether got is within tol of want, relative to |want| (absolute when want is 0).
func closeRel(got, want, tol float64) bool {
	if want == 0 {
		return math.Abs(got) <= tol
	}
	return math.Abs(got-want) <= tol*math.Abs(want)
}

// TestParseIsCorrectlyRounded checks that a decimal prefix is an exact division, so the parsed value
// is the float64 nearest to the decimal written (Go's strconv.ParseFloat of the SI spelling).
func TestParseIsCorrectlyRounded(t *testing.T) {
	for _, c := range []struct {
		dim      *Dimension
		in, want string
	}{
		{Length, "50nm", "5e-8"}, {Length, "0.05um", "5e-8"}, {Duration, "33ms", "0.033"},
		{Fraction, "5%", "0.05"}, {Viscosity, "0.89mPas", "0.00089"}, {DiffusionCoefficient, "4.9um2/s", "4.9e-12"},
		{Temperature, "25C", "298.15"},
	} {
		got, err := c.dim.Parse(c.in)
		want, _ := strconv.ParseFloat(c.want, 64)
		if err != nil || got != want {
			t.Errorf("%s.Parse(%q) = %.17g, %v; want exactly %.17g", c.dim.Name, c.in, got, err, want)
		}
	}
}

// TestParseErrorsListUnits checks that every dimension names its accepted spellings when the unit is
// unknown or missing.
func TestParseErrorsListUnits(t *testing.T) {
	for _, d := range Dimensions {
		_, err := d.Parse("1px")
		if err == nil || !strings.Contains(err.Error(), d.Accepted) || !strings.Contains(err.Error(), d.Name) {
			t.Errorf("%s.Parse(1px) error %v does not name the dimension and %q", d.Name, err, d.Accepted)
		}
		if _, ok := d.unit(""); ok {
			continue // dimensionless: a bare number is valid
		}
		if _, err := d.Parse("1"); err == nil || !strings.Contains(err.Error(), d.Accepted) {
			t.Errorf("%s.Parse(1) error %v does not list %q", d.Name, err, d.Accepted)
		}
	}
}

// TestDimensionTables checks the unit tables themselves: every symbol once, the SI unit present with
// factor 1 and no offset, factors positive.
func TestDimensionTables(t *testing.T) {
	if len(Dimensions) != len(dimensionKeys) {
		t.Errorf("%d dimensions, %d in the test table", len(Dimensions), len(dimensionKeys))
	}
	for _, d := range Dimensions {
		seen := map[string]bool{}
		for _, u := range d.Units {
			if seen[u.Symbol] {
				t.Errorf("%s: unit %q listed twice", d.Name, u.Symbol)
			}
			seen[u.Symbol] = true
			if !(u.Mul > 0) {
				t.Errorf("%s: unit %q has factor %g", d.Name, u.Symbol, u.Mul)
			}
			if u.Symbol != "" && numberPrefix(u.Symbol) != 0 {
				t.Errorf("%s: unit %q starts like a number", d.Name, u.Symbol)
			}
		}
		if u, ok := d.unit(d.SI); !ok || u.Mul != 1 || u.Exp10 != 0 || u.Offset != 0 {
			t.Errorf("%s: SI unit %q missing or not of factor 1: %+v", d.Name, d.SI, u)
		}
		if _, err := d.Parse(d.Example); err != nil {
			t.Errorf("%s: example %q does not parse: %v", d.Name, d.Example, err)
		}
	}
}

func TestFormatIn(t *testing.T) {
	// Exact by the definitions of the units (SI brochure): 5e-8 m = 50 nm, 298.15 K = 25 °C.
	if got := Length.FormatIn(5e-8, "nm"); got != "50nm" {
		t.Errorf("Length.FormatIn(5e-8, nm) = %q", got)
	}
	if got := Temperature.FormatIn(298.15, "C"); !strings.HasSuffix(got, "C") || !closeRel(Temperature.In(298.15, "C"), 25, 1e-12) {
		t.Errorf("Temperature.FormatIn(298.15, C) = %q", got)
	}
	if got := Fraction.Format(0.05); got != "0.05" {
		t.Errorf("Fraction.Format(0.05) = %q", got)
	}
	if got := Viscosity.Format(0.00089); got != "0.00089Pa·s" {
		t.Errorf("Viscosity.Format(0.00089) = %q", got)
	}
}

func TestInPanicsOnUnknownUnit(t *testing.T) {
	defer func() {
		if r := recover(); r == nil || !strings.HasPrefix(r.(string), "sizebudget: ") {
			t.Errorf("recover() = %v, want a sizebudget: panic", r)
		}
	}()
	Length.In(1, "furlong")
}

// checkParse is the property every parser must have for any input s: no panic; an error is one
// line; a success is finite and normal (or zero), and formatting it again reads back the same value:
// exactly in the SI unit and in every power-of-ten unit, and to 1e-12 (relative to the value plus
// the unit's offset) in the others (atm, °C).
func checkParse(t *testing.T, d *Dimension, s string) {
	si, err := d.Parse(s)
	if err != nil {
		if msg := err.Error(); msg == "" || strings.Contains(msg, "\n") {
			t.Fatalf("%s.Parse(%q): bad error message %q", d.Name, s, msg)
		}
		return
	}
	if math.IsNaN(si) || math.IsInf(si, 0) || (si != 0 && math.Abs(si) < minNormal) {
		t.Fatalf("%s.Parse(%q) = %g, not finite and normal", d.Name, s, si)
	}
	text := d.Format(si)
	if back, err := d.Parse(text); err != nil || back != si {
		t.Fatalf("%s: Parse(%q) = %.17g, Format gives %q, which parses to %.17g, %v", d.Name, s, si, text, back, err)
	}
	if math.Abs(si) > 1e300 {
		return // converting to a larger unit's inverse could overflow; the SI round trip is enough
	}
	for _, u := range d.Units {
		v := d.In(si, u.Symbol)
		if math.IsInf(v, 0) || (v != 0 && math.Abs(v) < minNormal) {
			continue // not representable in this unit
		}
		text := d.FormatIn(si, u.Symbol)
		back, err := d.Parse(text)
		tol := 1e-12 * (math.Abs(si) + math.Abs(u.Offset))
		if u.Mul == 1 && u.Offset == 0 {
			tol = 0 // a power of ten is moved in the decimal text: exact
		}
		if err != nil || math.Abs(back-si) > tol {
			t.Fatalf("%s: Parse(%q) = %.17g, FormatIn(%q) gives %q, which parses to %.17g, %v", d.Name, s, si, u.Symbol, text, back, err)
		}
	}
}

// fuzzParse fuzzes one dimension's parser, seeded with every input of testdata/units.txt (those of
// other dimensions too: they are good wrong inputs) and with each unit of the dimension.
func fuzzParse(f *testing.F, d *Dimension) {
	for _, c := range readUnitCases(f) {
		f.Add(c.input)
	}
	for _, u := range d.Units {
		f.Add("1.25" + u.Symbol)
		f.Add("-3e-7 " + u.Symbol)
	}
	f.Fuzz(func(t *testing.T, s string) { checkParse(t, d, s) })
}

func FuzzParseTemperature(f *testing.F)            { fuzzParse(f, Temperature) }
func FuzzParseLength(f *testing.F)                 { fuzzParse(f, Length) }
func FuzzParseDuration(f *testing.F)               { fuzzParse(f, Duration) }
func FuzzParseFrequency(f *testing.F)              { fuzzParse(f, Frequency) }
func FuzzParseViscosity(f *testing.F)              { fuzzParse(f, Viscosity) }
func FuzzParseDiffusionCoefficient(f *testing.F)   { fuzzParse(f, DiffusionCoefficient) }
func FuzzParseVelocity(f *testing.F)               { fuzzParse(f, Velocity) }
func FuzzParsePressure(f *testing.F)               { fuzzParse(f, Pressure) }
func FuzzParseFraction(f *testing.F)               { fuzzParse(f, Fraction) }
func FuzzParseTemperatureCoefficient(f *testing.F) { fuzzParse(f, TemperatureCoefficient) }
