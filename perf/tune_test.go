package perf

import (
	"fmt"
	"testing"
)

func TestTune(t *testing.T) {
	for _, n := range BuiltinNames() {
		a, err := Builtin(n)
		if err != nil {
			t.Fatal(err)
		}
		mid := (a.OEW + a.MTOW) / 2
		p := FLToPressure(350)
		lrc, _ := a.LRCMach(mid, p, 0, 1.3)
		mr, _ := a.MaxRangeMach(mid, p, 0, 1.3)
		pt := a.Point(State{Mass: mid, Pressure: p, Mach: lrc})
		fmt.Printf("%s mid %.0f FL350 LRC %.4f MR %.4f FF %.0f kg/h L/D %.2f CL %.3f TSFC/h %.3f res %.0f fpm\n", n, mid, lrc, mr, pt.FuelFlow*3600, pt.CL/pt.CD, pt.CL, pt.FuelFlow/pt.Drag*3600*G0, pt.ResidualClimb/FtToM*60)
		for _, m := range []float64{a.MTOW, mid, a.OEW + 0.3*(a.MTOW-a.OEW)} {
			e, err := a.Envelope(m, 0, 1.3)
			if err != nil {
				t.Fatal(err)
			}
			po := FLToPressure(e.OptimumFL)
			lrc, _ := a.LRCMach(m, po, 0, 1.3)
			mr, _ := a.MaxRangeMach(m, po, 0, 1.3)
			pt := a.Point(State{Mass: m, Pressure: po, Mach: lrc})
			fmt.Printf("  m %.0f buf %.1f thr %.1f cert %.1f max %.1f opt %.1f  at opt: MR %.3f LRC %.3f CL %.3f FF %.0f margin %.2f\n", m, e.MaxFLBuffet, e.MaxFLThrust, e.MaxFLCertified, e.MaxFL, e.OptimumFL, mr, lrc, pt.CL, pt.FuelFlow*3600, pt.BuffetMargin)
		}
		for _, fl := range []float64{350, 400} {
			lo, hi, ok := a.BuffetMachs(a.MTOW, FLToPressure(fl), 1)
			fmt.Printf("  MTOW 1g FL%.0f %.3f-%.3f %v w %.3f\n", fl, lo, hi, ok, hi-lo)
		}
	}
}
