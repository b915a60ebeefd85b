//go:build unix

package main

import (
	"runtime"
	"syscall"
)

// peakRSS returns the process's peak resident memory in bytes, or 0 when
// unknown.
func peakRSS() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	if runtime.GOOS == "darwin" {
		return int64(ru.Maxrss) // bytes on Darwin
	}
	return int64(ru.Maxrss) * 1024 // KiB on Linux
}
