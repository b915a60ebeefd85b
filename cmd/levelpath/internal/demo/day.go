package demo

import (
	"bytes"
	"fmt"
	"math"
	"math/rand"
	"os"
	"path/filepath"
	"time"

	"levelpath/perf"
	"levelpath/route"
	"levelpath/winds"
	"levelpath/winds/synthetic"
)

// dayType describes how the invented day uses one demo aircraft: route
// lengths and a rough trip burn per NM (read off the types' own plans) for
// fuelling the invented flights. Masses come from the aircraft models.
type dayType struct {
	name         string
	minNM, maxNM float64
	burnPerNM    float64
}

var dayTypes = []dayType{
	{"demo-regional", 300, 900, 4.5},
	{"demo-narrowbody", 500, 3000, 5.5},
	{"demo-widebody", 2000, 7000, 11.5},
}

// Day writes an invented day of n flights into dir: a schedule.csv, one
// route CSV per flight (300 to 7,000 NM, waypoints at most 1,500 NM apart)
// and weather.grib2, all reproducible from seed. It is the load for the
// batch speed measurement; nothing in it is a check value.
func Day(dir string, n int, seed int64) (schedule string, err error) {
	if n < 1 || n > 100000 {
		return "", fmt.Errorf("demo day: %d flights; want 1..100000", n)
	}
	if err := os.MkdirAll(filepath.Join(dir, "routes"), 0o755); err != nil {
		return "", err
	}
	rng := rand.New(rand.NewSource(seed))
	var sb bytes.Buffer
	sb.WriteString("flight,departure,route,aircraft,tow_kg,ci\n")
	for i := range n {
		ty := dayTypes[i%len(dayTypes)]
		a, err := perf.Builtin(ty.name)
		if err != nil {
			return "", err
		}
		nm := ty.minNM + rng.Float64()*(ty.maxNM-ty.minNM)
		lat := -45 + 100*rng.Float64()
		lon := -180 + 360*rng.Float64()
		azi := 360 * rng.Float64()
		legs := int(math.Ceil(nm / 1500))
		var rb bytes.Buffer
		rb.WriteString("name,lat,lon\n")
		fmt.Fprintf(&rb, "ORIG%04d,%.5f,%.5f\n", i, lat, lon)
		la, lo, az := lat, lon, azi
		for j := 1; j <= legs; j++ {
			la, lo, az = route.Direct(la, lo, az, nm/float64(legs)*1852)
			name := fmt.Sprintf("W%04d%02d", i, j)
			if j == legs {
				name = fmt.Sprintf("DEST%04d", i)
			}
			fmt.Fprintf(&rb, "%s,%.5f,%.5f\n", name, la, lo)
		}
		rf := fmt.Sprintf("routes/r%04d.csv", i)
		if err := os.WriteFile(filepath.Join(dir, rf), rb.Bytes(), 0o644); err != nil {
			return "", err
		}
		payload := (0.3 + 0.6*rng.Float64()) * (a.MZFW - a.OEW)
		fuel := math.Min(a.FuelCapacity, ty.burnPerNM*nm*1.08+0.04*a.MTOW)
		tow := math.Min(a.MTOW, a.OEW+payload+fuel)
		dep := Ref().Add(time.Duration(rng.Intn(20*60)) * time.Minute)
		ci := float64(rng.Intn(9) * 10)
		fmt.Fprintf(&sb, "DAY%04d,%s,%s,%s,%.0f,%g\n", i, dep.Format(time.RFC3339), rf, ty.name, tow, ci)
	}
	schedule = filepath.Join(dir, "schedule.csv")
	if err := os.WriteFile(schedule, sb.Bytes(), 0o644); err != nil {
		return "", err
	}
	var wb bytes.Buffer
	if err := winds.WriteGRIB2(&wb, synthetic.Weather(Ref())); err != nil {
		return "", err
	}
	return schedule, os.WriteFile(filepath.Join(dir, "weather.grib2"), wb.Bytes(), 0o644)
}
