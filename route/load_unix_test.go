//go:build unix

package route

import (
	"errors"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestLoadNotRegular: a FIFO (which would block an open for reading until
// a writer came), a character device and a directory are refused before
// they are opened, with a *FormatError naming the kind of file.
func TestLoadNotRegular(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "route.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skipf("mkfifo: %v", err)
	}
	for path, kind := range map[string]string{fifo: "named pipe", "/dev/null": "character device", t.TempDir(): "directory"} {
		done := make(chan error, 1)
		go func() { _, err := Load(path); done <- err }()
		select {
		case err := <-done:
			var fe *FormatError
			if !errors.As(err, &fe) || !strings.Contains(err.Error(), kind) {
				t.Errorf("%s: err %v, want a FormatError naming a %s", path, err, kind)
			}
		case <-time.After(10 * time.Second):
			t.Fatalf("%s: Load blocked", path)
		}
	}
}

// TestLoadProcEnviron: Linux's /proc/self/environ (a regular file of size
// 0 holding the whole environment, NUL-separated) gives an error quoting
// at most a short excerpt of it.
func TestLoadProcEnviron(t *testing.T) {
	const p = "/proc/self/environ"
	_, err := Load(p)
	if err == nil {
		t.Fatal("environment parsed as a route")
	}
	if strings.Contains(err.Error(), "no such file") {
		t.Skip("no /proc/self/environ")
	}
	if msg := err.Error(); len(msg) > 160 {
		t.Errorf("error of %d bytes echoes the environment: %.300s", len(msg), msg)
	}
}
