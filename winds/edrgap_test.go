package winds

import (
	"math"
	"testing"
	"time"
)

// TestEDROnFewerLevels: EDR forecast on fewer levels than the winds is
// kept where present and NaN elsewhere, while a gap in the winds is an
// error naming the missing field.
func TestEDROnFewerLevels(t *testing.T) {
	ref := time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)
	mk := func(par Param, cat, num int, level, v float64) Message {
		vals := make([]float32, 36*19)
		for i := range vals {
			vals[i] = float32(v)
		}
		return Message{Category: cat, Number: num, Param: par, LevelType: 100, Level: level, RefTime: ref, ValidTime: ref,
			Ni: 36, Nj: 19, Lat1: 90, Lon1: 0, Lat2: -90, Lon2: 350, Di: 10, Dj: 10, Ensemble: -1, Values: vals}
	}
	var msgs []Message
	for _, lv := range []float64{30000, 20000} {
		msgs = append(msgs, mk(ParamU, 2, 2, lv, 10), mk(ParamV, 2, 3, lv, 0), mk(ParamT, 0, 0, lv, 220))
	}
	msgs = append(msgs, mk(ParamEDR, 19, 30, 30000, 0.3))
	f, err := NewField(msgs)
	if err != nil {
		t.Fatal(err)
	}
	if s, err := f.Sample(40, 10, 30000, ref); err != nil || !(math.Abs(s.EDR-0.3) <= 1e-6) { // NaN fails too
		t.Errorf("at 300 hPa: %+v, %v; want EDR 0.3", s, err)
	}
	if s, err := f.Sample(40, 10, 20000, ref); err != nil || !math.IsNaN(s.EDR) || s.U != 10 {
		t.Errorf("at 200 hPa: %+v, %v; want EDR NaN and u 10", s, err)
	}
	if _, err := NewField(msgs[1:]); err == nil {
		t.Error("a missing u plane was accepted")
	}
}
