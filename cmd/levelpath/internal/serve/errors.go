package serve

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"net/http"
	"strings"

	"levelpath/optimizer"
	"levelpath/winds"
)

// apiError is an error answered as JSON {"error": ..., "field": ...} with
// an HTTP status. Only apiErrors reach the client with their text; any
// other error is answered as 500 "internal error" and logged.
type apiError struct {
	Status     int    `json:"-"`
	Msg        string `json:"error"`
	Field      string `json:"field,omitempty"`
	RetryAfter int    `json:"-"` // seconds, for 503
}

func (e *apiError) Error() string { return e.Msg }

// fieldErr is a 400 naming the request field.
func fieldErr(field, format string, args ...any) *apiError {
	return &apiError{Status: http.StatusBadRequest, Msg: fmt.Sprintf(format, args...), Field: field}
}

// optimizerFields maps the optimizer's Problem field names to request
// field names.
var optimizerFields = map[string]string{
	"Aircraft": "aircraft", "Fuel": "fuel", "MassBucket": "mass_bucket_kg", "MinFL": "min_fl", "MaxFL": "max_fl",
	"Speed.Mach": "speed", "Steps.MaxChange": "max_step_ft", "Steps.MaxSteps": "max_steps",
	"Steps.MinDistance": "min_step_nm", "TakeoffMass": "mass", "Track": "route", "Weather": "weather",
	"ZFW": "zfw", "levels": "levels", "profile": "profile", "route": "route", "CI": "ci", "Floor": "floor",
	"Depart": "depart",
}

// optimizerErr maps an optimizer error: input errors become 400 naming
// the request field; anything else stays internal.
func optimizerErr(err error) error {
	var ie *optimizer.InputError
	if errors.As(err, &ie) {
		f := optimizerFields[ie.Field]
		if f == "" {
			f = strings.ToLower(ie.Field)
		}
		return &apiError{Status: http.StatusBadRequest, Msg: err.Error(), Field: f}
	}
	var re *winds.RangeError
	if errors.As(err, &re) {
		return &apiError{Status: http.StatusBadRequest, Msg: err.Error(), Field: "weather"}
	}
	return err
}

// readBody reads a request body of at most limit bytes (413 beyond).
func readBody(w http.ResponseWriter, r *http.Request, limit int64) ([]byte, error) {
	if ct := r.Header.Get("Content-Type"); ct != "" && !strings.HasPrefix(ct, "application/json") {
		return nil, &apiError{Status: http.StatusUnsupportedMediaType, Msg: "Content-Type " + ct + ": want application/json"}
	}
	b, err := io.ReadAll(http.MaxBytesReader(w, r.Body, limit))
	var mbe *http.MaxBytesError
	if errors.As(err, &mbe) {
		return nil, &apiError{Status: http.StatusRequestEntityTooLarge, Msg: fmt.Sprintf("request body over the limit of %d bytes", limit)}
	}
	if err != nil {
		return nil, &apiError{Status: http.StatusBadRequest, Msg: "reading the body: " + err.Error()}
	}
	return b, nil
}

// decodeJSON decodes one JSON object into v, refusing unknown fields,
// wrong types and trailing data; errors name the field.
func decodeJSON(body []byte, v any) error {
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.DisallowUnknownFields()
	err := dec.Decode(v)
	if err == nil {
		if _, terr := dec.Token(); terr != io.EOF {
			err = errors.New("trailing data after the JSON object")
		}
	}
	if err == nil {
		return nil
	}
	var ute *json.UnmarshalTypeError
	var se *json.SyntaxError
	switch {
	case errors.As(err, &ute):
		ute.Field = strings.TrimPrefix(ute.Field, "planRequest.")
		return &apiError{Status: http.StatusBadRequest, Msg: fmt.Sprintf("%s: got a JSON %s, want %s", ute.Field, ute.Value, ute.Type), Field: ute.Field}
	case errors.As(err, &se):
		return &apiError{Status: http.StatusBadRequest, Msg: fmt.Sprintf("body is not valid JSON at byte %d: %v", se.Offset, se)}
	case errors.Is(err, io.EOF):
		return &apiError{Status: http.StatusBadRequest, Msg: "empty body: want a JSON object"}
	case strings.HasPrefix(err.Error(), "json: unknown field "):
		name := strings.Trim(strings.TrimPrefix(err.Error(), "json: unknown field "), `"`)
		return &apiError{Status: http.StatusBadRequest, Msg: fmt.Sprintf("unknown field %q", name), Field: name}
	}
	return &apiError{Status: http.StatusBadRequest, Msg: "body: " + strings.TrimPrefix(err.Error(), "json: ")}
}
