package serve

import (
	"strings"
	"testing"
	"time"
)

// TestTimeoutFreesSlot: a plan past its time limit is cancelled, so its
// slot is free by the time the 503 is answered (before cancellation the
// long-haul search ran on, holding the only slot), nothing is stored, and
// the next request is planned at once.
func TestTimeoutFreesSlot(t *testing.T) {
	s := testServer(t, func(c *Config) { c.Workers = 1; c.QueueWait = 50 * time.Millisecond; c.Timeout = time.Minute })
	h := s.Handler()
	// Decode the weather first: decoding does not look at the context.
	if a := call(t, h, "POST", "/v1/plan", shortFlight()); a.code != 200 {
		t.Fatalf("warm-up: %d %s", a.code, a.raw)
	}
	s.cfg.Timeout = time.Millisecond
	a := call(t, h, "POST", "/v1/plan", longFlight())
	if a.code != 503 || a.hdr.Get("Retry-After") == "" || !strings.Contains(a.doc["error"].(string), "time limit") {
		t.Fatalf("status %d, Retry-After %q: %s", a.code, a.hdr.Get("Retry-After"), a.raw)
	}
	if n := len(s.slots); n != 0 {
		t.Errorf("%d slot(s) still held after the timed-out plan was answered", n)
	}
	s.cfg.Timeout = time.Minute
	if b := call(t, h, "POST", "/v1/plan", shortFlight()); b.code != 200 {
		t.Errorf("next request after the time-out: %d %s", b.code, b.raw)
	}
	if n := records(t, s); n != 2 {
		t.Errorf("%d records; want the 2 short plans and not the timed-out one", n)
	}
	if p := call(t, h, "GET", "/v1/plans?flight=DEMO101", nil); p.code != 200 || len(p.doc["records"].([]any)) != 0 {
		t.Errorf("history of the timed-out flight: %d %s", p.code, p.raw)
	}
	m := call(t, h, "GET", "/metrics", nil)
	// The search itself stopped (optimizer.CancelledError), counted
	// before the 503 was answered; without the context it ran to its end.
	if !strings.Contains(string(m.raw), "levelpath_timeouts_total 1\n") || !strings.Contains(string(m.raw), "levelpath_cancelled_total 1\n") {
		t.Errorf("metrics do not count the time-out and the cancelled plan:\n%s", m.raw)
	}
}

// TestQueueFull: with the only slot taken and Queue requests already
// waiting, the next request gets 429 with Retry-After at once; the one
// waiting is planned when the slot frees.
func TestQueueFull(t *testing.T) {
	s := testServer(t, func(c *Config) { c.Workers = 1; c.Queue = 1; c.QueueWait = time.Minute })
	h := s.Handler()
	s.slots <- struct{}{}
	first := make(chan answer, 1)
	go func() { first <- call(t, h, "POST", "/v1/plan", shortFlight()) }()
	for i := 0; i < 2000 && s.waiting.Load() < 1; i++ {
		time.Sleep(5 * time.Millisecond)
	}
	if n := s.waiting.Load(); n != 1 {
		t.Fatalf("%d requests waiting, want 1", n)
	}
	b := call(t, h, "POST", "/v1/plan", shortFlight())
	<-s.slots
	if b.code != 429 || b.hdr.Get("Retry-After") == "" {
		t.Errorf("over the queue: status %d, Retry-After %q: %s", b.code, b.hdr.Get("Retry-After"), b.raw)
	}
	if a := <-first; a.code != 200 {
		t.Errorf("the waiting request: %d %s", a.code, a.raw)
	}
	if n := s.waiting.Load(); n != 0 {
		t.Errorf("%d still counted as waiting", n)
	}
	m := call(t, h, "GET", "/metrics", nil)
	if !strings.Contains(string(m.raw), "levelpath_queue_full_total 1\n") {
		t.Errorf("metrics do not count the 429:\n%s", m.raw)
	}
}

func TestQueueDefault(t *testing.T) {
	s := testServer(t, func(c *Config) { c.Workers = 3 })
	if s.cfg.Queue != 6 {
		t.Errorf("default queue %d with 3 workers, want 2 x workers = 6", s.cfg.Queue)
	}
}
