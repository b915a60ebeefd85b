package route

import (
	"errors"
	"slices"
	"strings"
	"testing"
)

func seq(from, to, step int) []int {
	var out []int
	for v := from; v <= to; v += step {
		out = append(out, v)
	}
	return out
}

// ICAO Annex 2, Appendix 3, table of cruising levels (RVSM), as quoted in
// ICAO Annex 2, Appendix 3 (RVSM table): track 000-179 odd levels FL290, 310, ..., 410, then
// 450, 490; 180-359 even levels FL300, ..., 400, then 430, 470, 510; below
// FL290 odd thousands (FL..., 250, 270) and even thousands (FL..., 260, 280).
var (
	icaoEast = slices.Concat(seq(110, 270, 20), seq(290, 410, 20), []int{450, 490})
	icaoWest = slices.Concat(seq(100, 280, 20), seq(300, 400, 20), []int{430, 470, 510})
)

func TestLevelRuleICAOTable(t *testing.T) {
	def := LevelRule{} // zero value: odd-even-magnetic, FL100-FL510
	cases := []struct {
		name   string
		rule   LevelRule
		tc, mc float64
		want   []int
	}{
		{"magnetic east", def, 200, 90, icaoEast},
		{"magnetic 000", def, 350, 0, icaoEast},
		{"magnetic 179.9", def, 185, 179.9, icaoEast},
		{"magnetic 180", def, 170, 180, icaoWest},
		{"magnetic 359.9", def, 10, 359.9, icaoWest},
		{"magnetic -10 is 350", def, 10, -10, icaoWest},
		{"true east", LevelRule{Kind: RuleOddEvenTrue}, 90, 270, icaoEast},
		{"true west", LevelRule{Kind: RuleOddEvenTrue}, 270, 90, icaoWest},
		{"RVSM band east", LevelRule{Kind: RuleOddEvenMagnetic, Min: 290, Max: 430}, 0, 45, seq(290, 410, 20)},
		{"RVSM band west", LevelRule{Kind: RuleOddEvenMagnetic, Min: 290, Max: 430}, 0, 225, slices.Concat(seq(300, 400, 20), []int{430})},
		{"every 1000", LevelRule{Kind: RuleEvery1000, Min: 290, Max: 330}, 0, 0, []int{290, 300, 310, 320, 330}},
		{"list", LevelRule{Kind: RuleList, List: []int{350, 310, 330, 310}}, 0, 200, []int{310, 330, 350}},
	}
	for _, c := range cases {
		if got := c.rule.Allowed(c.tc, c.mc); !slices.Equal(got, c.want) {
			t.Errorf("%s: Allowed(%v, %v) = %v, want %v", c.name, c.tc, c.mc, got, c.want)
		}
	}
}

func TestParseLevelRule(t *testing.T) {
	good := []struct {
		in   string
		want LevelRule
	}{
		{"", LevelRule{Kind: RuleOddEvenMagnetic, Min: 100, Max: 510}},
		{"odd-even-magnetic", LevelRule{Kind: RuleOddEvenMagnetic, Min: 100, Max: 510}},
		{"odd-even-true:290-430", LevelRule{Kind: RuleOddEvenTrue, Min: 290, Max: 430}},
		{"every-1000:FL290-fl410", LevelRule{Kind: RuleEvery1000, Min: 290, Max: 410}},
		{"list:310,330, 350", LevelRule{Kind: RuleList, List: []int{310, 330, 350}}},
	}
	for _, g := range good {
		r, err := ParseLevelRule(g.in)
		if err != nil || r.Kind != g.want.Kind || r.Min != g.want.Min || r.Max != g.want.Max || !slices.Equal(r.List, g.want.List) {
			t.Errorf("ParseLevelRule(%q) = %+v, %v; want %+v", g.in, r, err, g.want)
		}
	}
	bad := []struct{ in, part string }{
		{"odd-even", `"odd-even"`},
		{"odd-even-true:290-43x", `"43x"`},
		{"odd-even-true:290", `"290"`},
		{"every-1000:410-290", `"410-290"`},
		{"list:310,335", `"335"`},
		{"list:", "lists no levels"},
		{"every-1000:0-100", `"0"`},
	}
	for _, b := range bad {
		_, err := ParseLevelRule(b.in)
		var fe *FormatError
		if !errors.As(err, &fe) || !strings.Contains(err.Error(), b.part) {
			t.Errorf("ParseLevelRule(%q) error %v, want a *FormatError naming %s", b.in, err, b.part)
		}
	}
}
