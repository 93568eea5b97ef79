package core

import (
	"fmt"
	"strconv"
)

// RangeError reports an input outside the range where a formula or model is valid. It names the
// quantity, the value and the allowed range, so the message can be shown to a user as it is.
type RangeError struct {
	Field string  // name of the quantity, with its unit in the name (e.g. "temperature_K")
	Value float64 // the value given
	Min   float64 // smallest allowed value
	Max   float64 // largest allowed value
	// Why optionally says what the limit protects (e.g. "IAPWS R12-08 liquid range").
	Why string
}

func (e *RangeError) Error() string {
	s := fmt.Sprintf("%s = %s is outside the allowed range [%s, %s]", e.Field, fmtG(e.Value), fmtG(e.Min), fmtG(e.Max))
	if e.Why != "" {
		s += " (" + e.Why + ")"
	}
	return s
}

func fmtG(x float64) string { return strconv.FormatFloat(x, 'g', 6, 64) }

// checkRange returns a *RangeError when x is not within [lo, hi] (NaN is never within).
func checkRange(field string, x, lo, hi float64, why string) error {
	if !(x >= lo && x <= hi) {
		return &RangeError{Field: field, Value: x, Min: lo, Max: hi, Why: why}
	}
	return nil
}
