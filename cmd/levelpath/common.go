package main

import (
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strings"

	"github.com/spf13/cobra"

	"levelpath/perf"
)

// formatFlag registers --format with the allowed values; the first is the
// default.
func formatFlag(c *cobra.Command, allowed ...string) *string {
	s := c.Flags().String("format", allowed[0], "output format: "+strings.Join(allowed, "|"))
	return s
}

// checkFormat validates a --format value.
func checkFormat(got string, allowed ...string) error {
	if slices.Contains(allowed, got) {
		return nil
	}
	return badInputf("--format %q: want one of %s", got, strings.Join(allowed, ", "))
}

// loadAircraft resolves --aircraft: a built-in name, a YAML file or a
// directory of operator tables.
func loadAircraft(name string) (*perf.Aircraft, error) {
	if name == "" {
		return nil, badInputf("--aircraft is required (built-in: %s, or a YAML file or a tables directory)", strings.Join(perf.BuiltinNames(), ", "))
	}
	a, err := perf.Load(name)
	if err != nil {
		return nil, badInput(err)
	}
	return a, nil
}

// writeJSON writes v as indented JSON.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

func warnf(w io.Writer, format string, args ...any) {
	fmt.Fprintf(w, "levelpath: warning: "+format+"\n", args...)
}
