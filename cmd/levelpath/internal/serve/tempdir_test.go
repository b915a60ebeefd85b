package serve

import (
	"os"
	"testing"
)

func mkdirTemp() (string, error) { return os.MkdirTemp("", "levelpath-serve-test-") }

// TestMain removes the shared demo directory after the tests, and runs
// the killed-writer child when asked (see TestKilledWriter).
func TestMain(m *testing.M) {
	if os.Getenv(childEnv) != "" {
		os.Exit(killChild(os.Getenv(childEnv)))
	}
	code := m.Run()
	if dir, err := demoDir(); err == nil {
		os.RemoveAll(dir)
	}
	os.Exit(code)
}
