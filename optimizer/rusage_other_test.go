//go:build !unix

package optimizer

import "time"

func cpuTime() time.Duration { return 0 }

func peakRSS() int64 { return 0 }
