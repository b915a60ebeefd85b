package optimizer

import (
	"errors"
	"reflect"
	"strings"
	"testing"
)

// TestDefaultFuelPolicy: the default follows the basic scheme of ICAO
// Annex 6 Part I 4.3.6.3 as commonly applied (common practice): 5 % of
// trip, at least 5 min holding; 30 min final reserve at 1,500 ft.
func TestDefaultFuelPolicy(t *testing.T) {
	p := DefaultFuelPolicy()
	if p.ContingencyPct != 5 || p.ContingencyMinMinutes != 5 || p.FinalReserveMinutes != 30 || p.HoldingHeightFt != 1500 || p.HoldingSpeedKt != 0 {
		t.Errorf("default policy %+v", p)
	}
	q, err := ParseFuelPolicy([]byte("contingency_percent: 3\nextra_kg: 500\n"), "p.yaml")
	if err != nil {
		t.Fatal(err)
	}
	if q.ContingencyPct != 3 || q.ExtraKg != 500 || q.FinalReserveMinutes != 30 || len(q.Defaulted) != len(policyKeys)-2 {
		t.Errorf("parsed %+v", q)
	}
}

// TestFuelPolicyBadInput: each bad file is a *PolicyError naming the line
// and key.
func TestFuelPolicyBadInput(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"contingency_percent: 5\nreserve: 30\n", ":2: reserve: unknown key"},
		{"final_reserve_minutes: -1\n", ":1: final_reserve_minutes: value -1 outside"},
		{"contingency_percent: 120\n", ":1: contingency_percent: value 120 outside 0..100"},
		{"extra_kg: .nan\n", ":1: extra_kg: value .nan outside"},
		{"extra_kg: .inf\n", ":1: extra_kg: value .inf outside"},
		{"extra_kg: lots\n", ":1: extra_kg: value \"lots\" is not a number"},
		{"extra_kg: 1\nextra_kg: 2\n", ":2: extra_kg: given twice"},
		{"- 1\n- 2\n", ":1: want a mapping"},
		{"", "empty file"},
		{"a: [\n", "malformed YAML"},
		{"taxi_kg: -0.5\n", "taxi_kg"},
	} {
		_, err := ParseFuelPolicy([]byte(c.in), "p.yaml")
		var pe *PolicyError
		if !errors.As(err, &pe) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: %v, want a PolicyError containing %q", c.in, err, c.want)
		}
	}
}

// TestPolicyKeysRoundTrip: the documented keys with their defaults (the
// help text) form a policy file that reads back as the default policy.
func TestPolicyKeysRoundTrip(t *testing.T) {
	p, err := ParseFuelPolicy([]byte(strings.Join(PolicyKeys(), "\n")), "help")
	if err != nil {
		t.Fatal(err)
	}
	d := DefaultFuelPolicy()
	p.Source, p.Defaulted, d.Source, d.Defaulted = "", nil, "", nil
	if !reflect.DeepEqual(p, d) {
		t.Errorf("read back %+v, default %+v", p, d)
	}
}
