package contrail

import (
	"math"
	"testing"
	"time"
)

// goffGratchIce and goffGratchWater are the Goff-Gratch formulas as given
// by the WMO (Technical Regulations, WMO-No. 49, and the Guide WMO-No. 8),
// in Pa: a second, independent formulation to check Murphy and Koop's.
func goffGratchIce(t float64) float64 {
	x := 273.16 / t
	return 100 * math.Pow(10, -9.09718*(x-1)-3.56654*math.Log10(x)+0.876793*(1-1/x)+math.Log10(6.1071))
}

func goffGratchWater(t float64) float64 {
	x := 373.16 / t
	return 100 * math.Pow(10, -7.90298*(x-1)+5.02808*math.Log10(x)-1.3816e-7*(math.Pow(10, 11.344*(1-1/x))-1)+
		8.1328e-3*(math.Pow(10, -3.49149*(x-1))-1)+math.Log10(1013.246))
}

// At the triple point of water, 273.16 K, both curves pass through the
// triple-point pressure 611.657 Pa (IAPWS, Revised release on the pressure
// along the melting and sublimation curves of ordinary water substance,
// 2011; value from memory). Away from it Murphy and Koop's formulas agree
// with Goff-Gratch: over ice within 0.5 % from 180 K (Murphy and Koop 2005
// compare the common ice formulas and find them within a few tenths of a
// per cent in this range; tolerance from memory), over liquid water within
// 1 % from 233 K (-40 °C), where the supercooled extrapolations begin to
// part.
func TestSaturationAgainstReferences(t *testing.T) {
	for _, c := range []struct {
		name string
		got  float64
	}{{"ice", SatIce(273.16)}, {"water", SatWater(273.16)}} {
		if math.Abs(c.got/611.657-1) > 1e-3 {
			t.Errorf("%s at the triple point: %.3f Pa, want 611.657 Pa", c.name, c.got)
		}
	}
	for tk := 180.0; tk <= 273.16; tk += 5 {
		if r := SatIce(tk)/goffGratchIce(tk) - 1; math.Abs(r) > 5e-3 {
			t.Errorf("ice at %.0f K: Murphy-Koop %.6g Pa, Goff-Gratch %.6g Pa (%.2f %%)", tk, SatIce(tk), goffGratchIce(tk), 100*r)
		}
	}
	for tk := 233.0; tk <= 320; tk += 5 {
		if r := SatWater(tk)/goffGratchWater(tk) - 1; math.Abs(r) > 1e-2 {
			t.Errorf("water at %.0f K: Murphy-Koop %.6g Pa, Goff-Gratch %.6g Pa (%.2f %%)", tk, SatWater(tk), goffGratchWater(tk), 100*r)
		}
	}
	// Over supercooled water the vapour pressure exceeds that over ice.
	for tk := 200.0; tk < 273; tk += 10 {
		if !(SatWater(tk) > SatIce(tk)) {
			t.Errorf("at %.0f K e_w %.4g is not above e_i %.4g", tk, SatWater(tk), SatIce(tk))
		}
	}
}

// The analytic derivative agrees with a central difference.
func TestSatWaterDerivative(t *testing.T) {
	for tk := 190.0; tk < 300; tk += 7 {
		h := 1e-4
		num := (SatWater(tk+h) - SatWater(tk-h)) / (2 * h)
		if math.Abs(dSatWater(tk)/num-1) > 1e-6 {
			t.Errorf("at %.0f K: derivative %.8g, difference %.8g", tk, dSatWater(tk), num)
		}
	}
}

// ThresholdMax against Schumann's (1996) own approximation, eq. (31),
// over the range of mixing slopes he fitted (about 0.24 to 2 Pa/K; the
// approximation's stated accuracy is a few tenths of a kelvin, from
// memory, so the tolerance is 0.3 K). For a typical cruise case (250 hPa,
// η = 0.3) G is about 1.67 Pa/K and T_LM about -41.8 °C; the critical
// temperature for dry air lies below T_LM and rises with humidity to T_LM
// in saturated air.
func TestSchmidtAppleman(t *testing.T) {
	for g := 0.3; g <= 2.0; g += 0.1 {
		if d := ThresholdMax(g) - ThresholdApprox(g); math.Abs(d) > 0.3 {
			t.Errorf("G %.1f Pa/K: T_LM %.3f K, Schumann's approximation %.3f K (%.2f K)", g, ThresholdMax(g), ThresholdApprox(g), d)
		}
		if dr := dSatWater(ThresholdMax(g)) - g; math.Abs(dr) > 1e-6 {
			t.Errorf("G %.1f: the mixing line is not tangent at T_LM (slope off by %.3g)", g, dr)
		}
	}
	g := MixingSlope(25000, 0.3)
	if math.Abs(g-1.668) > 0.005 {
		t.Errorf("G at 250 hPa, η 0.3: %.4f Pa/K, want 1.668 (EI 1.25, cp 1004, Q 43.2 MJ/kg, ε 0.622)", g)
	}
	dry, half, sat := Threshold(g, 0), Threshold(g, 0.5), Threshold(g, 1)
	if !(dry < half && half < sat && math.Abs(sat-ThresholdMax(g)) < 1e-6) {
		t.Errorf("T_LC dry %.3f, 50 %% %.3f, saturated %.3f, T_LM %.3f K", dry, half, sat, ThresholdMax(g))
	}
	// A more efficient engine makes contrails at higher temperatures
	// (Schumann 1996, section 5; the basis of the efficiency effect).
	if !(ThresholdMax(MixingSlope(25000, 0.4)) > ThresholdMax(MixingSlope(25000, 0.3))) {
		t.Error("T_LM does not rise with propulsion efficiency")
	}
}

func TestClassify(t *testing.T) {
	const p, eta = 25000.0, 0.3
	tlm := ThresholdMax(MixingSlope(p, eta))
	cases := []struct {
		name   string
		t, rhw float64
		want   Kind
	}{
		{"warm", tlm + 5, 1, None},
		{"cold and dry", tlm - 15, 0.2, ShortLived},
		{"cold and ice-supersaturated", tlm - 15, 0.8, Persistent}, // RHi = 0.8 e_w/e_i > 1 at 217 K
	}
	for _, c := range cases {
		if got := Classify(c.t, p, eta, c.rhw, 1); got != c.want {
			t.Errorf("%s (T %.1f K, RHw %.2f, RHi %.2f): %v, want %v", c.name, c.t, c.rhw, RHIce(c.rhw, c.t), got, c.want)
		}
	}
}

// The sun: at the June solstice the declination is the obliquity of the
// ecliptic, 23.44° (IAU), so at local solar noon on the Tropic of Cancer
// the sun stands within half a degree of the zenith; at the March equinox
// it is on the horizon at the poles; at midnight UTC at longitude 0 it is
// below the horizon at the equator.
func TestSunElevation(t *testing.T) {
	sol := time.Date(2026, 6, 21, 12, 0, 0, 0, time.UTC)
	if e := SunElevation(23.44, 0, sol); math.Abs(e-90) > 0.7 {
		t.Errorf("solstice noon on the Tropic of Cancer: %.2f°, want about 90°", e)
	}
	eq := time.Date(2026, 3, 20, 15, 0, 0, 0, time.UTC)
	if e := SunElevation(90, 0, eq); math.Abs(e) > 0.6 {
		t.Errorf("equinox at the North Pole: %.2f°, want about 0°", e)
	}
	if IsDay(0, 0, time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)) || !IsDay(0, 0, time.Date(2026, 12, 1, 12, 0, 0, 0, time.UTC)) {
		t.Error("midnight and noon at (0, 0) are not night and day")
	}
}

// CriticalEfficiency inverts the criterion: just above η* Classify finds
// a contrail, just below none (Schumann 1996, eqs. (3) and (11)); at the
// saturated threshold temperature T_LM of a known efficiency it gives that
// efficiency back; at Schumann's own approximation of T_LM, eq. (31),
// within 0.02 (his fit's few tenths of a kelvin, from memory).
func TestCriticalEfficiency(t *testing.T) {
	for _, p := range []float64{30000, 25000, 20000} {
		for _, rhw := range []float64{0, 0.3, 0.6, 0.9, 1} {
			for tk := 205.0; tk <= 235; tk += 2.5 {
				e := CriticalEfficiency(tk, p, rhw)
				if math.IsNaN(e) {
					t.Fatalf("NaN at %.1f K", tk)
				}
				for _, d := range []float64{-0.005, 0.005} {
					eta := e + d
					if eta <= 0 || eta >= 0.9 {
						continue
					}
					if got := Classify(tk, p, eta, rhw, 1e9) != None; got != (d > 0) {
						t.Errorf("%.0f Pa %.1f K RHw %.1f: η* %.4f, Classify at η %.4f says contrail %v", p, tk, rhw, e, eta, got)
					}
				}
			}
		}
		for _, eta := range []float64{0.25, 0.3, 0.35, 0.4} {
			g := MixingSlope(p, eta)
			if e := CriticalEfficiency(ThresholdMax(g), p, 1); math.Abs(e-eta) > 1e-6 {
				t.Errorf("%.0f Pa at T_LM of η %.2f: η* %.7f", p, eta, e)
			}
			if e := CriticalEfficiency(ThresholdApprox(g), p, 1); math.Abs(e-eta) > 0.02 {
				t.Errorf("%.0f Pa at Schumann's approximate T_LM of η %.2f: η* %.4f", p, eta, e)
			}
		}
	}
	// At 300 K no engine makes a contrail (overall efficiencies stay
	// under about 0.5, Schumann 1996, from memory).
	if e := CriticalEfficiency(300, 25000, 0.5); e < 0.9 {
		t.Errorf("300 K: η* %.3f, want beyond any engine (> 0.9)", e)
	}
}
