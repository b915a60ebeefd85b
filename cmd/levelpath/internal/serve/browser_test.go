package serve

import (
	"context"
	"net/http/httptest"
	"os/exec"
	"regexp"
	"strings"
	"testing"
	"time"

	"levelpath/optimizer"
)

// TestBrowser loads the page in headless Chromium (Debian's chromium),
// which fills the demo long-haul flight and presses "Plan profile"
// (/?demo=1), and looks in the rendered DOM for the chart, the legs
// table with coloured margins, the caution and the kept record. It skips
// when Chromium is absent or when -short is given.
func TestBrowser(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: the browser test skipped")
	}
	bin := ""
	for _, b := range []string{"chromium", "chromium-browser", "/usr/bin/chromium"} {
		if p, err := exec.LookPath(b); err == nil {
			bin = p
			break
		}
	}
	if bin == "" {
		t.Skip("chromium not installed")
	}
	s := testServer(t, nil)
	ts := httptest.NewServer(s.Handler())
	defer ts.Close()
	ctx, cancel := context.WithTimeout(t.Context(), 120*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, bin, "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
		"--user-data-dir="+t.TempDir(), "--window-size=1280,800", "--virtual-time-budget=60000", "--dump-dom", ts.URL+"/?demo=1")
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("chromium: %v", err)
	}
	dom := string(out)
	ci, li := strings.Index(dom, `<div id="chart"`), strings.Index(dom, `id="legs"`)
	if ci < 0 || li < ci || !strings.Contains(dom[ci:li], "<svg") || !strings.Contains(dom[ci:li], "<path") {
		t.Errorf("no SVG chart in the rendered page")
	}
	rows := regexp.MustCompile(`<tr>`).FindAllStringIndex(dom[max(li, 0):], -1)
	if len(rows) < 10 {
		t.Errorf("legs table has %d rows", len(rows))
	}
	if !regexp.MustCompile(`<td class="m-(good|fair|tight|bad)">`).MatchString(dom) {
		t.Errorf("no coloured margin cell")
	}
	if !strings.Contains(dom, `<p class="caution" id="caution">`+strings.ReplaceAll(optimizer.Caution, "'", "&#39;")) && !strings.Contains(dom, `<p class="caution" id="caution">`+optimizer.Caution) {
		t.Errorf("the plan's caution is not shown")
	}
	if !regexp.MustCompile(`Record \d+ kept`).MatchString(dom) {
		t.Errorf("status does not tell the record kept")
	}
	if n := records(t, s); n != 1 {
		t.Errorf("%d records after the page's plan, want 1", n)
	}
}
