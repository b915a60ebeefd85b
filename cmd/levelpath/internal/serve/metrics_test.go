package serve

import (
	"bufio"
	"bytes"
	"os/exec"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// sampleLine is a sample of the text exposition format: a metric name,
// optional labels name="value", a value
// (https://prometheus.io/docs/instrumenting/exposition_formats/).
var sampleLine = regexp.MustCompile(`^([a-zA-Z_:][a-zA-Z0-9_:]*)(\{([a-zA-Z_][a-zA-Z0-9_]*="(?:[^"\\]|\\.)*",?)*\})? (\S+)$`)

// TestMetricsFormat checks /metrics against the text format's rules:
// every sample line well formed and of a family whose TYPE came before,
// histogram buckets cumulative with le="+Inf" equal to _count; and, when
// python3-prometheus-client is installed, that its parser reads it.
func TestMetricsFormat(t *testing.T) {
	s := testServer(t, nil)
	h := s.Handler()
	call(t, h, "POST", "/v1/plan", shortFlight())
	call(t, h, "POST", "/v1/plan", map[string]any{"bogus": 1})
	call(t, h, "GET", "/healthz", nil)
	a := call(t, h, "GET", "/metrics", nil)
	if a.code != 200 || !strings.HasPrefix(a.hdr.Get("Content-Type"), "text/plain; version=0.0.4") {
		t.Fatalf("metrics: %d %q", a.code, a.hdr.Get("Content-Type"))
	}
	types := map[string]string{}
	var lastBucket float64
	sc := bufio.NewScanner(bytes.NewReader(a.raw))
	values := map[string]float64{}
	for sc.Scan() {
		line := sc.Text()
		if f, ok := strings.CutPrefix(line, "# TYPE "); ok {
			name, typ, _ := strings.Cut(f, " ")
			types[name] = typ
			continue
		}
		if strings.HasPrefix(line, "# HELP ") {
			continue
		}
		m := sampleLine.FindStringSubmatch(line)
		if m == nil {
			t.Fatalf("malformed line %q", line)
		}
		v, err := strconv.ParseFloat(m[4], 64)
		if err != nil {
			t.Fatalf("value in %q: %v", line, err)
		}
		values[m[1]+m[2]] = v
		fam := m[1]
		for _, suf := range []string{"_bucket", "_sum", "_count"} {
			if b, ok := strings.CutSuffix(fam, suf); ok && types[b] == "histogram" {
				fam = b
			}
		}
		if types[fam] == "" {
			t.Fatalf("sample %q before its TYPE", line)
		}
		if strings.HasSuffix(m[1], "_bucket") {
			if strings.Contains(m[2], `le="0.005"`) {
				lastBucket = 0
			}
			if v < lastBucket {
				t.Errorf("bucket %q below the one before (%v)", line, lastBucket)
			}
			lastBucket = v
		}
	}
	for k, v := range values {
		if b, ok := strings.CutPrefix(k, "levelpath_http_request_duration_seconds_bucket{route="); ok && strings.HasSuffix(b, `,le="+Inf"}`) {
			route := strings.TrimSuffix(b, `,le="+Inf"}`)
			if c := values["levelpath_http_request_duration_seconds_count{route="+route+"}"]; c != v {
				t.Errorf("route %s: +Inf bucket %v, count %v", route, v, c)
			}
		}
	}
	if values[`levelpath_http_requests_total{route="POST /v1/plan",code="200"}`] != 1 || values[`levelpath_http_requests_total{route="POST /v1/plan",code="400"}`] != 1 {
		t.Errorf("request counts wrong:\n%s", a.raw)
	}
	if values[`levelpath_records_total{kind="plan"}`] != 1 || values["levelpath_weather_decodes_total"] != 1 {
		t.Errorf("records or decodes wrong:\n%s", a.raw)
	}
	py := `import sys
from prometheus_client.parser import text_string_to_metric_families
n = sum(len(f.samples) for f in text_string_to_metric_families(sys.stdin.read()))
print(n)`
	python := ""
	for _, p := range []string{"/usr/bin/python3", "python3"} { // Debian's package goes with Debian's python
		if exec.Command(p, "-c", "import prometheus_client").Run() == nil {
			python = p
			break
		}
	}
	if python == "" {
		t.Log("python3-prometheus-client not installed: the reference parser check skipped")
		return
	}
	cmd := exec.Command(python, "-c", py)
	cmd.Stdin = bytes.NewReader(a.raw)
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("prometheus_client parser refused the metrics: %v\n%s", err, out)
	}
	if n, _ := strconv.Atoi(strings.TrimSpace(string(out))); n != len(values) {
		t.Errorf("prometheus_client read %d samples, this test %d", n, len(values))
	}
}
