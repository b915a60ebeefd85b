package winds_test

import (
	"fmt"
	"time"

	"levelpath/winds"
)

// Open a GRIB file and sample it. The fixture holds u, v and T at 250 hPa
// on a 10-degree global grid in GRIB1 with WMO table 2 parameters, made
// with ecCodes 2.28 (testdata/winds/README.md); at a grid point the sample
// is the value grib_get_data dumps there (testdata/winds/g1_wmo.txt: u, v
// and T at 50N 10E are each 34.6728601, the fixtures' analytic function).
func ExampleField_Sample() {
	f, err := winds.Open("../testdata/winds/g1_wmo.grib1")
	if err != nil {
		fmt.Println(err)
		return
	}
	t0 := f.Times()[0]
	s, err := f.Sample(50, 10, 25000, t0)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(t0.Format(time.RFC3339), f.Levels())
	fmt.Printf("u %.4f m/s, v %.4f m/s, T %.3f K\n", s.U, s.V, s.T)
	// Output:
	// 2024-01-15T06:00:00Z [25000]
	// u 34.6729 m/s, v 34.6729 m/s, T 34.673 K
}
