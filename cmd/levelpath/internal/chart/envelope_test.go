package chart

import (
	"bytes"
	"io"
	"math"
	"testing"

	"levelpath/perf"
)

// TestBandApexSquareRootLaw checks the coffin-corner extrapolation on a
// band whose sides are the two roots of a quadratic that merge in a double
// root at a known level FLc: w(FL) = k·sqrt(FLc − FL), the behaviour of
// any pair of simple roots meeting in a double root (the discriminant is
// linear in the parameter near the meeting point; elementary algebra). The
// extrapolation of w² is then exact, for any row spacing and any FLc
// between the last open row and the first closed one.
func TestBandApexSquareRootLaw(t *testing.T) {
	nan := math.NaN()
	for _, c := range []struct{ flc, centre, drift float64 }{
		{415.3, 0.76, 0}, {409.9, 0.74, 0.0004}, {401, 0.80, -0.0007},
	} {
		var rows []perf.EnvelopeRow
		for fl := 300.0; fl <= 440; fl += 10 {
			r := perf.EnvelopeRow{FL: fl, LowBuffetFloor: nan, HighBuffetFloor: nan}
			if fl < c.flc {
				hw := 0.02 * math.Sqrt(c.flc-fl)
				m := c.centre + c.drift*(fl-c.flc)
				r.LowBuffetFloor, r.HighBuffetFloor = m-hw, m+hw
			}
			rows = append(rows, r)
		}
		m, fl, ok := coffinCorner(rows)
		if !ok || math.Abs(fl-c.flc) > 1e-9 || math.Abs(m-c.centre) > 1e-9 {
			t.Errorf("FLc %g: corner (M%.6f, FL%.6f, %v), want (M%.6f, FL%g)", c.flc, m, fl, ok, c.centre, c.flc)
		}
	}
	// A band still open at the top row: the top row's centre.
	rows := []perf.EnvelopeRow{{FL: 300, LowBuffetFloor: 0.6, HighBuffetFloor: 0.8}, {FL: 310, LowBuffetFloor: 0.62, HighBuffetFloor: 0.78}}
	if m, fl, ok := coffinCorner(rows); !ok || fl != 310 || math.Abs(m-0.70) > 1e-12 {
		t.Errorf("open band: (%g, %g, %v), want (0.70, 310, true)", m, fl, ok)
	}
	rows = []perf.EnvelopeRow{{FL: 300, LowBuffetFloor: nan, HighBuffetFloor: nan}}
	if _, _, ok := coffinCorner(rows); ok {
		t.Error("no band: ok")
	}
}

// TestEnvelopeBuiltin draws perf's own envelope of a built-in demo model
// and cross-checks the drawn coffin corner against perf's MaxFLBuffet,
// found independently by bisection to 0.1 ft (a consistency check of two
// methods, not an external reference): where the band closes below MMO
// the two must agree to well within the 1,000 ft row spacing.
func TestEnvelopeBuiltin(t *testing.T) {
	names := perf.BuiltinNames()
	if len(names) == 0 {
		t.Skip("no built-in aircraft")
	}
	a, err := perf.Builtin(names[0])
	if err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, frac := range []float64{0.75, 0.85, 0.95} {
		e, err := a.Envelope(frac*a.MTOW, 0, 1.3)
		if err != nil {
			t.Fatal(err)
		}
		var b bytes.Buffer
		if err := Envelope(&b, "svg", e); err != nil {
			t.Fatal(err)
		}
		svgTexts(t, b.Bytes())
		if err := Envelope(io.Discard, "png", e); err != nil {
			t.Fatal(err)
		}
		m, fl, ok := coffinCorner(e.Rows)
		if !ok || !finite(e.MaxFLBuffet) || m >= a.MMO {
			continue
		}
		checked++
		if d := math.Abs(fl - e.MaxFLBuffet); d > 3 {
			t.Errorf("%s at %.0f kg: corner FL%.1f, perf MaxFLBuffet FL%.1f (%.1f FL apart)", a.Name, e.Mass, fl, e.MaxFLBuffet, d)
		}
	}
	if checked == 0 {
		t.Error("no mass gave a floor band closing below MMO: nothing compared")
	}
}

// benchSample times write on the sample plan and levels.
func benchSample(b *testing.B, write func(io.Writer, ProfileInput) error) {
	in := ProfileInput{Plan: samplePlan(), Levels: sampleLevels()}
	b.ReportAllocs()
	for b.Loop() {
		if err := write(io.Discard, in); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkProfileSVG(b *testing.B) {
	benchSample(b, func(w io.Writer, in ProfileInput) error { return Profile(w, "svg", in) })
}

func BenchmarkProfilePNG(b *testing.B) {
	benchSample(b, func(w io.Writer, in ProfileInput) error { return Profile(w, "png", in) })
}

func BenchmarkReport(b *testing.B) { benchSample(b, Report) }
