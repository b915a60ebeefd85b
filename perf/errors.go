package perf

import (
	"fmt"
	"strconv"
)

// FieldError reports an invalid or missing field of an aircraft
// description, in the style of image/png.FormatError: the input is wrong.
type FieldError struct {
	Source string // file name or built-in name
	Field  string // dotted YAML path, e.g. "engines.count"
	Reason string
}

func (e *FieldError) Error() string {
	return e.Source + ": field " + e.Field + ": " + e.Reason
}

// FormatError reports aircraft YAML that cannot be read at all (syntax).
// Line is 1-based, or 0 when the decoder did not give one.
type FormatError struct {
	Source string
	Line   int
	Reason string
}

func (e *FormatError) Error() string {
	if e.Line > 0 {
		return e.Source + ":" + strconv.Itoa(e.Line) + ": malformed YAML: " + e.Reason
	}
	return e.Source + ": malformed YAML: " + e.Reason
}

// RangeError reports an argument outside the range a computation accepts,
// such as a mass outside OEW..MTOW or a buffet floor below 1 g.
type RangeError struct {
	Quantity string  // what was wrong, e.g. "mass"
	Value    float64 // the value given
	Min, Max float64 // accepted range (inclusive)
	Unit     string
	Aircraft string // may be empty
}

func (e *RangeError) Error() string {
	s := fmt.Sprintf("perf: %s %g %s outside %g..%g %s", e.Quantity, e.Value, e.Unit, e.Min, e.Max, e.Unit)
	if e.Aircraft != "" {
		s += " for " + e.Aircraft
	}
	return s
}

// LimitError reports a climb or descent that cannot be flown as asked.
type LimitError struct {
	Aircraft string
	Phase    string  // "climb" or "descent"
	FL       float64 // flight level where it fails
	Reason   string
}

func (e *LimitError) Error() string {
	return fmt.Sprintf("perf: %s %s cannot be completed: at FL%.0f %s", e.Aircraft, e.Phase, e.FL, e.Reason)
}
