package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"maps"
	"math"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"sizebudget/core"
)

// writeJSON writes v as exactly one indented JSON object (or value) followed by a newline. Numbers are
// written in full precision; a NaN or an infinity is refused with an error rather than written.
func writeJSON(w io.Writer, v any) error {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		return fmt.Errorf("writing JSON: %w", err)
	}
	_, err = w.Write(append(b, '\n'))
	return err
}

// A table is a readable report: one row per quantity, its label, value and unit in aligned columns.
type table struct {
	rows [][3]string
}

// add appends a row with the number x written to 6 significant digits.
func (t *table) add(label string, x float64, unit string) {
	t.rows = append(t.rows, [3]string{label, formatNumber(x), unit})
}

// addText appends a row whose value is text.
func (t *table) addText(label, text, unit string) {
	t.rows = append(t.rows, [3]string{label, text, unit})
}

// write prints the table, columns separated by at least two spaces, without trailing spaces.
func (t *table) write(w io.Writer) error {
	var b bytes.Buffer
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	for _, r := range t.rows {
		fmt.Fprintf(tw, "%s\t%s\t%s\n", r[0], r[1], r[2])
	}
	tw.Flush() // writes to a bytes.Buffer cannot fail
	var out strings.Builder
	for line := range strings.Lines(b.String()) {
		out.WriteString(strings.TrimRight(line, " \n") + "\n")
	}
	_, err := io.WriteString(w, out.String())
	return err
}

// formatNumber writes x to 6 significant digits, as a reader wants it in a table.
func formatNumber(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }

// mediumFields are the JSON fields that describe a medium; they are embedded in the reports of every
// subcommand that uses one. Only the fields of the medium's own model are present.
type mediumFields struct {
	Medium string `json:"medium"`
	// water
	PressureMPa *float64 `json:"pressure_MPa,omitempty"`
	// glycerol
	GlycerolMassFraction *float64 `json:"glycerol_mass_fraction,omitempty"`
	// custom
	ReferenceViscosityMPaS *float64 `json:"reference_viscosity_mPa_s,omitempty"`
	ReferenceTemperatureK  *float64 `json:"reference_temperature_K,omitempty"`
	TempCoeffPerK          *float64 `json:"viscosity_temperature_coefficient_per_K,omitempty"`
}

// describeMedium returns the JSON fields of m.
func describeMedium(m core.Medium) mediumFields {
	f := mediumFields{Medium: m.Name()}
	switch m := m.(type) {
	case core.Water:
		p := m.PressureMPa
		if p == 0 {
			p = core.AmbientPressureMPa
		}
		f.PressureMPa = &p
	case core.GlycerolWater:
		f.GlycerolMassFraction = &m.MassFraction
	case core.CustomMedium:
		eta := Viscosity.In(m.ViscosityRef, "mPa·s")
		f.ReferenceViscosityMPaS = &eta
		f.ReferenceTemperatureK = &m.TRef
		f.TempCoeffPerK = &m.TempCoeff
	}
	return f
}

// addRows appends the rows of the medium to t.
func (f mediumFields) addRows(t *table) {
	t.addText("medium", f.Medium, "")
	if f.PressureMPa != nil {
		t.add("pressure", *f.PressureMPa, "MPa")
	}
	if f.GlycerolMassFraction != nil {
		t.add("glycerol mass fraction", *f.GlycerolMassFraction, "")
	}
	if f.ReferenceViscosityMPaS != nil {
		t.add("reference viscosity", *f.ReferenceViscosityMPaS, "mPa·s")
		t.add("reference temperature", *f.ReferenceTemperatureK, "K")
		t.add("temperature coefficient", *f.TempCoeffPerK, "1/K")
	}
}

// checkFinite returns an error naming a result that is not a finite number. The models of core
// never produce one inside their ranges; this guards the output against a model that would.
func checkFinite(results map[string]float64) error {
	for _, name := range slices.Sorted(maps.Keys(results)) {
		if x := results[name]; math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("internal error: %s is %v", name, x)
		}
	}
	return nil
}
