package serve

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"net/http"
	"strconv"
	"strings"
	"time"
	"unicode"

	"levelpath/cmd/levelpath/internal/chart"
	"levelpath/optimizer"
	"levelpath/optimizer/planjson"
	"levelpath/perf"
	"levelpath/route"
)

// planAnswer is the body of a plan or assessment answer; everything but
// the id is stored as the record's output.
type planAnswer struct {
	ID       int64         `json:"id"`
	Plan     *planjson.Doc `json:"plan"`
	ChartSVG string        `json:"chart_svg,omitempty"`
	Record   *recordInputs `json:"record"`
}

// recordInputs are the stored inputs shown with an answer.
type recordInputs struct {
	Aircraft       string   `json:"aircraft"`
	AircraftDigest string   `json:"aircraft_digest"`
	Weather        []string `json:"weather"`
	WeatherDigests []string `json:"weather_digests"`
	RouteDigest    string   `json:"route_digest"`
	Version        string   `json:"program_version"`
}

// planBody extends the plan request with plan-only fields.
type planBody struct {
	planRequest
	Alternatives int `json:"alternatives"`
}

func (s *Server) plan(w http.ResponseWriter, r *http.Request) error {
	return s.priced(w, r, "plan")
}

func (s *Server) assess(w http.ResponseWriter, r *http.Request) error {
	return s.priced(w, r, "assess")
}

// priced answers /v1/plan and /v1/assess: decode, check, compute in a
// slot, store, answer. Nothing is stored for a refused request.
func (s *Server) priced(w http.ResponseWriter, r *http.Request, kind string) error {
	raw, err := readBody(w, r, s.cfg.BodyLimit)
	if err != nil {
		return err
	}
	var body planBody
	var req *planRequest
	if kind == "plan" {
		err, req = decodeJSON(raw, &body), &body.planRequest
		if err == nil && (body.Alternatives < 0 || body.Alternatives > 20) {
			err = fieldErr("alternatives", "--alternatives %d: want 0..20", body.Alternatives)
		}
	} else {
		req = &planRequest{}
		err = decodeJSON(raw, req)
	}
	if err != nil {
		return err
	}
	if err := checkFlight(req.Flight); err != nil {
		return err
	}
	var prof optimizer.Profile
	if kind == "assess" {
		if req.Profile == "" {
			return fieldErr("profile", "--profile is required, e.g. FL350,FL370@1250,FL390@2900")
		}
		if prof, err = optimizer.ParseProfile(req.Profile); err != nil {
			return fieldErr("profile", "--profile: %v", err)
		}
	} else if req.Profile != "" {
		return fieldErr("profile", "profile is for /v1/assess; a plan chooses its own profile")
	}
	type result struct {
		in   *inputs
		plan *optimizer.Plan
		svg  string
	}
	res, err := compute(s, r.Context(), func(ctx context.Context) (result, error) {
		in, err := s.problem(req)
		if err != nil {
			return result{}, err
		}
		pr := in.problem
		pr.LegCeilings = true
		var plan *optimizer.Plan
		if kind == "assess" && in.fuelZFW > 0 {
			return result{}, fieldErr("mass", "assess prices a given loading: give mass, or zfw with fuel")
		}
		if kind == "assess" {
			plan, err = optimizer.AssessContext(ctx, pr, prof)
		} else if in.fuelZFW > 0 {
			// The dispatch fuel plan under the default policy (ICAO
			// Annex 6 Part I 4.3.6.3 components), the final reserve held
			// over the destination.
			plan, err = optimizer.PlanFuel(optimizer.FuelRequest{Problem: pr, ZFW: in.fuelZFW, Policy: optimizer.DefaultFuelPolicy()})
		} else {
			plan, err = optimizer.SolveContext(ctx, pr)
			if err == nil && body.Alternatives > 0 {
				plan.Alternatives, err = optimizer.AlternativesContext(ctx, pr, plan, body.Alternatives)
				if err == nil && len(plan.Alternatives) < body.Alternatives {
					plan.Warnings = append(plan.Warnings, fmt.Sprintf("%d alternative profile(s) found of the %d asked for", len(plan.Alternatives), body.Alternatives))
				}
			}
		}
		if err != nil {
			return result{}, optimizerErr(err)
		}
		svg := ""
		if req.Chart {
			var buf bytes.Buffer
			if err := chart.Profile(&buf, "svg", chart.ProfileFor(plan, pr)); err != nil {
				return result{}, err
			}
			svg = buf.String()
		}
		return result{in, plan, svg}, nil
	})
	if err != nil {
		return err
	}
	doc := planjson.FromPlan(res.plan, kind == "assess")
	doc.Warnings = append(append([]string{}, res.in.warnings...), doc.Warnings...)
	ans := planAnswer{Plan: doc, ChartSVG: res.svg, Record: &recordInputs{Aircraft: res.in.aircraftName, AircraftDigest: res.in.aircraftDigest,
		Weather: nonNil(res.in.weather), WeatherDigests: nonNil(res.in.weatherDigests), RouteDigest: res.in.routeDigest, Version: s.cfg.Version}}
	out, err := json.Marshal(struct {
		Plan     *planjson.Doc `json:"plan"`
		ChartSVG string        `json:"chart_svg,omitempty"`
	}{ans.Plan, ans.ChartSVG})
	if err != nil {
		return err
	}
	who, _ := r.Context().Value(ctxKey{}).(string)
	rec := &Record{Kind: kind, Flight: req.Flight, CreatedAt: time.Now().UTC().Format(time.RFC3339Nano), Token: who, Version: s.cfg.Version,
		Aircraft: res.in.aircraftName, AircraftDigest: res.in.aircraftDigest, Weather: res.in.weather, WeatherDigests: res.in.weatherDigests,
		RouteDigest: res.in.routeDigest, Request: compactJSON(raw), Output: out}
	// The record is written even if the client has gone: the plan was
	// produced. A context without the request's deadline is used.
	if ans.ID, err = s.store.add(context.WithoutCancel(r.Context()), rec); err != nil {
		return fmt.Errorf("storing the record: %w", err)
	}
	s.met.add(func(m *metrics) { m.records[kind]++ })
	s.log.Printf("%s %d: flight %q, token %q, %s", kind, ans.ID, req.Flight, who, doc.Profile)
	writeJSON(w, http.StatusOK, ans)
	return nil
}

// compactJSON returns the body compacted (it was decoded, so it is valid).
func compactJSON(raw []byte) json.RawMessage {
	var b bytes.Buffer
	if err := json.Compact(&b, raw); err != nil {
		return raw
	}
	return b.Bytes()
}

// checkFlight accepts an empty flight or up to 32 letters, digits and
// "-_/.".
func checkFlight(f string) error {
	if len(f) > 32 {
		return fieldErr("flight", "flight %q: at most 32 characters", f)
	}
	for _, c := range f {
		if !(unicode.IsLetter(c) || unicode.IsDigit(c) || strings.ContainsRune("-_/.", c)) || c > unicode.MaxASCII {
			return fieldErr("flight", "flight %q: letters, digits and - _ / . only", f)
		}
	}
	return nil
}

func (s *Server) plans(w http.ResponseWriter, r *http.Request) error {
	q := r.URL.Query()
	for k := range q {
		if k != "flight" && k != "limit" {
			return fieldErr(k, "unknown query parameter %q", k)
		}
	}
	flight := q.Get("flight")
	if flight == "" {
		return fieldErr("flight", "flight is required, e.g. /v1/plans?flight=DEMO101")
	}
	if err := checkFlight(flight); err != nil {
		return err
	}
	limit := 50
	if v := q.Get("limit"); v != "" {
		n, err := strconv.Atoi(v)
		if err != nil || n < 1 || n > 1000 {
			return fieldErr("limit", "limit %q: want 1..1000", v)
		}
		limit = n
	}
	h, err := s.store.history(r.Context(), flight, limit)
	if err != nil {
		return err
	}
	writeJSON(w, http.StatusOK, map[string]any{"flight": flight, "records": h})
	return nil
}

func (s *Server) planByID(w http.ResponseWriter, r *http.Request) error {
	id, err := strconv.ParseInt(r.PathValue("id"), 10, 64)
	if err != nil || id < 1 {
		return fieldErr("id", "record id %q: want a positive integer", r.PathValue("id"))
	}
	rec, err := s.store.get(r.Context(), id)
	if errors.Is(err, errNoRecord) {
		return &apiError{Status: http.StatusNotFound, Msg: fmt.Sprintf("no record %d", id), Field: "id"}
	}
	if err != nil {
		return err
	}
	writeJSON(w, http.StatusOK, rec)
	return nil
}

// envelopeRequest is the body of POST /v1/envelope (the envelope
// command's flags).
type envelopeRequest struct {
	Aircraft string   `json:"aircraft"`
	Mass     *float64 `json:"mass"`
	ISADev   float64  `json:"isa_dev"`
	Floor    *float64 `json:"floor"`
	Chart    bool     `json:"chart"`
}

func (s *Server) envelope(w http.ResponseWriter, r *http.Request) error {
	raw, err := readBody(w, r, s.cfg.BodyLimit)
	if err != nil {
		return err
	}
	var req envelopeRequest
	if err := decodeJSON(raw, &req); err != nil {
		return err
	}
	a, _, err := s.aircraft(req.Aircraft)
	if err != nil {
		return err
	}
	if req.Mass == nil {
		return fieldErr("mass", "--mass is required (kg, between OEW %.0f and MTOW %.0f)", a.OEW, a.MTOW)
	}
	floor := optimizer.DefaultFloor
	if req.Floor != nil {
		floor = *req.Floor
	}
	if floor < 1 {
		return fieldErr("floor", "--floor %v: the protection floor must be at least 1.0 g", floor)
	}
	if req.ISADev != req.ISADev || req.ISADev < -60 || req.ISADev > 60 {
		return fieldErr("isa_dev", "--isa-dev %v: want -60..60 °C", req.ISADev)
	}
	type result struct {
		e   perf.Envelope
		svg string
	}
	res, err := compute(s, r.Context(), func(context.Context) (result, error) {
		e, err := a.Envelope(*req.Mass, req.ISADev, floor)
		if err != nil {
			return result{}, fieldErr("mass", "%v", err)
		}
		svg := ""
		if req.Chart {
			var buf bytes.Buffer
			if err := chart.Envelope(&buf, "svg", e); err != nil {
				return result{}, err
			}
			svg = buf.String()
		}
		return result{e, svg}, nil
	})
	if err != nil {
		return err
	}
	writeJSON(w, http.StatusOK, map[string]any{"envelope": envelopeDoc(res.e), "chart_svg": res.svg})
	return nil
}

func (s *Server) aircraftList(w http.ResponseWriter, r *http.Request) error {
	type entry struct {
		Name          string  `json:"name"`
		Source        string  `json:"source"` // "builtin" or "file"
		Description   string  `json:"description"`
		OEWKg         float64 `json:"oew_kg"`
		MZFWKg        float64 `json:"mzfw_kg"`
		MTOWKg        float64 `json:"mtow_kg"`
		FuelCapacity  float64 `json:"fuel_capacity_kg"`
		MMO           float64 `json:"mmo"`
		CeilingFL     float64 `json:"certified_ceiling_fl"`
		Error         string  `json:"error,omitempty"`
		AircraftField string  `json:"aircraft"` // the value to send as "aircraft"
	}
	out := []entry{}
	add := func(name, src string) {
		a, _, err := s.aircraft(name)
		if err != nil {
			out = append(out, entry{Name: name, Source: src, AircraftField: name, Error: err.Error()})
			return
		}
		out = append(out, entry{Name: a.Name, Source: src, Description: a.Description, OEWKg: a.OEW, MZFWKg: a.MZFW, MTOWKg: a.MTOW,
			FuelCapacity: a.FuelCapacity, MMO: a.MMO, CeilingFL: a.CertifiedCeiling / perf.FtToM / 100, AircraftField: name})
	}
	for _, n := range perf.BuiltinNames() {
		add(n, "builtin")
	}
	for _, n := range s.data.list(".yaml", ".yml") {
		add(n, "file")
	}
	writeJSON(w, http.StatusOK, map[string]any{"aircraft": out})
	return nil
}

func (s *Server) routeList(w http.ResponseWriter, r *http.Request) error {
	// Only files that read as routes (a schedule CSV does not).
	names := []string{}
	for _, n := range s.data.list(".geojson", ".json", ".csv") {
		if p, err := s.data.resolve(n); err == nil {
			if _, err := route.Load(p); err == nil {
				names = append(names, n)
			}
		}
	}
	writeJSON(w, http.StatusOK, map[string]any{"routes": names})
	return nil
}

func (s *Server) weatherList(w http.ResponseWriter, r *http.Request) error {
	type entry struct {
		Name      string   `json:"name"`
		Digest    string   `json:"digest,omitempty"`
		Times     []string `json:"valid_times"`
		LevelsHPa []int    `json:"levels_hpa"`
		Grid      string   `json:"grid"`
		Error     string   `json:"error,omitempty"`
	}
	out := []entry{}
	for _, n := range s.data.list(".grib2", ".grb2", ".grib", ".grb", ".grib1", ".grb1") {
		ws, err := compute(s, r.Context(), func(context.Context) (*weatherSet, error) { return s.weather.get([]string{n}) })
		if err != nil {
			var ae *apiError
			if errors.As(err, &ae) && (ae.Status == http.StatusServiceUnavailable || ae.Status == http.StatusTooManyRequests) {
				return err
			}
			out = append(out, entry{Name: n, Times: []string{}, LevelsHPa: []int{}, Error: err.Error()})
			continue
		}
		e := entry{Name: n, Digest: ws.digests[0], Times: []string{}, LevelsHPa: []int{}}
		for _, t := range ws.field.Times() {
			e.Times = append(e.Times, t.UTC().Format(time.RFC3339))
		}
		for _, p := range ws.field.Levels() {
			e.LevelsHPa = append(e.LevelsHPa, int(p/100+0.5))
		}
		ni, nj, di, dj := ws.field.Grid()
		e.Grid = fmt.Sprintf("%d x %d points, %g x %g degrees", ni, nj, di, dj)
		out = append(out, e)
	}
	writeJSON(w, http.StatusOK, map[string]any{"weather": out})
	return nil
}

func (s *Server) healthz(w http.ResponseWriter, r *http.Request) error {
	v, err := s.store.version()
	if err != nil {
		return &apiError{Status: http.StatusServiceUnavailable, Msg: "database not readable", RetryAfter: 5}
	}
	writeJSON(w, http.StatusOK, map[string]any{"status": "ok", "schema_version": v, "program_version": s.cfg.Version})
	return nil
}

func (s *Server) metrics(w http.ResponseWriter, r *http.Request) error {
	w.Header().Set("Content-Type", "text/plain; version=0.0.4; charset=utf-8")
	s.met.write(w)
	return nil
}
