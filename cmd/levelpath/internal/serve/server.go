// Package serve is the planning service behind `levelpath serve`: a JSON
// API under /v1/ with the command line's field names, a dispatcher's page
// at /, records of every plan and assessment in SQLite, and the limits a
// shared service needs (bearer tokens, body size, time, concurrency).
//
// A computation runs in its own goroutine holding one of Config.Workers
// slots, with the request's context (its time limit): when the limit
// passes, the plan's search and pricing stop (optimizer.SolveContext,
// AssessContext), the slot is given back, and the client gets 503 with
// Retry-After; nothing is stored. The steps that do not look at the
// context (decoding a weather file, an envelope, Yen's search for
// alternatives) run on to their end, still holding the slot, so the number
// of computations at once stays bounded. At most Config.Queue requests
// wait for a slot; beyond that a request gets 429 with Retry-After at
// once, and a waiting request that gets no slot within Config.QueueWait
// gets 503.
package serve

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"log"
	"net"
	"net/http"
	"os"
	"runtime"
	"strconv"
	"strings"
	"sync/atomic"
	"time"

	"levelpath/optimizer"
)

// Config configures a Server.
type Config struct {
	DataDir    string        // directory of routes, aircraft and weather files
	DB         string        // SQLite file of records
	TokensFile string        // "name:sha256-hex" lines; empty: no authentication
	Version    string        // program version stored with records
	Timeout    time.Duration // per-request time limit (default 30 s)
	Workers    int           // computations at once (default GOMAXPROCS)
	QueueWait  time.Duration // longest wait for a slot before 503 (default 2 s)
	Queue      int           // requests waiting for a slot at most, then 429 (default 2 x Workers)
	BodyLimit  int64         // bytes (default 1 MiB)
	Logger     *log.Logger
}

// Server is the planning service.
type Server struct {
	cfg     Config
	data    *dataDir
	weather *weatherCache
	tables  tablesCache // operator-table aircraft by directory and digest
	store   *store
	tokens  []token // nil: no authentication
	slots   chan struct{}
	waiting atomic.Int64 // requests waiting for a slot
	met     *metrics
	mux     *http.ServeMux
	log     *log.Logger
	// Patterns lists the registered "METHOD /path" patterns (the
	// OpenAPI test compares it with the document).
	Patterns []string
}

// New opens the data directory, the database and the tokens.
func New(cfg Config) (*Server, error) {
	if cfg.Timeout <= 0 {
		cfg.Timeout = 30 * time.Second
	}
	if cfg.Workers <= 0 {
		cfg.Workers = runtime.GOMAXPROCS(0)
	}
	if cfg.Queue <= 0 {
		cfg.Queue = 2 * cfg.Workers
	}
	if cfg.QueueWait <= 0 {
		cfg.QueueWait = 2 * time.Second
	}
	if cfg.BodyLimit <= 0 {
		cfg.BodyLimit = 1 << 20
	}
	if cfg.Logger == nil {
		cfg.Logger = log.New(os.Stderr, "levelpath serve: ", log.LstdFlags|log.LUTC)
	}
	d, err := newDataDir(cfg.DataDir)
	if err != nil {
		return nil, err
	}
	s := &Server{cfg: cfg, data: d, slots: make(chan struct{}, cfg.Workers), met: newMetrics(), log: cfg.Logger}
	s.weather = &weatherCache{dir: d, sets: map[string]*weatherEntry{}, decodes: func() { s.met.add(func(m *metrics) { m.decodes++ }) }}
	if cfg.TokensFile != "" {
		f, err := os.Open(cfg.TokensFile)
		if err != nil {
			return nil, fmt.Errorf("--tokens: %w", err)
		}
		s.tokens, err = parseTokens(f, cfg.TokensFile)
		f.Close()
		if err != nil {
			return nil, fmt.Errorf("--tokens: %w", err)
		}
	}
	if cfg.DB == "" {
		return nil, errors.New("--db: a database file is required")
	}
	if s.store, err = openStore(cfg.DB); err != nil {
		return nil, err
	}
	s.routes()
	return s, nil
}

// Close closes the database.
func (s *Server) Close() error { return s.store.close() }

// Handler returns the service's handler.
func (s *Server) Handler() http.Handler { return s.mux }

// route describes one registered endpoint.
type routeDef struct {
	pattern string
	open    bool // served without a token
	h       func(w http.ResponseWriter, r *http.Request) error
}

func (s *Server) routes() {
	s.mux = http.NewServeMux()
	defs := []routeDef{
		{"GET /{$}", true, s.page},
		{"GET /static/{file}", true, s.static},
		{"GET /healthz", true, s.healthz},
		{"GET /v1/openapi.json", true, s.openapi},
		{"GET /metrics", false, s.metrics},
		{"POST /v1/plan", false, s.plan},
		{"POST /v1/assess", false, s.assess},
		{"POST /v1/envelope", false, s.envelope},
		{"GET /v1/aircraft", false, s.aircraftList},
		{"GET /v1/routes", false, s.routeList},
		{"GET /v1/weather", false, s.weatherList},
		{"GET /v1/plans", false, s.plans},
		{"GET /v1/plans/{id}", false, s.planByID},
	}
	for _, d := range defs {
		s.Patterns = append(s.Patterns, d.pattern)
		s.mux.Handle(d.pattern, s.wrap(d))
	}
	s.mux.HandleFunc("/", func(w http.ResponseWriter, r *http.Request) {
		s.answer(w, r, "other", time.Now(), &apiError{Status: http.StatusNotFound, Msg: "no such endpoint: " + r.Method + " " + r.URL.Path})
	})
}

// ctxKey keys the token name in a request's context.
type ctxKey struct{}

// wrap adds authentication, the time limit, error answers and metrics.
func (s *Server) wrap(d routeDef) http.Handler {
	name := d.pattern
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		start := time.Now()
		if !d.open && s.tokens != nil {
			tok, ok := strings.CutPrefix(r.Header.Get("Authorization"), "Bearer ")
			who, good := authenticate(s.tokens, strings.TrimSpace(tok))
			if !ok || !good {
				w.Header().Set("WWW-Authenticate", `Bearer realm="levelpath"`)
				s.answer(w, r, name, start, &apiError{Status: http.StatusUnauthorized, Msg: "missing or unknown bearer token"})
				return
			}
			r = r.WithContext(context.WithValue(r.Context(), ctxKey{}, who))
		}
		ctx, cancel := context.WithTimeout(r.Context(), s.cfg.Timeout)
		defer cancel()
		s.answer(w, r.WithContext(ctx), name, start, d.h(w, r.WithContext(ctx)))
	})
}

// answer writes err as JSON (nothing when nil: the handler has written)
// and counts the request.
func (s *Server) answer(w http.ResponseWriter, r *http.Request, route string, start time.Time, err error) {
	code := http.StatusOK
	if err != nil {
		var ae *apiError
		if !errors.As(err, &ae) {
			s.log.Printf("%s %s: internal error: %v", r.Method, r.URL.Path, err)
			ae = &apiError{Status: http.StatusInternalServerError, Msg: "internal error"}
		}
		if ae.RetryAfter > 0 {
			w.Header().Set("Retry-After", strconv.Itoa(ae.RetryAfter))
		}
		code = ae.Status
		writeJSON(w, code, ae)
	} else if sw, ok := w.(interface{ Status() int }); ok {
		code = sw.Status()
	}
	s.met.observe(route, code, time.Since(start))
}

func writeJSON(w http.ResponseWriter, code int, v any) {
	w.Header().Set("Content-Type", "application/json")
	w.Header().Set("X-Content-Type-Options", "nosniff")
	w.WriteHeader(code)
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.Encode(v)
}

// errBusy is the answer when no slot frees within the queue wait.
var errBusy = &apiError{Status: http.StatusServiceUnavailable, Msg: "busy: all planning slots in use; try again", RetryAfter: 2}

// errQueueFull is the answer when Config.Queue requests already wait.
var errQueueFull = &apiError{Status: http.StatusTooManyRequests, Msg: "busy: too many requests waiting for a planning slot; try again", RetryAfter: 2}

// cancelGrace is how long a timed-out request waits for its cancelled
// computation to give its slot back before answering; a step that does
// not look at the context may take longer, and keeps the slot meanwhile.
const cancelGrace = 2 * time.Second

// compute runs f in a slot with ctx, the request's context. A free slot
// is taken at once; otherwise the request joins the queue, unless
// Config.Queue requests already wait (then 429), and waits at most
// QueueWait for a slot (then 503). When ctx is done before f returns the
// answer is 503 (timeoutErr), given once f has stopped (it looks at ctx,
// see the package comment) or after cancelGrace.
func compute[T any](s *Server, ctx context.Context, f func(ctx context.Context) (T, error)) (T, error) {
	var zero T
	select {
	case s.slots <- struct{}{}:
	default:
		if s.waiting.Add(1) > int64(s.cfg.Queue) {
			s.waiting.Add(-1)
			s.met.add(func(m *metrics) { m.queueFull++ })
			return zero, errQueueFull
		}
		wait := time.NewTimer(s.cfg.QueueWait)
		defer wait.Stop()
		select {
		case s.slots <- struct{}{}:
			s.waiting.Add(-1)
		case <-wait.C:
			s.waiting.Add(-1)
			s.met.add(func(m *metrics) { m.rejected++ })
			return zero, errBusy
		case <-ctx.Done():
			s.waiting.Add(-1)
			return zero, timeoutErr(s)
		}
	}
	type result struct {
		v   T
		err error
	}
	done := make(chan result, 1)
	s.met.add(func(m *metrics) { m.inFlight++ })
	go func() {
		var r result
		func() {
			defer func() {
				if p := recover(); p != nil {
					r = result{err: fmt.Errorf("panic: %v", p)}
				}
			}()
			r.v, r.err = f(ctx)
		}()
		var ce *optimizer.CancelledError
		stopped := errors.As(r.err, &ce)
		// The slot is free, and the computation counted, before the
		// answer is given.
		<-s.slots
		s.met.add(func(m *metrics) {
			m.inFlight--
			if stopped {
				m.cancelled++
			}
		})
		done <- r
	}()
	select {
	case r := <-done:
		if r.err != nil && ctx.Err() != nil {
			return zero, timeoutErr(s) // stopped by the time limit
		}
		return r.v, r.err
	case <-ctx.Done():
		grace := time.NewTimer(cancelGrace)
		defer grace.Stop()
		select {
		case <-done:
		case <-grace.C:
		}
		return zero, timeoutErr(s)
	}
}

func timeoutErr(s *Server) error {
	s.met.add(func(m *metrics) { m.timeouts++ })
	return &apiError{Status: http.StatusServiceUnavailable, Msg: fmt.Sprintf("the computation took longer than the %v time limit", s.cfg.Timeout), RetryAfter: 5}
}

// Serve serves on ln until ctx is done, then drains: in-flight requests
// get up to drain to finish (http.Server.Shutdown).
func (s *Server) Serve(ctx context.Context, ln net.Listener, certFile, keyFile string, drain time.Duration) error {
	hs := &http.Server{Handler: s.Handler(), ReadHeaderTimeout: 10 * time.Second, IdleTimeout: 120 * time.Second, ErrorLog: s.log}
	errc := make(chan error, 1)
	go func() {
		if certFile != "" {
			errc <- hs.ServeTLS(ln, certFile, keyFile)
		} else {
			errc <- hs.Serve(ln)
		}
	}()
	select {
	case err := <-errc:
		return err
	case <-ctx.Done():
	}
	s.log.Printf("draining: waiting up to %v for requests in flight", drain)
	sctx, cancel := context.WithTimeout(context.Background(), drain)
	defer cancel()
	err := hs.Shutdown(sctx)
	if errors.Is(err, http.ErrServerClosed) {
		err = nil
	}
	return err
}

// CheckListen refuses a non-loopback address when no tokens are
// configured: without authentication the service is for this machine
// only.
func (s *Server) CheckListen(addr string) error {
	if s.tokens != nil {
		return nil
	}
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return fmt.Errorf("--addr %q: %v", addr, err)
	}
	if host == "localhost" {
		return nil
	}
	ip := net.ParseIP(host)
	if ip == nil || !ip.IsLoopback() {
		return fmt.Errorf("--addr %q: without --tokens the service listens on loopback only (127.0.0.1 or ::1)", addr)
	}
	return nil
}

// Authenticated reports whether bearer tokens are required.
func (s *Server) Authenticated() bool { return s.tokens != nil }
