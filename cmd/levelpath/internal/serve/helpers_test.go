package serve

import (
	"bytes"
	"encoding/json"
	"io"
	"log"
	"net/http"
	"net/http/httptest"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"levelpath/cmd/levelpath/internal/demo"
)

// demoDir writes the invented demo scenario once per test binary and
// returns its directory (the tests copy nothing out of it).
var demoDir = sync.OnceValues(func() (string, error) {
	dir, err := mkdirTemp()
	if err != nil {
		return "", err
	}
	_, err = demo.Write(dir)
	return dir, err
})

// testServer is a Server on the demo directory with a fresh database.
func testServer(t testing.TB, mod func(*Config)) *Server {
	t.Helper()
	dir, err := demoDir()
	if err != nil {
		t.Fatal(err)
	}
	cfg := Config{DataDir: dir, DB: filepath.Join(t.TempDir(), "records.db"), Version: "test", Logger: log.New(io.Discard, "", 0)}
	if mod != nil {
		mod(&cfg)
	}
	s, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// answer is a decoded response.
type answer struct {
	code int
	hdr  http.Header
	raw  []byte
	doc  map[string]any
}

// call sends one request to the handler; body is JSON-encoded unless it
// is a string or []byte (sent as is).
func call(t *testing.T, h http.Handler, method, path string, body any, hdr ...string) answer {
	t.Helper()
	var rd io.Reader
	switch b := body.(type) {
	case nil:
	case string:
		rd = strings.NewReader(b)
	case []byte:
		rd = bytes.NewReader(b)
	default:
		j, err := json.Marshal(b)
		if err != nil {
			t.Fatal(err)
		}
		rd = bytes.NewReader(j)
	}
	req := httptest.NewRequest(method, path, rd)
	if rd != nil {
		req.Header.Set("Content-Type", "application/json")
	}
	for i := 0; i+1 < len(hdr); i += 2 {
		req.Header.Set(hdr[i], hdr[i+1])
	}
	rec := httptest.NewRecorder()
	h.ServeHTTP(rec, req)
	a := answer{code: rec.Code, hdr: rec.Header(), raw: rec.Body.Bytes()}
	if strings.HasPrefix(rec.Header().Get("Content-Type"), "application/json") {
		if err := json.Unmarshal(a.raw, &a.doc); err != nil {
			t.Fatalf("%s %s: answer is not JSON: %v\n%s", method, path, err, a.raw)
		}
	}
	return a
}

// shortFlight is the demo regional flight (the quickest to plan).
func shortFlight() map[string]any {
	return map[string]any{"flight": "DEMO401", "route": "route-lakeport.geojson", "aircraft": "demo-regional", "mass": 36500.0,
		"weather": []string{"weather.grib2"}, "depart": "2026-12-01T20:20:00Z", "ci": 15.0}
}

// longFlight is the demo long-haul flight.
func longFlight() map[string]any {
	return map[string]any{"flight": "DEMO101", "route": "route.geojson", "aircraft": "demo-widebody", "mass": 245000.0,
		"weather": []string{"weather.grib2"}, "depart": "2026-12-01T20:00:00Z", "ci": 40.0}
}

func records(t testing.TB, s *Server) int64 {
	t.Helper()
	n, err := s.store.count(t.Context())
	if err != nil {
		t.Fatal(err)
	}
	return n
}

var _ = time.Second
