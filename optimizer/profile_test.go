package optimizer

import (
	"math"
	"strings"
	"testing"
)

func TestParseProfile(t *testing.T) {
	p, err := ParseProfile("FL350, FL370@1250,390@2900.5")
	if err != nil {
		t.Fatal(err)
	}
	if p.Initial != 350 || len(p.Changes) != 2 || p.Changes[0].FL != 370 || p.Changes[1].AtDist != 2900.5*1852 {
		t.Errorf("parsed %+v", p)
	}
	bad := []struct{ in, part string }{
		{"", ""},
		{"FL350@10", "FL350@10"},
		{"FL350,FL370", "FL370"},
		{"FL350,FL370@-5", "FL370@-5"},
		{"FL350,FL370@100,FL390@100", "FL390@100"},
		{"FL350,FLxyz@100", "FLxyz@100"},
		{"FL700", "FL700"},
		{"FL350,FL370@NaN", "FL370@NaN"},
	}
	for _, c := range bad {
		_, err := ParseProfile(c.in)
		if err == nil {
			t.Errorf("%q: no error", c.in)
			continue
		}
		if !strings.Contains(err.Error(), c.part) {
			t.Errorf("%q: error %q does not name %q", c.in, err, c.part)
		}
	}
}

// FuzzParseProfile: parsing never panics, and a parsed profile prints in a
// form that parses to the same levels, with distances rounded to whole NM.
func FuzzParseProfile(f *testing.F) {
	for _, s := range []string{"FL350,FL370@1250,FL390@2900", "350", "FL290,FL310@0.4", "FL350,,", "@", "FL350,FL370@1e308"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		p, err := ParseProfile(s)
		if err != nil {
			return
		}
		q, err := ParseProfile(p.String())
		if err != nil {
			// Whole-NM rounding may merge two changes less than 1 NM apart.
			if strings.Contains(err.Error(), "increase") {
				return
			}
			t.Fatalf("%q printed as %q does not parse: %v", s, p.String(), err)
		}
		if q.Initial != p.Initial || len(q.Changes) != len(p.Changes) {
			t.Fatalf("%q -> %q -> %+v", s, p.String(), q)
		}
		for i := range q.Changes {
			if q.Changes[i].FL != p.Changes[i].FL || math.Abs(q.Changes[i].AtDist-p.Changes[i].AtDist) > 0.5*nmToM+1e-6 {
				t.Fatalf("%q: change %d %+v became %+v", s, i, p.Changes[i], q.Changes[i])
			}
		}
	})
}
