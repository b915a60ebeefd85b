package perf_test

import (
	"fmt"

	"levelpath/perf"
)

// The ICAO standard atmosphere at FL350 (ICAO Doc 7488: 238.42 hPa,
// 218.81 K; U.S. Standard Atmosphere 1976) and the NACA Report 1135
// airspeed relation: M 0.80 there is 271.9 kt CAS.
func ExampleMachToCAS() {
	p := perf.FLToPressure(350)
	fmt.Printf("%.2f hPa, %.2f K\n", p/100, perf.ISATemperature(350*100*perf.FtToM))
	fmt.Printf("M0.80 = %.1f kt CAS\n", perf.MachToCAS(0.80, p)/perf.KtToMS)
	// Output:
	// 238.42 hPa, 218.81 K
	// M0.80 = 271.9 kt CAS
}

// The envelope of an invented demonstration aircraft: the ceilings it
// reports are ordered as their definitions require (the maximum level is
// the least of the buffet-limited, thrust-limited and certified levels).
func ExampleAircraft_Envelope() {
	a, err := perf.Builtin("demo-widebody")
	if err != nil {
		panic(err)
	}
	e, err := a.Envelope(231000, 10, 1.3)
	if err != nil {
		panic(err)
	}
	least := min(e.MaxFLBuffet, e.MaxFLThrust, e.MaxFLCertified)
	fmt.Println(e.MaxFL == least, e.OptimumFL <= e.MaxFL, len(e.Rows) > 20)
	// Output: true true true
}
