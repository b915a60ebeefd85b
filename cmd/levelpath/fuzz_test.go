package main

import (
	"math"
	"testing"
)

// FuzzParseBlock: parseBlock never panics and an accepted block has finite
// distances 0 <= from < to and flight levels FL010-FL600 in steps of 10.
// Seeds in testdata/fuzz/FuzzParseBlock.
func FuzzParseBlock(f *testing.F) {
	f.Add("FL370,FL390@1200-1800")
	f.Fuzz(func(t *testing.T, s string) {
		b, err := parseBlock(s)
		if err != nil {
			return
		}
		if !(b.FromDist >= 0 && b.ToDist > b.FromDist) || math.IsInf(b.ToDist, 0) || len(b.Levels) == 0 {
			t.Fatalf("%q: %+v", s, b)
		}
		for _, fl := range b.Levels {
			if fl < 10 || fl > 600 || fl%10 != 0 {
				t.Fatalf("%q: level %d", s, fl)
			}
		}
	})
}

// FuzzParseTurbulence: parseTurbulence never panics and every accepted
// rule has a finite positive EDR and either closes the level or sets a
// floor in 1.0..2.5 g. Seeds in testdata/fuzz/FuzzParseTurbulence.
func FuzzParseTurbulence(f *testing.F) {
	f.Add("0.20:1.5,0.45:closed")
	f.Fuzz(func(t *testing.T, s string) {
		rules, err := parseTurbulence(s)
		if err != nil {
			return
		}
		if len(rules) == 0 {
			t.Fatalf("%q: no rules and no error", s)
		}
		for _, r := range rules {
			if !(r.EDR > 0) || math.IsInf(r.EDR, 0) || r.Closed == (r.Floor != 0) || !r.Closed && !(r.Floor >= 1 && r.Floor <= 2.5) {
				t.Fatalf("%q: rule %+v", s, r)
			}
		}
	})
}
