package uncertainty

import "fmt"

// FieldError reports a scenario field whose value is not allowed. Its message names the field (the JSON
// key, which carries the unit), the value and the allowed range or set.
type FieldError struct {
	Field   string // JSON key, e.g. "temperature_C"
	Value   any    // the value given
	Allowed string // the allowed range or set, e.g. "[0, 100]" or `"cve", "known-noise" or "msd"`
	Why     string // optional reason
}

func (e *FieldError) Error() string {
	v := fmt.Sprint(e.Value)
	if s, ok := e.Value.(string); ok {
		v = fmt.Sprintf("%q", s)
	}
	msg := fmt.Sprintf("%s = %s is not allowed; allowed: %s", e.Field, v, e.Allowed)
	if e.Why != "" {
		msg += " (" + e.Why + ")"
	}
	return msg
}
