package optimizer

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"gopkg.in/yaml.v3"
)

// FuelPolicy is an operator's fuel policy after the basic scheme of ICAO
// Annex 6 Part I, 4.3.6.3, and the ICAO Flight Planning and Fuel
// Management Manual (Doc 9976): taxi, trip, contingency, alternate, final
// reserve, additional and discretionary (extra) fuel. Masses kg, times
// minutes, heights and elevations feet, speeds knots: the units of the
// YAML keys (see PolicyKeys). Build one with DefaultFuelPolicy or
// ParseFuelPolicy, which check it.
type FuelPolicy struct {
	// TaxiKg is the taxi fuel, a fixed figure; when negative (the
	// default) it is TaxiMinutes at ground idle from perf's idle fuel flow.
	TaxiKg      float64
	TaxiMinutes float64
	// ContingencyPct of the trip fuel, but at least ContingencyMinMinutes
	// of holding at HoldingHeightFt above the destination at the expected
	// landing mass.
	ContingencyPct        float64
	ContingencyMinMinutes float64
	// FinalReserveMinutes of holding at HoldingHeightFt above the
	// alternate (or the destination when there is none) at the expected
	// mass there.
	FinalReserveMinutes float64
	// AdditionalKg and ExtraKg are added as given.
	AdditionalKg, ExtraKg float64
	// HoldingSpeedKt is the holding CAS; 0 means the speed of least fuel
	// flow (common practice).
	HoldingSpeedKt float64
	// HoldingHeightFt is the holding height above the aerodrome.
	HoldingHeightFt float64
	// DestinationElevationFt and AlternateElevationFt are the aerodrome
	// elevations (the routes carry none); holding is at elevation +
	// HoldingHeightFt pressure altitude (QNH taken as standard).
	DestinationElevationFt, AlternateElevationFt float64

	// Source names where the policy came from; Defaulted lists the keys
	// that took their default (reported as warnings).
	Source    string
	Defaulted []string
}

// policyKey describes one YAML key of a fuel policy.
type policyKey struct {
	name     string
	def      float64
	lo, hi   float64
	field    func(*FuelPolicy) *float64
	describe string
}

// policyKeys are the YAML keys, their defaults and accepted ranges.
var policyKeys = []policyKey{
	{"taxi_kg", -1, -1, 20000, func(p *FuelPolicy) *float64 { return &p.TaxiKg }, "taxi fuel, kg (-1: taxi_minutes at ground idle)"},
	{"taxi_minutes", 12, 0, 120, func(p *FuelPolicy) *float64 { return &p.TaxiMinutes }, "taxi time at ground idle, min (used when taxi_kg is -1; 12 min, common practice)"},
	{"contingency_percent", 5, 0, 100, func(p *FuelPolicy) *float64 { return &p.ContingencyPct }, "contingency, percent of trip fuel"},
	{"contingency_min_minutes", 5, 0, 120, func(p *FuelPolicy) *float64 { return &p.ContingencyMinMinutes }, "least contingency, minutes of holding above the destination"},
	{"final_reserve_minutes", 30, 0, 240, func(p *FuelPolicy) *float64 { return &p.FinalReserveMinutes }, "final reserve, minutes of holding above the alternate (or destination)"},
	{"additional_kg", 0, 0, 200000, func(p *FuelPolicy) *float64 { return &p.AdditionalKg }, "additional fuel, kg"},
	{"extra_kg", 0, 0, 200000, func(p *FuelPolicy) *float64 { return &p.ExtraKg }, "discretionary (extra) fuel, kg"},
	{"holding_speed_kt", 0, 0, 400, func(p *FuelPolicy) *float64 { return &p.HoldingSpeedKt }, "holding CAS, kt (0: speed of least fuel flow)"},
	{"holding_height_ft", 1500, 0, 20000, func(p *FuelPolicy) *float64 { return &p.HoldingHeightFt }, "holding height above the aerodrome, ft"},
	{"destination_elevation_ft", 0, -1500, 15000, func(p *FuelPolicy) *float64 { return &p.DestinationElevationFt }, "destination elevation, ft"},
	{"alternate_elevation_ft", 0, -1500, 15000, func(p *FuelPolicy) *float64 { return &p.AlternateElevationFt }, "alternate elevation, ft"},
}

// PolicyKeys returns the YAML keys of a fuel policy with their defaults
// and meaning, in file order, for documentation and help text.
func PolicyKeys() []string {
	out := make([]string, len(policyKeys))
	for i, k := range policyKeys {
		out[i] = fmt.Sprintf("%s: %g  # %s", k.name, k.def, k.describe)
	}
	return out
}

// DefaultFuelPolicy is the basic scheme: taxi 12 minutes at ground idle,
// contingency 5 % of trip fuel but at least 5 minutes of holding at
// 1,500 ft above the destination, final reserve 30 minutes of holding at
// 1,500 ft above the alternate (or destination), no additional or extra
// fuel, holding at the speed of least fuel flow, aerodromes at sea level.
func DefaultFuelPolicy() FuelPolicy {
	p := FuelPolicy{Source: "default policy"}
	for _, k := range policyKeys {
		*k.field(&p) = k.def
		p.Defaulted = append(p.Defaulted, k.name)
	}
	return p
}

// PolicyError reports a fuel policy file that cannot be used: a syntax
// error, an unknown key, or a value out of range. Line is 1-based (0 when
// unknown).
type PolicyError struct {
	Source string
	Line   int
	Key    string
	Msg    string
}

func (e *PolicyError) Error() string {
	var b strings.Builder
	b.WriteString("fuel policy ")
	b.WriteString(e.Source)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Key != "" {
		b.WriteString(": " + e.Key)
	}
	b.WriteString(": " + e.Msg)
	return b.String()
}

// maxPolicySize bounds a policy file.
const maxPolicySize = 64 << 10

// ParseFuelPolicy reads a YAML fuel policy: a mapping of the keys of
// PolicyKeys to numbers. Keys not given take their default (listed in
// Defaulted). An unknown key, a repeated key, a value that is not a finite
// number or lies outside its range, and a second document are errors
// naming the line and key.
func ParseFuelPolicy(data []byte, source string) (FuelPolicy, error) {
	p := DefaultFuelPolicy()
	p.Source, p.Defaulted = source, nil
	fail := func(line int, key, format string, args ...any) (FuelPolicy, error) {
		return FuelPolicy{}, &PolicyError{Source: source, Line: line, Key: key, Msg: fmt.Sprintf(format, args...)}
	}
	if len(data) > maxPolicySize {
		return fail(0, "", "%d bytes, more than the %d allowed", len(data), maxPolicySize)
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	var doc yaml.Node
	if err := dec.Decode(&doc); err != nil {
		if err == io.EOF {
			return fail(0, "", "empty file; want keys such as contingency_percent: 5")
		}
		return fail(0, "", "malformed YAML: %v", strings.TrimPrefix(err.Error(), "yaml: "))
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); err != io.EOF {
		return fail(0, "", "more than one YAML document")
	}
	root := &doc
	if root.Kind == yaml.DocumentNode && len(root.Content) == 1 {
		root = root.Content[0]
	}
	if root.Kind != yaml.MappingNode {
		return fail(root.Line, "", "want a mapping of keys to numbers, such as contingency_percent: 5")
	}
	byName := map[string]policyKey{}
	for _, k := range policyKeys {
		byName[k.name] = k
	}
	seen := map[string]bool{}
	for i := 0; i+1 < len(root.Content); i += 2 {
		kn, vn := root.Content[i], root.Content[i+1]
		k, ok := byName[kn.Value]
		if !ok {
			names := make([]string, 0, len(policyKeys))
			for _, k := range policyKeys {
				names = append(names, k.name)
			}
			sort.Strings(names)
			return fail(kn.Line, kn.Value, "unknown key (known: %s)", strings.Join(names, ", "))
		}
		if seen[k.name] {
			return fail(kn.Line, k.name, "given twice")
		}
		seen[k.name] = true
		var v float64
		if vn.Kind != yaml.ScalarNode || vn.Decode(&v) != nil {
			return fail(vn.Line, k.name, "value %q is not a number", vn.Value)
		}
		if math.IsNaN(v) || math.IsInf(v, 0) || v < k.lo || v > k.hi {
			return fail(vn.Line, k.name, "value %v outside %g..%g", vn.Value, k.lo, k.hi)
		}
		*k.field(&p) = v
	}
	if p.TaxiKg < 0 && p.TaxiKg != -1 {
		return fail(0, "taxi_kg", "%g: want 0 or more, or -1 for taxi_minutes at ground idle", p.TaxiKg)
	}
	for _, k := range policyKeys {
		if !seen[k.name] {
			p.Defaulted = append(p.Defaulted, k.name)
		}
	}
	return p, nil
}

// check validates a policy built by hand with the same ranges as the file.
func (p *FuelPolicy) check() error {
	for _, k := range policyKeys {
		v := *k.field(p)
		if math.IsNaN(v) || math.IsInf(v, 0) || v < k.lo || v > k.hi {
			return &PolicyError{Source: p.Source, Key: k.name, Msg: fmt.Sprintf("value %v outside %g..%g", v, k.lo, k.hi)}
		}
	}
	if p.TaxiKg < 0 && p.TaxiKg != -1 {
		return &PolicyError{Source: p.Source, Key: "taxi_kg", Msg: fmt.Sprintf("%g: want 0 or more, or -1", p.TaxiKg)}
	}
	return nil
}
