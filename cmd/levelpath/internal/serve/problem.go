package serve

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strings"
	"sync"
	"time"

	"levelpath/optimizer"
	"levelpath/perf"
	"levelpath/route"
)

// planRequest is the body of POST /v1/plan and /v1/assess. Field names
// are the command line's flags in snake case; a pointer is a flag whose
// default applies when it is absent. Messages of refused values are the
// command line's exit-2 messages.
type planRequest struct {
	Flight string `json:"flight"`
	// Route is a file name in the data directory, the inline text form
	// ("lat,lon lat,lon ..."), or a GeoJSON object.
	Route        json.RawMessage `json:"route"`
	Aircraft     string          `json:"aircraft"`
	Mass         *float64        `json:"mass"`
	ZFW          float64         `json:"zfw"`
	Fuel         float64         `json:"fuel"`
	Weather      []string        `json:"weather"`
	Depart       string          `json:"depart"`
	CI           float64         `json:"ci"`
	Speed        *string         `json:"speed"`
	Floor        *float64        `json:"floor"`
	Levels       string          `json:"levels"`
	MaxSegNM     *float64        `json:"max_seg_nm"`
	MinFL        int             `json:"min_fl"`
	MaxFL        int             `json:"max_fl"`
	MaxStepFt    *int            `json:"max_step_ft"`
	StepDescents bool            `json:"step_descents"`
	MinStepNM    *float64        `json:"min_step_nm"`
	MaxSteps     int             `json:"max_steps"`
	NoSteps      bool            `json:"no_steps"`
	Block        []string        `json:"block"`
	Turbulence   string          `json:"turbulence"`
	MassBucketKg float64         `json:"mass_bucket_kg"`
	Date         string          `json:"date"`
	// Profile is the proposed profile (assess only).
	Profile string `json:"profile"`
	// Chart asks for the profile chart as SVG in the answer.
	Chart bool `json:"chart"`
}

// inputs are the resolved inputs of a request kept with its record.
type inputs struct {
	problem        *optimizer.Problem
	aircraftName   string
	aircraftDigest string
	weather        []string
	weatherDigests []string
	routeDigest    string   // SHA-256 of the route file, or "inline:" and that of the route as sent
	warnings       []string // from reading the route and dates
	fuelZFW        float64  // > 0: a fuel plan from this zero-fuel mass (zfw without mass or fuel)
}

// problem builds the optimizer problem as the command line's
// problemFlags.problem does, with the same checks in the same order and
// the same messages; names are resolved in the data directory.
func (s *Server) problem(req *planRequest) (*inputs, error) {
	in := &inputs{}
	a, digest, err := s.aircraft(req.Aircraft)
	if err != nil {
		return nil, err
	}
	in.aircraftName, in.aircraftDigest = a.Name, digest
	if len(req.Route) == 0 || string(req.Route) == "null" || string(req.Route) == `""` {
		return nil, fieldErr("route", "--route is required")
	}
	floor := optimizer.DefaultFloor
	if req.Floor != nil {
		floor = *req.Floor
	}
	p := &optimizer.Problem{Aircraft: a, CI: req.CI, Floor: floor, MinFL: req.MinFL, MaxFL: req.MaxFL, MassBucket: req.MassBucketKg}
	mass := 0.0
	if req.Mass != nil {
		mass = *req.Mass
		if !(mass > 0) {
			return nil, fieldErr("mass", "--mass %v: want a take-off mass in kg", mass)
		}
	}
	fuelZFW := 0.0
	if mass == 0 && req.ZFW > 0 && req.Fuel == 0 {
		// A fuel plan: the take-off mass is solved from the ZFW (as
		// levelpath plan --zfw does); the ZFW stands in until then.
		if req.ZFW > a.MZFW {
			return nil, fieldErr("zfw", "--zfw %.0f kg is over MZFW %.0f kg of %s", req.ZFW, a.MZFW, a.Name)
		}
		fuelZFW, mass = req.ZFW, req.ZFW
		in.fuelZFW = fuelZFW
	}
	if mass == 0 && (req.ZFW > 0) != (req.Fuel > 0) || mass == 0 && req.ZFW == 0 && req.Fuel == 0 {
		return nil, fieldErr("mass", "--mass (kg), --zfw alone (a fuel plan) or both --zfw and --fuel are required")
	}
	if err := optimizer.CheckFloor(floor); err != nil {
		return nil, fieldErr("floor", "--floor: %v", err)
	}
	if fuelZFW > 0 {
		if p.TakeoffMass, _, err = (optimizer.Loading{TakeoffMass: mass}).Resolve(a); err != nil {
			return nil, optimizerErr(err)
		}
		p.ZFW = fuelZFW
	} else if p.TakeoffMass, p.ZFW, err = (optimizer.Loading{TakeoffMass: mass, ZFW: req.ZFW, Fuel: req.Fuel}).Resolve(a); err != nil {
		return nil, optimizerErr(err)
	}
	if len(req.Weather) > 0 {
		ws, err := s.weather.get(req.Weather)
		if err != nil {
			return nil, fieldErr("weather", "%v", err)
		}
		p.Weather = ws.field
		in.weather, in.weatherDigests = ws.names, ws.digests
	}
	if req.Depart != "" {
		t, err := time.Parse(time.RFC3339, req.Depart)
		if err != nil {
			return nil, fieldErr("depart", "--depart %q: want RFC3339 such as 2026-12-01T22:00:00Z", req.Depart)
		}
		p.Depart = t
	} else if p.Weather == nil {
		p.Depart = time.Now().UTC().Truncate(time.Minute)
		p.Notes = append(p.Notes, "no --depart given: the current time "+p.Depart.Format(time.RFC3339)+" assumed")
	}
	speed := "econ"
	if req.Speed != nil {
		speed = *req.Speed
	}
	if p.Speed, err = optimizer.ParseSpeed(speed); err != nil {
		return nil, fieldErr("speed", "--speed: %v", err)
	}
	if p.Steps, err = stepRules(req); err != nil {
		return nil, err
	}
	for _, b := range req.Block {
		blk, err := parseBlock(b)
		if err != nil {
			return nil, err
		}
		p.Blocked = append(p.Blocked, blk)
	}
	if req.Turbulence != "" {
		if p.Turbulence, err = parseTurbulence(req.Turbulence); err != nil {
			return nil, err
		}
	}
	magDate := p.Depart
	if magDate.IsZero() {
		magDate = p.Weather.Times()[0]
	}
	if p.Track, err = s.track(req, magDate, in); err != nil {
		return nil, err
	}
	in.problem = p
	return in, nil
}

// aircraft resolves a built-in name or a YAML file in the data directory
// and returns it with a digest of its source (the file's SHA-256, or
// "builtin:NAME" for one compiled into this program version).
func (s *Server) aircraft(name string) (*perf.Aircraft, string, error) {
	if name == "" {
		return nil, "", fieldErr("aircraft", "--aircraft is required (built-in: %s, or a YAML file or a tables directory)", strings.Join(perf.BuiltinNames(), ", "))
	}
	for _, b := range perf.BuiltinNames() {
		if b == name {
			a, err := perf.Builtin(name)
			if err != nil {
				return nil, "", err
			}
			return a, "builtin:" + name, nil
		}
	}
	p, err := s.data.resolve(name)
	if err != nil {
		// Or a directory of operator tables.
		if tp, isDir, terr := s.data.resolveTables(name); isDir {
			p, err = tp, terr
		}
	}
	if err != nil {
		return nil, "", fieldErr("aircraft", "aircraft %v (built-in: %s)", err, strings.Join(perf.BuiltinNames(), ", "))
	}
	if st, err := os.Stat(p); err == nil && st.IsDir() {
		// Operator tables: digested as a set, and read once per digest.
		d, err := perf.TablesDigest(p)
		if err != nil {
			return nil, "", fieldErr("aircraft", "%s", strings.ReplaceAll(err.Error(), p, name))
		}
		if a := s.tables.get(p, d); a != nil {
			return a, d, nil
		}
		a, err := perf.Load(p)
		if err != nil {
			return nil, "", fieldErr("aircraft", "%s", strings.ReplaceAll(err.Error(), p, name))
		}
		s.tables.put(p, d, a)
		return a, d, nil
	}
	a, err := perf.Load(p)
	if err != nil {
		return nil, "", fieldErr("aircraft", "%s", strings.ReplaceAll(err.Error(), p, name))
	}
	d, err := fileDigest(p)
	if err != nil {
		return nil, "", err
	}
	return a, d, nil
}

// track reads the route (a name, inline text or GeoJSON) and segments it
// as the command line's buildTrack does.
func (s *Server) track(req *planRequest, depart time.Time, in *inputs) (*route.Track, error) {
	var r *route.Route
	var err error
	raw := bytes.TrimSpace(req.Route)
	sum := sha256.Sum256(raw)
	in.routeDigest = "inline:" + hex.EncodeToString(sum[:])
	switch raw[0] {
	case '{':
		r, err = route.ParseGeoJSON(raw, "inline GeoJSON")
	case '"':
		var text string
		if err := json.Unmarshal(raw, &text); err != nil {
			return nil, fieldErr("route", "route: %v", err)
		}
		if strings.Contains(text, ",") && !strings.ContainsAny(text, `/\`) && !strings.HasSuffix(strings.ToLower(text), "json") && !strings.HasSuffix(strings.ToLower(text), ".csv") {
			r, err = route.ParseInline(text)
		} else {
			p, rerr := s.data.resolve(text)
			if rerr != nil {
				return nil, fieldErr("route", "route %v", rerr)
			}
			if in.routeDigest, rerr = fileDigest(p); rerr != nil {
				return nil, rerr
			}
			r, err = route.Load(p)
			if err != nil {
				err = fmt.Errorf("%s", strings.ReplaceAll(err.Error(), p, text))
			}
		}
	default:
		return nil, fieldErr("route", "route: want a file name, inline \"lat,lon lat,lon ...\" text or a GeoJSON object")
	}
	if err != nil {
		return nil, fieldErr("route", "%v", err)
	}
	in.warnings = append(in.warnings, r.Warnings...)
	maxSeg := 50.0
	if req.MaxSegNM != nil {
		maxSeg = *req.MaxSegNM
	}
	if math.IsNaN(maxSeg) || maxSeg < 1 || maxSeg > 1000 {
		return nil, fieldErr("max_seg_nm", "--max-seg-nm %v: want 1..1000", maxSeg)
	}
	opt := route.Options{MaxSegment: maxSeg * perf.NMToM}
	if req.Levels != "" {
		rule, err := route.ParseLevelRule(req.Levels)
		if err != nil {
			return nil, fieldErr("levels", "--levels: %v", err)
		}
		opt.Levels = rule
	}
	switch {
	case req.Date != "":
		d, err := time.Parse("2006-01-02", req.Date)
		if err != nil {
			return nil, fieldErr("date", "--date %q: want YYYY-MM-DD", req.Date)
		}
		opt.Date = d
	case !depart.IsZero():
		opt.Date = depart
	}
	if !opt.Date.IsZero() {
		opt.Date = clampMagDate(opt.Date, in)
	}
	tr, err := route.Build(r, opt)
	if err != nil {
		return nil, fieldErr("route", "%v", err)
	}
	return tr, nil
}

// clampMagDate moves a date outside WMM2025's validity to the nearest
// valid one with a warning, as the command line does.
func clampMagDate(d time.Time, in *inputs) time.Time {
	from, until := route.WMMValidity()
	last := until.AddDate(0, 0, -1)
	day := func(t time.Time) string { return t.Format("2006-01-02") }
	switch {
	case d.Before(from):
		in.warnings = append(in.warnings, fmt.Sprintf("magnetic variation: %s is before WMM2025 (%s to %s); using %s", day(d), day(from), day(last), day(from)))
		return from
	case d.After(last):
		in.warnings = append(in.warnings, fmt.Sprintf("magnetic variation: %s is after WMM2025 (%s to %s); using %s", day(d), day(from), day(last), day(last)))
		return last
	}
	return d
}

// stepRules builds the step rules from the request (optimizer.NewStepRules,
// the command line's defaults), an error naming the field.
func stepRules(req *planRequest) (optimizer.StepRules, error) {
	maxStepFt, minStepNM := optimizer.DefaultMaxStepFt, float64(optimizer.DefaultMinStepNM)
	if req.MaxStepFt != nil {
		maxStepFt = *req.MaxStepFt
	}
	if req.MinStepNM != nil {
		minStepNM = *req.MinStepNM
	}
	r, err := optimizer.NewStepRules(maxStepFt, req.StepDescents, minStepNM, req.MaxSteps, req.NoSteps)
	if ie, ok := err.(*optimizer.InputError); ok {
		f := optimizerFields[ie.Field]
		return r, fieldErr(f, "--%s %s", strings.ReplaceAll(f, "_", "-"), ie.Msg)
	}
	return r, err
}

// parseBlock reads a block as the command line does.
func parseBlock(s string) (optimizer.Block, error) {
	b, err := optimizer.ParseBlock(s)
	if err != nil {
		return b, fieldErr("block", "--block %s", optimizer.InputMsg(err))
	}
	return b, nil
}

// parseTurbulence reads turbulence rules as the command line does.
func parseTurbulence(s string) ([]optimizer.TurbulenceRule, error) {
	r, err := optimizer.ParseTurbulence(s)
	if err != nil {
		return nil, fieldErr("turbulence", "--turbulence %s", optimizer.InputMsg(err))
	}
	return r, nil
}

// tablesCache keeps the table aircraft read from the data directory,
// keyed by directory and digest (a changed file is read again), at most
// maxCachedTables of them (the cache is emptied when full). An aircraft is
// read-only once loaded, so requests share it.
type tablesCache struct {
	mu sync.Mutex
	m  map[string]*perf.Aircraft
}

const maxCachedTables = 8

func (c *tablesCache) get(dir, digest string) *perf.Aircraft {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.m[dir+"\x00"+digest]
}

func (c *tablesCache) put(dir, digest string, a *perf.Aircraft) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.m == nil || len(c.m) >= maxCachedTables {
		c.m = map[string]*perf.Aircraft{}
	}
	c.m[dir+"\x00"+digest] = a
}
