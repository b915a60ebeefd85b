//go:build unix

package main

import (
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestInputsNotRegular: a route, aircraft or weather "file" that is a FIFO
// (an open for reading would wait for a writer for ever) or a device is
// refused before it is opened, exit 2, naming the kind of file.
func TestInputsNotRegular(t *testing.T) {
	fs := demoFiles(t)
	fifo := filepath.Join(t.TempDir(), "in.fifo")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skipf("mkfifo: %v", err)
	}
	base := []string{"plan", "--aircraft", "demo-regional", "--mass", "36000"}
	for _, c := range []struct {
		args []string
		want string
	}{
		{append(base, "--route", fifo), "named pipe"},
		{[]string{"plan", "--route", fs.Routes[3], "--aircraft", fifo, "--mass", "36000"}, "named pipe"},
		{append(base, "--route", fs.Routes[3], "--weather", fifo), "named pipe"},
		{append(base, "--route", fs.Routes[3], "--weather", "/dev/zero"), "device"},
		{[]string{"route", fifo}, "named pipe"},
	} {
		done := make(chan [3]any, 1)
		go func() {
			code, _, errs := runCLI(t, c.args...)
			done <- [3]any{code, errs}
		}()
		select {
		case r := <-done:
			if r[0] != 2 || !strings.Contains(r[1].(string), c.want) {
				t.Errorf("%v: exit %v, %q", c.args, r[0], r[1])
			}
		case <-time.After(20 * time.Second):
			t.Fatalf("%v: blocked", c.args)
		}
	}
}
