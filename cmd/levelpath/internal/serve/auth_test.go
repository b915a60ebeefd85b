package serve

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The digest of "s3cret-desk" as printed by coreutils
// `printf s3cret-desk | sha256sum` (FIPS 180-4 SHA-256).
const deskDigest = "a9cef2bc96235e8ed771e7c5ca3b1033bdac2216a2e8841b92365faeb42b17d1"

func TestTokens(t *testing.T) {
	file := filepath.Join(t.TempDir(), "tokens")
	if err := os.WriteFile(file, []byte("# desk tokens\ndesk-a:"+deskDigest+"\n\nother:"+strings.Repeat("0", 64)+"\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	s := testServer(t, func(c *Config) { c.TokensFile = file })
	h := s.Handler()
	for _, c := range []struct {
		name, auth string
		code       int
	}{
		{"missing", "", 401},
		{"not bearer", "Basic czNjcmV0LWRlc2s=", 401},
		{"wrong", "Bearer s3cret-dusk", 401},
		{"digest given as secret", "Bearer " + deskDigest, 401},
		{"right", "Bearer s3cret-desk", 200},
	} {
		var hdr []string
		if c.auth != "" {
			hdr = []string{"Authorization", c.auth}
		}
		a := call(t, h, "POST", "/v1/plan", shortFlight(), hdr...)
		if a.code != c.code {
			t.Errorf("%s: %d, want %d: %s", c.name, a.code, c.code, a.raw)
		}
		if c.code == 401 && a.hdr.Get("WWW-Authenticate") == "" {
			t.Errorf("%s: no WWW-Authenticate", c.name)
		}
		if g := call(t, h, "GET", "/metrics", nil, hdr...); g.code != c.code {
			t.Errorf("%s: metrics %d, want %d", c.name, g.code, c.code)
		}
	}
	if n := records(t, s); n != 1 {
		t.Fatalf("%d records, want 1 (the authenticated plan)", n)
	}
	r := call(t, h, "GET", "/v1/plans?flight=DEMO401", nil, "Authorization", "Bearer s3cret-desk")
	if tok := r.doc["records"].([]any)[0].(map[string]any)["token"]; tok != "desk-a" {
		t.Errorf("record token %v, want desk-a", tok)
	}
	for _, open := range []string{"/", "/healthz", "/v1/openapi.json", "/static/app.js"} {
		if a := call(t, h, "GET", open, nil); a.code != 200 {
			t.Errorf("%s without a token: %d", open, a.code)
		}
	}
	if err := s.CheckListen("0.0.0.0:8080"); err != nil {
		t.Errorf("with tokens any address may be used: %v", err)
	}
}

func TestTokenFileErrors(t *testing.T) {
	for _, c := range []struct{ text, want string }{
		{"nocolon\n", ":1: want name:sha256-hex"},
		{"a:1234\n", ":1: token \"a\""},
		{"# only a comment\n", "no tokens"},
		{"a:" + deskDigest + "\na:" + deskDigest + "\n", ":2: token name \"a\" given twice"},
	} {
		_, err := parseTokens(strings.NewReader(c.text), "tokens.txt")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: %v, want %q", c.text, err, c.want)
		}
	}
}

func TestLoopbackOnly(t *testing.T) {
	s := testServer(t, nil)
	for addr, ok := range map[string]bool{"127.0.0.1:8080": true, "[::1]:80": true, "localhost:1": true, "0.0.0.0:8080": false, ":8080": false, "192.0.2.1:80": false} {
		if err := s.CheckListen(addr); (err == nil) != ok {
			t.Errorf("%s: %v", addr, err)
		}
	}
}
