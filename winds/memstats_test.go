package winds

import "runtime"

// runtimeStats is a snapshot of the bytes allocated so far.
type runtimeStats struct{ alloc, sys uint64 }

func (s *runtimeStats) read() {
	var m runtime.MemStats
	runtime.ReadMemStats(&m)
	s.alloc, s.sys = m.TotalAlloc, m.Sys
}
