package serve

import (
	"bytes"
	"encoding/json"
	"fmt"
	"net/http"
	"net/http/httptest"
	"os"
	"slices"
	"strconv"
	"sync"
	"testing"
	"time"
)

// load sends total plan requests of body from clients goroutines to url
// over loopback and returns the latencies and the record ids answered.
func load(url string, body map[string]any, clients, total int) (lat []time.Duration, ids []int64, errs []string) {
	b, _ := json.Marshal(body)
	var mu sync.Mutex
	next := make(chan int, total)
	for i := range total {
		next <- i
	}
	close(next)
	var wg sync.WaitGroup
	for range clients {
		wg.Go(func() {
			cl := &http.Client{Timeout: 120 * time.Second}
			for range next {
				t0 := time.Now()
				res, err := cl.Post(url+"/v1/plan", "application/json", bytes.NewReader(b))
				d := time.Since(t0)
				var a struct {
					ID int64 `json:"id"`
				}
				if err == nil {
					if res.StatusCode != 200 {
						err = fmt.Errorf("status %d", res.StatusCode)
					} else {
						err = json.NewDecoder(res.Body).Decode(&a)
					}
					res.Body.Close()
				}
				mu.Lock()
				if err != nil {
					errs = append(errs, err.Error())
				} else {
					lat, ids = append(lat, d), append(ids, a.ID)
				}
				mu.Unlock()
			}
		})
	}
	wg.Wait()
	return lat, ids, errs
}

// quantile returns the q quantile of ds by the nearest-rank method.
func quantile(ds []time.Duration, q float64) time.Duration {
	s := append([]time.Duration(nil), ds...)
	slices.Sort(s)
	k := int(q*float64(len(s))+0.999999) - 1
	return s[max(0, min(k, len(s)-1))]
}

// TestLoad sends plan requests from 8 clients over loopback and asserts
// no errors and no lost records: every answered id is stored, under its
// flight. By default 48 requests of the demo regional flight (a few
// seconds); LEVELPATH_SERVE_LOAD=1 sends 200 of the long-haul flight. The
// queue holds all 8 clients, so none gets 429.
func TestLoad(t *testing.T) {
	total, body := 48, shortFlight()
	if os.Getenv("LEVELPATH_SERVE_LOAD") == "1" {
		total, body = 200, longFlight()
	}
	s := testServer(t, func(c *Config) { c.QueueWait = 5 * time.Minute; c.Timeout = 5 * time.Minute; c.Queue = 8 })
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	t0 := time.Now()
	lat, ids, errs := load(ts.URL, body, 8, total)
	wall := time.Since(t0)
	if len(errs) > 0 {
		t.Fatalf("%d errors, first %s", len(errs), errs[0])
	}
	t.Logf("%d plans (%s) from 8 clients in %v: %.1f/s, p50 %v, p99 %v", total, body["flight"], wall.Round(time.Millisecond),
		float64(total)/wall.Seconds(), quantile(lat, 0.5).Round(time.Millisecond), quantile(lat, 0.99).Round(time.Millisecond))
	if n := records(t, s); n != int64(total) {
		t.Errorf("%d records for %d answered plans", n, total)
	}
	seen := map[int64]bool{}
	for _, id := range ids {
		if seen[id] {
			t.Fatalf("id %d answered twice", id)
		}
		seen[id] = true
		r, err := s.store.get(t.Context(), id)
		if err != nil || r.Flight != body["flight"] {
			t.Fatalf("record %d: %v %v", id, r, err)
		}
	}
}

// BenchmarkPlanLongHaul measures the demo long-haul plan over loopback
// with 1, 4 and 16 clients (queue length, queue wait and time limit raised so that
// every request is answered): requests per second and p99 latency.
func BenchmarkPlanLongHaul(b *testing.B) {
	for _, clients := range []int{1, 4, 16} {
		b.Run("clients="+strconv.Itoa(clients), func(b *testing.B) {
			s := testServer(b, func(c *Config) { c.QueueWait = 10 * time.Minute; c.Timeout = 10 * time.Minute; c.Queue = clients })
			defer s.Close()
			ts := httptest.NewServer(s.Handler())
			defer ts.Close()
			load(ts.URL, longFlight(), 1, 1) // warm: weather decoded
			n := max(b.N, clients)
			b.ResetTimer()
			t0 := time.Now()
			lat, _, errs := load(ts.URL, longFlight(), clients, n)
			wall := time.Since(t0)
			if len(errs) > 0 {
				b.Fatalf("%d errors, first %s", len(errs), errs[0])
			}
			b.ReportMetric(float64(n)/wall.Seconds(), "req/s")
			b.ReportMetric(float64(quantile(lat, 0.99).Milliseconds()), "p99-ms")
			b.ReportMetric(float64(quantile(lat, 0.5).Milliseconds()), "p50-ms")
		})
	}
}

// BenchmarkFirstVsWarm measures the first long-haul plan of a fresh
// server (the weather decoded) against the next one (weather shared).
func BenchmarkFirstVsWarm(b *testing.B) {
	var first, warm time.Duration
	for i := 0; i < b.N; i++ {
		s := testServer(b, nil)
		ts := httptest.NewServer(s.Handler())
		t0 := time.Now()
		load(ts.URL, longFlight(), 1, 1)
		t1 := time.Now()
		load(ts.URL, longFlight(), 1, 1)
		first, warm = first+t1.Sub(t0), warm+time.Since(t1)
		ts.Close()
		s.Close()
	}
	b.ReportMetric(float64(first.Milliseconds())/float64(b.N), "first-ms")
	b.ReportMetric(float64(warm.Milliseconds())/float64(b.N), "warm-ms")
}
