package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestServeBadInput: serve refuses bad flags with exit code 2 before it
// listens.
func TestServeBadInput(t *testing.T) {
	dir := demoFiles(t).Dir
	db := filepath.Join(t.TempDir(), "r.db")
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"serve"}, "--data is required"},
		{[]string{"serve", "--data", filepath.Join(dir, "missing")}, "--data"},
		{[]string{"serve", "--data", dir, "--db", db, "--addr", "0.0.0.0:0"}, "loopback only"},
		{[]string{"serve", "--data", dir, "--db", db, "--tls-cert", "c.pem"}, "--tls-cert and --tls-key go together"},
		{[]string{"serve", "--data", dir, "--db", db, "--tokens", filepath.Join(dir, "schedule.csv")}, "--tokens"},
	} {
		code, _, stderr := runCLI(t, c.args...)
		if code != exitBadInput || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: code %d, stderr %q; want 2 and %q", c.args, code, stderr, c.want)
		}
	}
}
