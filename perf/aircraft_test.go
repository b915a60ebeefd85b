package perf

import (
	"errors"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

func TestBuiltins(t *testing.T) {
	names := BuiltinNames()
	if len(names) != 3 {
		t.Fatalf("BuiltinNames = %v", names)
	}
	for _, n := range names {
		a, err := Builtin(n)
		if err != nil {
			t.Fatalf("Builtin(%q): %v", n, err)
		}
		if a.Name != n || !strings.Contains(strings.ToLower(a.Description), "invented") {
			t.Errorf("%s: name %q, description %q must say invented", n, a.Name, a.Description)
		}
		b, err := Load(n)
		if err != nil || b.MTOW != a.MTOW {
			t.Errorf("Load(%q) = %v, %v", n, b, err)
		}
	}
}

func TestUnknownAircraftListsBuiltins(t *testing.T) {
	for _, f := range []func(string) (*Aircraft, error){Builtin, Load} {
		_, err := f("no-such-type")
		if err == nil {
			t.Fatal("want error for unknown aircraft")
		}
		for _, n := range BuiltinNames() {
			if !strings.Contains(err.Error(), n) {
				t.Errorf("error %q does not list %s", err, n)
			}
		}
	}
}

func TestLoadFile(t *testing.T) {
	src, err := builtinFS.ReadFile("aircraft/demo-narrowbody.yaml")
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "custom.yaml")
	if err := os.WriteFile(path, []byte(strings.Replace(string(src), "name: demo-narrowbody", "name: custom", 1)), 0o644); err != nil {
		t.Fatal(err)
	}
	a, err := Load(path)
	if err != nil || a.Name != "custom" {
		t.Fatalf("Load(%s) = %v, %v", path, a, err)
	}
	// Units: YAML trade units become SI (exact definitions of kt, ft, FL).
	if relErr(a.VMO, 340*1852.0/3600) > 1e-12 || relErr(a.CertifiedCeiling, 41000*0.3048) > 1e-12 || relErr(a.Engines.StaticThrust, 120e3) > 1e-12 {
		t.Errorf("units: VMO %g m/s, ceiling %g m, thrust %g N", a.VMO, a.CertifiedCeiling, a.Engines.StaticThrust)
	}
}

func TestCheckMass(t *testing.T) {
	a, _ := Builtin("demo-narrowbody")
	if err := a.CheckMass((a.OEW + a.MTOW) / 2); err != nil {
		t.Errorf("mid mass: %v", err)
	}
	for _, m := range []float64{a.OEW - 1, a.MTOW + 1, -5} {
		err := a.CheckMass(m)
		var re *RangeError
		if !errors.As(err, &re) {
			t.Fatalf("CheckMass(%g) = %v, want *RangeError", m, err)
		}
		msg := err.Error()
		for _, want := range []string{"mass", "42000", "78000"} {
			if !strings.Contains(msg, want) {
				t.Errorf("CheckMass(%g): %q lacks %q", m, msg, want)
			}
		}
	}
}

// Each validation failure names its field.
func TestParseValidation(t *testing.T) {
	base, err := builtinFS.ReadFile("aircraft/demo-narrowbody.yaml")
	if err != nil {
		t.Fatal(err)
	}
	// Value comments removed so the cases can name whole lines.
	src := regexp.MustCompile(` +#[^\n]*`).ReplaceAllString(string(base), "")
	tests := []struct {
		name, old, new, field string
	}{
		{"missing oew", "  oew_kg: 42000\n", "", "mass.oew_kg"},
		{"zero area", "area_m2: 128", "area_m2: 0", "wing.area_m2"},
		{"negative cd0", "cd0: 0.016", "cd0: -0.01", "drag.cd0"},
		{"negative thrust", "static_thrust_kn: 120", "static_thrust_kn: -120", "engines.static_thrust_kn"},
		{"zero engines", "count: 2", "count: 0", "engines.count"},
		{"mzfw below oew", "mzfw_kg: 62000", "mzfw_kg: 40000", "mass.mzfw_kg"},
		{"mtow below mzfw", "mtow_kg: 78000", "mtow_kg: 61000", "mass.mtow_kg"},
		{"mlw above mtow", "mlw_kg: 66000", "mlw_kg: 80000", "mass.mlw_kg"},
		{"missing mmo", "  mmo: 0.82\n", "", "limits.mmo"},
		{"missing name", "name: demo-narrowbody\n", "", "name"},
		{"renamed section", "engines:\n", "engines_gone:\n", "engines_gone"},
		{"missing section", "limits:\n  vmo_kt: 340\n  mmo: 0.82\n  ceiling_fl: 410\n", "", "limits"},
		{"unknown key", "  cd0: 0.016\n", "  cd0: 0.016\n  cdx: 1\n", "drag.cdx"},
		{"unknown top key", "name: demo-narrowbody\n", "name: demo-narrowbody\ncolour: red\n", "colour"},
		{"buffet mach not ascending", "  - [0.60, 0.978]", "  - [0.45, 0.978]", "buffet[2]"},
		{"buffet row width", "  - [0.60, 0.978]", "  - [0.60, 0.978, 1]", "buffet[2]"},
		{"buffet below mmo", "  - [0.82, 0.629]\n  - [0.84, 0.539]\n  - [0.86, 0.438]\n", "", "buffet"},
		{"schedule mach", "  mach: 0.78", "  mach: 1.2", "schedule.mach"},
		{"ceiling", "ceiling_fl: 410", "ceiling_fl: 4100", "limits.ceiling_fl"},
		// Issue 17: implausible, non-finite and non-integer values.
		{"infinite thrust", "static_thrust_kn: 120", "static_thrust_kn: 1e308", "engines.static_thrust_kn"},
		{"inf thrust", "static_thrust_kn: 120", "static_thrust_kn: .inf", "engines.static_thrust_kn"},
		{"nan cd0", "cd0: 0.016", "cd0: .nan", "drag.cd0"},
		{"huge mass", "mtow_kg: 78000", "mtow_kg: 1e12", "mass.mtow_kg"},
		{"huge wing", "area_m2: 128", "area_m2: 1e9", "wing.area_m2"},
		{"huge idle flow", "idle_fuel_flow_kg_h: 350", "idle_fuel_flow_kg_h: 1e7", "engines.idle_fuel_flow_kg_h"},
		{"fractional engines", "count: 2", "count: 2.5", "engines.count"},
		{"schedule mach above mmo", "  mach: 0.78", "  mach: 0.83", "schedule.mach"},
		{"schedule cas above vmo", "cas_kt: 300", "cas_kt: 350", "schedule.cas_kt"},
		{"low cas above vmo", "cas_low_kt: 250", "cas_low_kt: 345", "schedule.cas_low_kt"},
		{"nan flat rating", "flat_rating_lapse_per_k: 0.006", "flat_rating_lapse_per_k: .nan", "engines.flat_rating_lapse_per_k"},
		{"missing part power", "  part_power_coeff: 0.5\n", "", "engines.part_power_coeff"},
		{"nan k6", "k6: 0.03", "k6: .nan", "drag.k6"},
	}
	for _, tc := range tests {
		if !strings.Contains(src, tc.old) {
			t.Fatalf("%s: base file lacks %q", tc.name, tc.old)
		}
		data := strings.Replace(src, tc.old, tc.new, 1)
		_, err := Parse([]byte(data), "case.yaml")
		var fe *FieldError
		if !errors.As(err, &fe) {
			t.Errorf("%s: err = %v, want *FieldError", tc.name, err)
			continue
		}
		if fe.Field != tc.field || fe.Source != "case.yaml" {
			t.Errorf("%s: field %q source %q (%v), want %q", tc.name, fe.Field, fe.Source, err, tc.field)
		}
		if want := "case.yaml: field " + tc.field + ": "; !strings.HasPrefix(err.Error(), want) {
			t.Errorf("%s: message %q, want prefix %q", tc.name, err, want)
		}
	}
}

func TestParseShortBuffet(t *testing.T) {
	base, _ := builtinFS.ReadFile("aircraft/demo-narrowbody.yaml")
	src := string(base)
	before, _, _ := strings.Cut(src, "buffet:\n")
	data := before + "buffet:\n  - [0.5, 1.0]\n  - [0.9, 0.5]\n"
	_, err := Parse([]byte(data), "short.yaml")
	var fe *FieldError
	if !errors.As(err, &fe) || fe.Field != "buffet" || !strings.Contains(fe.Reason, "at least 3") {
		t.Errorf("short buffet table: %v", err)
	}
}

func TestParseMalformed(t *testing.T) {
	tests := []struct {
		name, data string
		line       int
	}{
		{"bad indentation", "name: x\nmass:\n  oew_kg: 1\n bad: [\n", 3},
		{"tab", "name: x\n\tmass: 1\n", 2},
		{"wrong type", "name: x\nmass:\n  oew_kg: heavy\n", 3},
		{"empty", "", 0},
	}
	for _, tc := range tests {
		_, err := Parse([]byte(tc.data), "bad.yaml")
		var fe *FormatError
		if !errors.As(err, &fe) {
			t.Errorf("%s: err = %v, want *FormatError", tc.name, err)
			continue
		}
		if fe.Source != "bad.yaml" || (tc.line > 0 && fe.Line != tc.line) {
			t.Errorf("%s: %v (line %d), want line %d", tc.name, err, fe.Line, tc.line)
		}
	}
}
