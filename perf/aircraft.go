package perf

import (
	"bytes"
	"embed"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"regexp"
	"slices"
	"strconv"
	"strings"

	"gopkg.in/yaml.v3"
)

// Aircraft is a performance model. All fields are SI. Build one with Load,
// Builtin or Parse, which validate it; a hand-built value must satisfy the
// same rules (see perf/aircraft/README.md) or results are meaningless.
type Aircraft struct {
	Name, Description string

	// Masses, kg.
	OEW, MZFW, MTOW, MLW, FuelCapacity float64

	// Wing and aerodynamics.
	WingArea       float64 // reference area S, m²
	Sweep          float64 // quarter-chord sweep Λ, radians
	ThicknessRatio float64 // mean streamwise thickness/chord t/c
	KornKappa      float64 // Korn airfoil technology factor κ (0.87 conventional, 0.95 supercritical)
	CD0, K         float64 // polar CD = CD0 + K CL² + K6 CL⁶ (+ compressibility)
	K6             float64 // lift-dependent drag rise coefficient, see dragCoeff

	Engines Engines

	VMO              float64 // maximum operating speed, CAS m/s
	MMO              float64 // maximum operating Mach
	CertifiedCeiling float64 // maximum certified pressure altitude, m

	// Buffet is the buffet-onset boundary at 1 g: CL against Mach, Mach
	// strictly ascending, linear between rows, flat beyond the ends.
	Buffet []BuffetPoint

	// Schedule is the climb and descent speed schedule from the file; the
	// zero value means none was given (see DefaultSchedule).
	Schedule Schedule

	// PerfFactorPct is the per-tail performance factor: every fuel flow
	// (cruise, climb, idle) is multiplied by 1 + PerfFactorPct/100. Files
	// never set it; see WithPerfFactor.
	PerfFactorPct float64

	// tab, when set (Tables.Aircraft), is the operator tables the
	// aircraft plans from in place of the model fields (tableperf.go).
	tab *Tables
}

// BuffetPoint is one row of the buffet-onset boundary.
type BuffetPoint struct {
	Mach, CL float64
}

// Engines describes the engines. Thrust at the max climb rating follows the
// high-bypass turbofan lapse of Mattingly, Heiser and Pratt (Aircraft Engine
// Design, 2nd ed., AIAA 2002, ch. 2; equation numbers not checked here),
// with per-aircraft coefficients in place of the generic 0.49, 3.0 and TR:
//
//	δ0 = (p/P0)(1+0.2M²)^3.5, θ0 = (T/T0)(1+0.2M²)
//	f  = 1 - LapseMach √M
//	α  = δ0 (f - max(LapseTheta (θ0-TR)/(1.5+M), f·min(FlatRatingLapse ΔT_eff, 0.4)))
//	ΔT_eff = ISA deviation - FlatRatingISADev (no loss when negative)
//	max climb thrust = Count StaticThrust ClimbRating α; max cruise = CruiseRatio × that
//
// The flat-rating term is the temperature correction of the maximum climb
// thrust in EUROCONTROL's Base of Aircraft Data, revision 3 (BADA 3 user
// manual, engine thrust model: T = T_ISA (1 - C_Tc5 ΔT_eff), ΔT_eff =
// ΔT - C_Tc4, 0 <= C_Tc5 ΔT_eff <= 0.4; recalled from memory, section
// number not checked here), FlatRatingISADev being C_Tc4 and
// FlatRatingLapse C_Tc5. It applies at every altitude, so a warm day lowers
// the thrust ceiling as flat-rated engines do; where Mattingly's θ0-break
// loss (hot, low and fast) is larger, that one applies instead, so the two
// temperature effects are not counted twice (our combination).
//
// Fuel flow is TSFC × thrust with
//
//	TSFC = (TSFCA + TSFCB M) √(T/T0) (1 + PartPower (τ/PartPowerBucket - 1)²)
//
// where τ = thrust / max climb thrust. The first factors are Mattingly's
// TSFC correlation (generic 0.4 and 0.45 in 1/h); the last is the
// part-power "bucket" of turbofan TSFC against thrust, lowest at the
// bucket setting and rising at lower and higher thrust (described from
// engine data by Bensel, "Characteristics of the Specific Fuel Consumption
// for Jet Engines", HAW Hamburg, 2018, doi:10.15488/4316; the quadratic
// about the bucket is our simplification, not that report's polynomial).
// Climb at max climb thrust has τ = 1. Idle thrust and idle fuel flow are
// separate (IdleFraction, IdleFuelFlow).
type Engines struct {
	Count            int
	StaticThrust     float64 // sea-level static thrust per engine, N
	LapseMach        float64 // Mattingly's 0.49
	LapseTheta       float64 // Mattingly's 3.0
	ThrottleRatio    float64 // θ0 break (TR), Mattingly 1.0-1.1
	FlatRatingISADev float64 // BADA C_Tc4: ISA deviation (K) above which max climb thrust falls
	FlatRatingLapse  float64 // BADA C_Tc5: fraction of thrust lost per K above FlatRatingISADev
	TSFCA, TSFCB     float64 // TSFC = (A + B M) √θ at the bucket, kg/(N s)
	PartPower        float64 // TSFC rise coefficient of the part-power bucket
	PartPowerBucket  float64 // thrust / max climb thrust of least TSFC
	ClimbRating      float64 // max climb thrust as a fraction of the lapse curve
	CruiseRatio      float64 // max cruise / max climb thrust
	IdleFraction     float64 // idle thrust / max climb thrust
	IdleFuelFlow     float64 // idle fuel flow per engine at sea-level static, kg/s; scaled by δ0 √θ0
}

//go:embed aircraft/*.yaml
var builtinFS embed.FS

// builtinNames in ascending size; each has aircraft/NAME.yaml.
var builtinNames = []string{"demo-regional", "demo-narrowbody", "demo-widebody"}

// BuiltinNames returns the names of the built-in (invented) aircraft.
func BuiltinNames() []string { return append([]string(nil), builtinNames...) }

// Builtin returns a fresh copy of the built-in aircraft called name. The
// error for an unknown name lists the built-in names.
func Builtin(name string) (*Aircraft, error) {
	if !slices.Contains(builtinNames, name) {
		return nil, fmt.Errorf("perf: unknown aircraft %q (built-in: %s)", name, strings.Join(builtinNames, ", "))
	}
	data, err := builtinFS.ReadFile("aircraft/" + name + ".yaml")
	if err != nil {
		return nil, err
	}
	return Parse(data, name)
}

// maxFileSize bounds an aircraft file read by Load.
const maxFileSize = 1 << 20

// Load returns the built-in aircraft called nameOrPath, or else reads the
// YAML file at that path. A directory is read as operator tables
// (LoadTables) and planned from (Tables.Aircraft); a version 1 table set
// gives an *UnsupportedError naming the tables planning needs.
func Load(nameOrPath string) (*Aircraft, error) {
	if slices.Contains(builtinNames, nameOrPath) {
		return Builtin(nameOrPath)
	}
	fi, err := os.Stat(nameOrPath)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, fmt.Errorf("perf: unknown aircraft %q: not a built-in (%s) and no such file", nameOrPath, strings.Join(builtinNames, ", "))
		}
		return nil, fmt.Errorf("perf: aircraft %q: %w", nameOrPath, err)
	}
	if fi.IsDir() {
		// Operator tables (format in aircraft/TABLES.md).
		t, err := LoadTables(nameOrPath)
		if err != nil {
			return nil, err
		}
		return t.Aircraft()
	}
	if m := fi.Mode(); !m.IsRegular() {
		// A FIFO would block the read and a device never end.
		kind := "a device or socket"
		if m&os.ModeNamedPipe != 0 {
			kind = "a named pipe (FIFO)"
		}
		return nil, fmt.Errorf("perf: aircraft %q is %s, not a regular file: want a YAML file or a tables directory", nameOrPath, kind)
	}
	if fi.Size() > maxFileSize {
		return nil, &FormatError{Source: nameOrPath, Reason: fmt.Sprintf("file is %d bytes, more than the %d allowed", fi.Size(), maxFileSize)}
	}
	data, err := os.ReadFile(nameOrPath)
	if err != nil {
		return nil, fmt.Errorf("perf: aircraft %q: %w", nameOrPath, err)
	}
	return Parse(data, nameOrPath)
}

// The YAML schema (documented in aircraft/README.md). Pointers tell a
// missing field from a zero one.
type yamlAircraft struct {
	Name        *string       `yaml:"name"`
	Description string        `yaml:"description"`
	Mass        *yamlMass     `yaml:"mass"`
	Wing        *yamlWing     `yaml:"wing"`
	Drag        *yamlDrag     `yaml:"drag"`
	Engines     *yamlEngines  `yaml:"engines"`
	Limits      *yamlLimits   `yaml:"limits"`
	Schedule    *yamlSchedule `yaml:"schedule"`
	Buffet      [][]float64   `yaml:"buffet"`
}

type yamlMass struct {
	OEW          *float64 `yaml:"oew_kg"`
	MZFW         *float64 `yaml:"mzfw_kg"`
	MTOW         *float64 `yaml:"mtow_kg"`
	MLW          *float64 `yaml:"mlw_kg"`
	FuelCapacity *float64 `yaml:"fuel_capacity_kg"`
}

type yamlWing struct {
	Area           *float64 `yaml:"area_m2"`
	Sweep          *float64 `yaml:"sweep_deg"`
	ThicknessRatio *float64 `yaml:"thickness_ratio"`
	KornKappa      *float64 `yaml:"korn_kappa"`
}

type yamlDrag struct {
	CD0 *float64 `yaml:"cd0"`
	K   *float64 `yaml:"k"`
	K6  *float64 `yaml:"k6"`
}

type yamlEngines struct {
	Count         *float64 `yaml:"count"`
	StaticThrust  *float64 `yaml:"static_thrust_kn"`
	LapseMach     *float64 `yaml:"lapse_mach"`
	LapseTheta    *float64 `yaml:"lapse_theta"`
	ThrottleRatio *float64 `yaml:"throttle_ratio"`
	FlatISADev    *float64 `yaml:"flat_rating_isa_dev_k"`
	FlatLapse     *float64 `yaml:"flat_rating_lapse_per_k"`
	TSFCA         *float64 `yaml:"tsfc_a_per_h"`
	TSFCB         *float64 `yaml:"tsfc_b_per_h"`
	PartPower     *float64 `yaml:"part_power_coeff"`
	PartBucket    *float64 `yaml:"part_power_bucket"`
	ClimbRating   *float64 `yaml:"climb_rating"`
	CruiseRatio   *float64 `yaml:"cruise_ratio"`
	IdleFraction  *float64 `yaml:"idle_thrust_fraction"`
	IdleFuelFlow  *float64 `yaml:"idle_fuel_flow_kg_h"`
}

type yamlLimits struct {
	VMO     *float64 `yaml:"vmo_kt"`
	MMO     *float64 `yaml:"mmo"`
	Ceiling *float64 `yaml:"ceiling_fl"`
}

type yamlSchedule struct {
	CASLow *float64 `yaml:"cas_low_kt"`
	CAS    *float64 `yaml:"cas_kt"`
	Mach   *float64 `yaml:"mach"`
}

// sectionOf maps the Go type named in yaml.v3's unknown-field messages to
// the YAML section, so the error names the dotted path.
var sectionOf = map[string]string{
	"perf.yamlAircraft": "", "perf.yamlMass": "mass.", "perf.yamlWing": "wing.",
	"perf.yamlDrag": "drag.", "perf.yamlEngines": "engines.", "perf.yamlLimits": "limits.",
	"perf.yamlSchedule": "schedule.",
}

var (
	reLine    = regexp.MustCompile(`line (\d+)`)
	reUnknown = regexp.MustCompile(`line (\d+): field (\S+) not found in type (\S+)`)
)

// Parse reads an aircraft from YAML (strict: unknown keys are errors) and
// validates it. source names the input in errors. Errors are *FormatError
// for unreadable YAML and *FieldError naming the field otherwise.
func Parse(data []byte, source string) (*Aircraft, error) {
	if len(data) > maxFileSize {
		return nil, &FormatError{Source: source, Reason: fmt.Sprintf("%d bytes, more than the %d allowed", len(data), maxFileSize)}
	}
	dec := yaml.NewDecoder(bytes.NewReader(data))
	dec.KnownFields(true)
	var y yamlAircraft
	if err := dec.Decode(&y); err != nil {
		return nil, yamlError(err, source)
	}
	var extra yaml.Node
	if err := dec.Decode(&extra); err != io.EOF {
		return nil, &FormatError{Source: source, Reason: "more than one YAML document"}
	}
	return y.build(source)
}

func yamlError(err error, source string) error {
	if err == io.EOF {
		return &FormatError{Source: source, Reason: "empty document"}
	}
	msg := strings.TrimPrefix(err.Error(), "yaml: ")
	var te *yaml.TypeError
	if errors.As(err, &te) && len(te.Errors) > 0 {
		msg = te.Errors[0]
		if m := reUnknown.FindStringSubmatch(msg); m != nil {
			return &FieldError{Source: source, Field: sectionOf[m[3]] + m[2], Reason: "unknown field (line " + m[1] + ")"}
		}
	}
	line := lineOf(msg)
	return &FormatError{Source: source, Line: line, Reason: strings.TrimPrefix(msg, "line "+strconv.Itoa(line)+": ")}
}

func lineOf(msg string) int {
	if m := reLine.FindStringSubmatch(msg); m != nil {
		n, _ := strconv.Atoi(m[1])
		return n
	}
	return 0
}

// fieldReader collects the first validation failure.
type fieldReader struct {
	source string
	err    error
}

func (r *fieldReader) fail(field, format string, args ...any) {
	if r.err == nil {
		r.err = &FieldError{Source: r.source, Field: field, Reason: fmt.Sprintf(format, args...)}
	}
}

// num returns *v, requiring it present, finite and within [lo, hi]
// (exclusive at lo when openLo is true).
func (r *fieldReader) num(field string, v *float64, lo, hi float64, openLo bool) float64 {
	if v == nil {
		r.fail(field, "missing")
		return 0
	}
	x := *v
	switch {
	case math.IsNaN(x) || math.IsInf(x, 0):
		r.fail(field, "%v is not a finite number", x)
	case openLo && x <= lo && lo == 0:
		r.fail(field, "%g must be positive", x)
	case openLo && x <= lo, !openLo && x < lo, x > hi:
		r.fail(field, "%g outside the accepted range %g..%g", x, lo, hi)
	}
	return x
}

func (y *yamlAircraft) build(source string) (*Aircraft, error) {
	r := &fieldReader{source: source}
	a := &Aircraft{Description: strings.TrimSpace(y.Description)}
	if y.Name == nil || strings.TrimSpace(*y.Name) == "" {
		r.fail("name", "missing")
	} else {
		a.Name = strings.TrimSpace(*y.Name)
	}
	// Upper bounds are plausibility limits well beyond any transport
	// aircraft (largest MTOW about 640 t, static thrust about 500 kN, wing
	// about 850 m²; from memory), so a typo or an infinite value is refused.
	const maxMass, maxArea, maxThrustKN, maxIdleKgH = 1e6, 1500, 1000, 5000
	if y.Mass == nil {
		r.fail("mass", "missing")
	} else {
		m := y.Mass
		a.OEW = r.num("mass.oew_kg", m.OEW, 0, maxMass, true)
		a.MZFW = r.num("mass.mzfw_kg", m.MZFW, 0, maxMass, true)
		a.MTOW = r.num("mass.mtow_kg", m.MTOW, 0, maxMass, true)
		a.MLW = r.num("mass.mlw_kg", m.MLW, 0, maxMass, true)
		a.FuelCapacity = r.num("mass.fuel_capacity_kg", m.FuelCapacity, 0, maxMass, true)
		if r.err == nil {
			switch {
			case a.MZFW < a.OEW:
				r.fail("mass.mzfw_kg", "%g kg is below mass.oew_kg %g kg", a.MZFW, a.OEW)
			case a.MTOW < a.MZFW:
				r.fail("mass.mtow_kg", "%g kg is below mass.mzfw_kg %g kg", a.MTOW, a.MZFW)
			case a.MLW > a.MTOW:
				r.fail("mass.mlw_kg", "%g kg is above mass.mtow_kg %g kg", a.MLW, a.MTOW)
			case a.MLW < a.OEW:
				r.fail("mass.mlw_kg", "%g kg is below mass.oew_kg %g kg", a.MLW, a.OEW)
			}
		}
	}
	if y.Wing == nil {
		r.fail("wing", "missing")
	} else {
		w := y.Wing
		a.WingArea = r.num("wing.area_m2", w.Area, 0, maxArea, true)
		a.Sweep = r.num("wing.sweep_deg", w.Sweep, 0, 60, false) * math.Pi / 180
		a.ThicknessRatio = r.num("wing.thickness_ratio", w.ThicknessRatio, 0, 0.25, true)
		a.KornKappa = r.num("wing.korn_kappa", w.KornKappa, 0.8, 1.0, false)
	}
	if y.Drag == nil {
		r.fail("drag", "missing")
	} else {
		a.CD0 = r.num("drag.cd0", y.Drag.CD0, 0, 0.1, true)
		a.K = r.num("drag.k", y.Drag.K, 0, 0.5, true)
		a.K6 = r.num("drag.k6", y.Drag.K6, 0, 1, false)
	}
	if y.Engines == nil {
		r.fail("engines", "missing")
	} else {
		e := y.Engines
		if c := r.num("engines.count", e.Count, 1, 8, false); r.err == nil {
			if c != math.Trunc(c) {
				r.fail("engines.count", "%g is not a whole number", c)
			}
			a.Engines.Count = int(c)
		}
		tsfc := 1 / (3600 * G0) // 1/h (kg per kgf per hour) -> kg/(N s)
		a.Engines.StaticThrust = 1000 * r.num("engines.static_thrust_kn", e.StaticThrust, 0, maxThrustKN, true)
		a.Engines.LapseMach = r.num("engines.lapse_mach", e.LapseMach, 0, 1, false)
		a.Engines.LapseTheta = r.num("engines.lapse_theta", e.LapseTheta, 0, 10, false)
		a.Engines.ThrottleRatio = r.num("engines.throttle_ratio", e.ThrottleRatio, 0.5, 1.5, false)
		a.Engines.FlatRatingISADev = r.num("engines.flat_rating_isa_dev_k", e.FlatISADev, -30, 50, false)
		a.Engines.FlatRatingLapse = r.num("engines.flat_rating_lapse_per_k", e.FlatLapse, 0, 0.05, false)
		a.Engines.TSFCA = tsfc * r.num("engines.tsfc_a_per_h", e.TSFCA, 0, 2, false)
		a.Engines.TSFCB = tsfc * r.num("engines.tsfc_b_per_h", e.TSFCB, 0, 2, false)
		a.Engines.PartPower = r.num("engines.part_power_coeff", e.PartPower, 0, 5, false)
		a.Engines.PartPowerBucket = r.num("engines.part_power_bucket", e.PartBucket, 0.3, 1.2, false)
		a.Engines.ClimbRating = r.num("engines.climb_rating", e.ClimbRating, 0, 1, true)
		a.Engines.CruiseRatio = r.num("engines.cruise_ratio", e.CruiseRatio, 0, 1, true)
		a.Engines.IdleFraction = r.num("engines.idle_thrust_fraction", e.IdleFraction, 0, 0.5, false)
		a.Engines.IdleFuelFlow = r.num("engines.idle_fuel_flow_kg_h", e.IdleFuelFlow, 0, maxIdleKgH, true) / 3600
		if r.err == nil && a.Engines.TSFCA+a.Engines.TSFCB <= 0 {
			r.fail("engines.tsfc_a_per_h", "TSFC must be positive")
		}
	}
	if y.Limits == nil {
		r.fail("limits", "missing")
	} else {
		a.VMO = KtToMS * r.num("limits.vmo_kt", y.Limits.VMO, 0, 600, true)
		a.MMO = r.num("limits.mmo", y.Limits.MMO, 0, 0.99, true)
		a.CertifiedCeiling = 100 * FtToM * r.num("limits.ceiling_fl", y.Limits.Ceiling, 100, 600, false)
	}
	if s := y.Schedule; s != nil {
		casLow := r.num("schedule.cas_low_kt", s.CASLow, 0, 600, true)
		cas := r.num("schedule.cas_kt", s.CAS, 0, 600, true)
		mach := r.num("schedule.mach", s.Mach, 0, 0.99, true)
		// A schedule may not exceed the limits (VMO, MMO) given above.
		if r.err == nil {
			vmo, mmo := *y.Limits.VMO, *y.Limits.MMO
			switch {
			case casLow > vmo:
				r.fail("schedule.cas_low_kt", "%g kt is above limits.vmo_kt %g kt", casLow, vmo)
			case cas > vmo:
				r.fail("schedule.cas_kt", "%g kt is above limits.vmo_kt %g kt", cas, vmo)
			case mach > mmo:
				r.fail("schedule.mach", "%g is above limits.mmo %g", mach, mmo)
			}
		}
		a.Schedule = Schedule{CASLow: KtToMS * casLow, CAS: KtToMS * cas, Mach: mach}
	}
	a.Buffet = r.buffet(y.Buffet, a.MMO)
	if r.err != nil {
		return nil, r.err
	}
	return a, nil
}

// buffet validates the buffet table: at least 3 rows of [Mach, CL], Mach
// strictly ascending in (0, 1), CL positive, reaching at least MMO, and
// M²·CL (the buffet lift per unit pressure) rising to a single peak and
// then falling, which BuffetMachs relies on.
func (r *fieldReader) buffet(rows [][]float64, mmo float64) []BuffetPoint {
	if rows == nil {
		r.fail("buffet", "missing")
		return nil
	}
	if len(rows) < 3 {
		r.fail("buffet", "%d rows, at least 3 needed", len(rows))
		return nil
	}
	if len(rows) > 200 {
		r.fail("buffet", "%d rows, at most 200 accepted", len(rows))
		return nil
	}
	out := make([]BuffetPoint, len(rows))
	falling := false
	for i, row := range rows {
		f := fmt.Sprintf("buffet[%d]", i)
		if len(row) != 2 {
			r.fail(f, "want [mach, cl], got %d values", len(row))
			return nil
		}
		m, cl := row[0], row[1]
		if !(m >= machSearchMin && m < 1) {
			r.fail(f, "Mach %g outside %g..1", m, machSearchMin)
			return nil
		}
		if !(cl > 0 && cl < 3) {
			r.fail(f, "CL %g outside 0..3", cl)
			return nil
		}
		if i > 0 {
			if m <= out[i-1].Mach {
				r.fail(f, "Mach %g not above the previous row's %g (Mach must ascend)", m, out[i-1].Mach)
				return nil
			}
			h0, h1 := out[i-1].Mach*out[i-1].Mach*out[i-1].CL, m*m*cl
			if h1 < h0 {
				falling = true
			} else if falling && h1 > h0 {
				r.fail(f, "buffet lift M²·CL rises again after falling (boundary must have one peak)")
				return nil
			}
		}
		out[i] = BuffetPoint{m, cl}
	}
	if last := out[len(out)-1].Mach; mmo > 0 && last < mmo {
		r.fail("buffet", "last Mach %g is below limits.mmo %g (table must reach MMO)", last, mmo)
		return nil
	}
	return out
}

// CheckMass returns a *RangeError if m (kg) is not within OEW..MTOW.
func (a *Aircraft) CheckMass(m float64) error {
	if !(m >= a.OEW && m <= a.MTOW) {
		return &RangeError{Quantity: "mass", Value: m, Min: a.OEW, Max: a.MTOW, Unit: "kg", Aircraft: a.Name}
	}
	return nil
}

// checkISADev returns a *RangeError unless |isaDev| <= 100 K.
func (a *Aircraft) checkISADev(isaDev float64) error {
	if !(math.Abs(isaDev) <= 100) {
		return &RangeError{Quantity: "ISA deviation", Value: isaDev, Min: -100, Max: 100, Unit: "K", Aircraft: a.Name}
	}
	return nil
}

// DefaultSchedule returns the aircraft's climb/descent speed schedule: the
// file's, or else 250 kt below 10,000 ft (capped at VMO), then the lesser
// of 300 kt and VMO - 30 kt, then MMO - 0.04.
func DefaultSchedule(a *Aircraft) Schedule {
	if a.Schedule != (Schedule{}) {
		return a.Schedule
	}
	return Schedule{
		CASLow: math.Min(250*KtToMS, a.VMO),
		CAS:    math.Min(300*KtToMS, a.VMO-30*KtToMS),
		Mach:   a.MMO - 0.04,
	}
}

// Accepted range of the performance factor, percent. Per-tail factors of
// in-service aircraft are a few percent (from memory); the bounds refuse a
// typo (a fraction for a percent, a sign slip of a large number).
const (
	MinPerfFactorPct = -20.0
	MaxPerfFactorPct = 30.0
)

// WithPerfFactor returns a copy of a whose fuel flows (cruise, climb and
// idle) are all multiplied by 1 + pct/100, the per-tail performance factor
// operators apply for engine and airframe deterioration. The factor
// replaces any factor a already has (it does not compound). It returns a
// *RangeError for pct outside MinPerfFactorPct..MaxPerfFactorPct or not
// finite. Thrust, drag and speeds are unchanged, so levels and Mach limits
// are too; optimum speeds with a cost index shift because fuel weighs more
// against time.
func (a *Aircraft) WithPerfFactor(pct float64) (*Aircraft, error) {
	if !(pct >= MinPerfFactorPct && pct <= MaxPerfFactorPct) {
		return nil, &RangeError{Quantity: "performance factor", Value: pct, Min: MinPerfFactorPct, Max: MaxPerfFactorPct, Unit: "%", Aircraft: a.Name}
	}
	b := *a
	b.PerfFactorPct = pct
	return &b, nil
}
