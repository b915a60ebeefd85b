package serve

import (
	"fmt"
	"io"
	"sort"
	"strconv"
	"sync"
	"time"
)

// latencyBuckets are the upper bounds (s) of the request-duration
// histogram.
var latencyBuckets = []float64{0.005, 0.01, 0.025, 0.05, 0.1, 0.25, 0.5, 1, 2.5, 5, 10, 30}

// metrics holds counters and histograms written in the Prometheus text
// exposition format (version 0.0.4) by hand.
type metrics struct {
	mu        sync.Mutex
	requests  map[[2]string]uint64 // {route, code} -> count
	hist      map[string]*histogram
	records   map[string]uint64 // kind -> stored
	decodes   uint64
	inFlight  int64
	rejected  uint64 // 503: no slot within the queue wait
	queueFull uint64 // 429: too many requests waiting
	cancelled uint64 // computations stopped through their context
	timeouts  uint64
}

type histogram struct {
	counts []uint64 // per bucket, not cumulative
	sum    float64
	n      uint64
}

func newMetrics() *metrics {
	return &metrics{requests: map[[2]string]uint64{}, hist: map[string]*histogram{}, records: map[string]uint64{}}
}

func (m *metrics) observe(route string, code int, d time.Duration) {
	m.mu.Lock()
	defer m.mu.Unlock()
	m.requests[[2]string{route, strconv.Itoa(code)}]++
	h := m.hist[route]
	if h == nil {
		h = &histogram{counts: make([]uint64, len(latencyBuckets))}
		m.hist[route] = h
	}
	s := d.Seconds()
	for i, b := range latencyBuckets {
		if s <= b {
			h.counts[i]++
			break
		}
	}
	h.sum += s
	h.n++
}

func (m *metrics) add(f func(m *metrics)) {
	m.mu.Lock()
	f(m)
	m.mu.Unlock()
}

// write writes the metrics in the text format: each family with HELP and
// TYPE lines, label values quoted, histogram buckets cumulative with a
// +Inf bucket equal to the count.
func (m *metrics) write(w io.Writer) {
	m.mu.Lock()
	defer m.mu.Unlock()
	fmt.Fprintln(w, "# HELP levelpath_http_requests_total HTTP requests by route and status code.")
	fmt.Fprintln(w, "# TYPE levelpath_http_requests_total counter")
	keys := make([][2]string, 0, len(m.requests))
	for k := range m.requests {
		keys = append(keys, k)
	}
	sort.Slice(keys, func(i, j int) bool {
		if keys[i][0] != keys[j][0] {
			return keys[i][0] < keys[j][0]
		}
		return keys[i][1] < keys[j][1]
	})
	for _, k := range keys {
		fmt.Fprintf(w, "levelpath_http_requests_total{route=%s,code=%q} %d\n", strconv.Quote(k[0]), k[1], m.requests[k])
	}
	fmt.Fprintln(w, "# HELP levelpath_http_request_duration_seconds Time to answer a request, by route.")
	fmt.Fprintln(w, "# TYPE levelpath_http_request_duration_seconds histogram")
	routes := make([]string, 0, len(m.hist))
	for r := range m.hist {
		routes = append(routes, r)
	}
	sort.Strings(routes)
	for _, r := range routes {
		h := m.hist[r]
		var cum uint64
		for i, b := range latencyBuckets {
			cum += h.counts[i]
			fmt.Fprintf(w, "levelpath_http_request_duration_seconds_bucket{route=%s,le=%q} %d\n", strconv.Quote(r), strconv.FormatFloat(b, 'g', -1, 64), cum)
		}
		fmt.Fprintf(w, "levelpath_http_request_duration_seconds_bucket{route=%s,le=\"+Inf\"} %d\n", strconv.Quote(r), h.n)
		fmt.Fprintf(w, "levelpath_http_request_duration_seconds_sum{route=%s} %g\n", strconv.Quote(r), h.sum)
		fmt.Fprintf(w, "levelpath_http_request_duration_seconds_count{route=%s} %d\n", strconv.Quote(r), h.n)
	}
	fmt.Fprintln(w, "# HELP levelpath_records_total Plans and assessments stored, by kind.")
	fmt.Fprintln(w, "# TYPE levelpath_records_total counter")
	for _, k := range []string{"assess", "plan"} {
		fmt.Fprintf(w, "levelpath_records_total{kind=%q} %d\n", k, m.records[k])
	}
	fmt.Fprintln(w, "# HELP levelpath_weather_decodes_total Weather sets decoded (first use or a file changed).")
	fmt.Fprintln(w, "# TYPE levelpath_weather_decodes_total counter")
	fmt.Fprintf(w, "levelpath_weather_decodes_total %d\n", m.decodes)
	fmt.Fprintln(w, "# HELP levelpath_rejected_total Requests refused with 503 because no slot freed within the queue wait.")
	fmt.Fprintln(w, "# TYPE levelpath_rejected_total counter")
	fmt.Fprintf(w, "levelpath_rejected_total %d\n", m.rejected)
	fmt.Fprintln(w, "# HELP levelpath_queue_full_total Requests refused with 429 because too many were waiting for a slot.")
	fmt.Fprintln(w, "# TYPE levelpath_queue_full_total counter")
	fmt.Fprintf(w, "levelpath_queue_full_total %d\n", m.queueFull)
	fmt.Fprintln(w, "# HELP levelpath_cancelled_total Computations stopped through their context at the time limit.")
	fmt.Fprintln(w, "# TYPE levelpath_cancelled_total counter")
	fmt.Fprintf(w, "levelpath_cancelled_total %d\n", m.cancelled)
	fmt.Fprintln(w, "# HELP levelpath_timeouts_total Computations that passed the request time limit.")
	fmt.Fprintln(w, "# TYPE levelpath_timeouts_total counter")
	fmt.Fprintf(w, "levelpath_timeouts_total %d\n", m.timeouts)
	fmt.Fprintln(w, "# HELP levelpath_computations_in_flight Plans, assessments and envelopes being computed.")
	fmt.Fprintln(w, "# TYPE levelpath_computations_in_flight gauge")
	fmt.Fprintf(w, "levelpath_computations_in_flight %d\n", m.inFlight)
}
