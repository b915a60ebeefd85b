//go:build !unix

package batch

import "testing"

func mkfifo(t testing.TB, path string) { t.Skip("no FIFOs on this system") }
