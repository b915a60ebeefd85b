//go:build unix

package batch

import (
	"syscall"
	"testing"
)

// mkfifo makes a named pipe at path (POSIX mkfifo(3)), skipping the test
// where the file system refuses one.
func mkfifo(t testing.TB, path string) {
	t.Helper()
	if err := syscall.Mkfifo(path, 0o644); err != nil {
		t.Skip("no FIFO here:", err)
	}
}
