package chart

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"strings"
	"testing"

	"golang.org/x/net/html"
	"golang.org/x/net/html/atom"

	"levelpath/optimizer"
)

// violatedPlan is samplePlan with invented violations: a buffet
// violation on leg 5, a thrust violation on legs 7 and 8 (one run), a
// landing-mass violation on the last leg, and an invented fuel plan.
func violatedPlan() *optimizer.Plan {
	p := samplePlan()
	last := len(p.Legs) - 1
	p.Violations = []optimizer.Violation{
		{Leg: 5, Limit: optimizer.LimitBuffet, By: 0.02, Unit: "g", Detail: "margin 1.28 g under the floor 1.30 g"},
		{Leg: 7, Limit: optimizer.LimitThrust, By: 40, Unit: "fpm", Detail: "residual climb 260 ft/min"},
		{Leg: 8, Limit: optimizer.LimitThrust, By: 55, Unit: "fpm", Detail: "residual climb 245 ft/min"},
		{Leg: last, Limit: optimizer.LimitLandingMass, By: 500, Unit: "kg", Detail: "landing mass over MLW"},
	}
	p.Fuel = &optimizer.FuelPlan{Taxi: 200, Trip: p.Totals.Fuel, Contingency: 0.05 * p.Totals.Fuel, ContingencyBasis: "5 % of trip",
		Alternate: 1800, FinalReserve: 1100, Additional: 0, Extra: 300, ZFW: 52000, Iterations: 3}
	f := p.Fuel
	f.Block = f.Taxi + f.Trip + f.Contingency + f.Alternate + f.FinalReserve + f.Additional + f.Extra
	f.TakeoffMass = f.ZFW + f.Block - f.Taxi
	f.LandingMass = f.TakeoffMass - f.Trip
	return p
}

// TestProfileMarksViolations checks that each violation's leg (the index
// into Plan.Legs the leg tables print) is named on the SVG chart, runs of
// one limit once, and that a plan without violations has no such mark.
func TestProfileMarksViolations(t *testing.T) {
	pl := violatedPlan()
	b := drawChart(t, "profile-violations", func(w io.Writer, f string) error {
		return Profile(w, f, ProfileInput{Plan: pl, Levels: sampleLevels()})
	}, "svg")
	texts, _ := svgTexts(t, b.Bytes())
	have := map[string]bool{}
	for _, s := range texts {
		have[strings.TrimSpace(s)] = true
	}
	last := len(pl.Legs) - 1
	for _, want := range []string{"leg 5: buffet", "legs 7-8: thrust", fmt.Sprintf("leg %d: landing-mass", last),
		"limit broken (leg numbers of the leg table)"} {
		if !have[want] {
			t.Errorf("no text %q on the chart; texts: %q", want, texts)
		}
	}

	b = drawChart(t, "profile", func(w io.Writer, f string) error {
		return Profile(w, f, ProfileInput{Plan: samplePlan()})
	}, "svg")
	texts, _ = svgTexts(t, b.Bytes())
	for _, s := range texts {
		if strings.Contains(s, "limit broken") || strings.HasPrefix(s, "leg ") {
			t.Errorf("a plan without violations shows %q", s)
		}
	}
}

func TestViolationRuns(t *testing.T) {
	pl := violatedPlan()
	pl.Violations = append(pl.Violations, optimizer.Violation{Leg: 99, Limit: optimizer.LimitFuel}, optimizer.Violation{Leg: 9, Limit: optimizer.LimitBuffet})
	var got []string
	for _, r := range violationRuns(pl) {
		got = append(got, r.where()+": "+string(r.limit))
	}
	last := len(pl.Legs) - 1
	want := []string{"leg 5: buffet", "legs 7-8: thrust", fmt.Sprintf("leg %d: landing-mass", last), fmt.Sprintf("leg %d: fuel", last), "leg 9: buffet"}
	if strings.Join(got, "|") != strings.Join(want, "|") {
		t.Errorf("runs %q, want %q", got, want)
	}
}

// TestLeastAboveFloor checks that the least buffet margin is judged
// against each leg's own floor: a 1.52 g margin under a 1.50 g
// turbulence floor is closer to its limit than 1.45 g under 1.30 g.
func TestLeastAboveFloor(t *testing.T) {
	nan := math.NaN()
	pl := &optimizer.Plan{Floor: 1.3, Legs: []optimizer.Leg{
		{BuffetMargin: nan, Floor: 1.3},
		{BuffetMargin: 1.45, Floor: 1.3},
		{BuffetMargin: 1.52, Floor: 1.5},
		{BuffetMargin: 1.60, Floor: 1.3},
	}}
	m, at := leastAboveFloor(pl)
	if at != 2 || math.Abs(m-0.02) > 1e-12 {
		t.Errorf("least %.3f g on leg %d, want 0.020 g on leg 2", m, at)
	}
	if got, want := floorText(pl, false), "1.30 g (1.50 g in turbulence)"; got != want {
		t.Errorf("floor text %q, want %q", got, want)
	}
	pl.Legs[2].Floor = 1.3
	if got, want := floorText(pl, true), "1.30 g"; got != want {
		t.Errorf("floor text %q, want %q", got, want)
	}
	if _, at := leastAboveFloor(&optimizer.Plan{Legs: pl.Legs[:1]}); at != -1 {
		t.Errorf("no margin: leg %d, want -1", at)
	}
}

// TestReportDispatcherOrder parses the report (golang.org/x/net/html) and
// checks what a dispatcher reads first: the status, every violation and
// every warning come before the legs table; each violation links to the
// leg table's row of the same number (0-based, as the CLI numbers legs);
// the fuel plan's components show; and no row calls the 1,500-ft-to-
// 1,500-ft figure trip fuel without saying so.
func TestReportDispatcherOrder(t *testing.T) {
	pl := violatedPlan()
	b := reportBytes(t, ProfileInput{Plan: pl, Levels: sampleLevels()})
	doc, err := html.Parse(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	var (
		order   []string              // "status", "violation", "warning", "fuel", "legs" in document order
		rows    = map[string]string{} // leg row id -> its first cell
		links   []string
		kv      = map[string]string{} // th -> td of the other key-value tables
		fuel    = map[string]string{} // th -> td of the fuel table
		violTxt []string
	)
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode {
			class := attr(n, "class")
			switch {
			case n.DataAtom == atom.P && strings.Contains(class, "status"):
				order = append(order, "status")
			case n.DataAtom == atom.Ul && class == "viol":
				order = append(order, "violation")
			case n.DataAtom == atom.Ul && class == "warn":
				order = append(order, "warning")
			case n.DataAtom == atom.Table && strings.Contains(class, "fuel"):
				order = append(order, "fuel")
			case n.DataAtom == atom.Table && class == "legs":
				order = append(order, "legs")
			case n.DataAtom == atom.Tr && strings.HasPrefix(attr(n, "id"), "leg-"):
				for c := n.FirstChild; c != nil; c = c.NextSibling {
					if c.DataAtom == atom.Td {
						rows[attr(n, "id")] = nodeText(c)
						break
					}
				}
			case n.DataAtom == atom.A && n.Parent != nil && n.Parent.DataAtom == atom.Li:
				links = append(links, attr(n, "href"))
			case n.DataAtom == atom.Li && n.Parent != nil && attr(n.Parent, "class") == "viol":
				violTxt = append(violTxt, nodeText(n))
			case n.DataAtom == atom.Tr:
				var th, td string
				for c := n.FirstChild; c != nil; c = c.NextSibling {
					switch c.DataAtom {
					case atom.Th:
						th = nodeText(c)
					case atom.Td:
						td = nodeText(c)
					}
				}
				if th != "" && td != "" {
					if inTable(n, "fuel") {
						fuel[th] = td
					} else {
						kv[th] = td
					}
				}
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
	if got, want := strings.Join(order, ","), "status,violation,warning,fuel,legs"; got != want {
		t.Errorf("sections in order %s, want %s", got, want)
	}
	if len(violTxt) != len(pl.Violations) {
		t.Errorf("%d violations listed, want every one of %d", len(violTxt), len(pl.Violations))
	}
	for i, v := range pl.Violations {
		want := fmt.Sprintf("leg %d: %s", v.Leg, v.Limit)
		if i >= len(violTxt) || !strings.HasPrefix(violTxt[i], want) {
			t.Errorf("violation %d reads %q, want it to begin %q", i, violTxt[min(i, len(violTxt)-1)], want)
		}
		id := fmt.Sprintf("leg-%d", v.Leg)
		if i >= len(links) || links[i] != "#"+id {
			t.Errorf("violation %d does not link to #%s (links %q)", i, id, links)
		}
		if rows[id] != fmt.Sprint(v.Leg) {
			t.Errorf("leg table row %s is numbered %q, want %d", id, rows[id], v.Leg)
		}
	}
	if len(rows) != len(pl.Legs) {
		t.Errorf("%d numbered leg rows, want %d", len(rows), len(pl.Legs))
	}
	for th := range merged(kv, fuel) {
		if strings.HasPrefix(strings.ToLower(th), "trip") && strings.Contains(strings.ToLower(th), "fuel") && !strings.Contains(th, "1,500 ft after take-off to 1,500 ft on approach") {
			t.Errorf("row %q calls a figure trip fuel without defining it", th)
		}
	}
	if _, ok := kv[tripLabel]; !ok {
		t.Errorf("no row %q; rows %q", tripLabel, kv)
	}
	// The components of ICAO Annex 6 Part I 4.3.6.3 (taxi, trip,
	// contingency, alternate, final reserve, additional, discretionary).
	f := pl.Fuel
	for th, want := range map[string]float64{"Taxi": f.Taxi, "Trip (1,500 ft after take-off to 1,500 ft on approach)": f.Trip,
		"Alternate": f.Alternate, "Final reserve": f.FinalReserve, "Additional": f.Additional, "Extra (discretionary)": f.Extra,
		"Block fuel": f.Block, "Take-off mass": f.TakeoffMass, "Landing mass": f.LandingMass} {
		if got, ok := fuel[th]; !ok || got != num(want, 0)+" kg" {
			t.Errorf("fuel row %q = %q, want %q", th, got, num(want, 0)+" kg")
		}
	}
	if got := fuel["Contingency"]; !strings.HasPrefix(got, num(f.Contingency, 0)+" kg") {
		t.Errorf("contingency %q", got)
	}
}

func attr(n *html.Node, key string) string {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val
		}
	}
	return ""
}

// inTable reports whether n lies in a <table> whose class holds class.
func inTable(n *html.Node, class string) bool {
	for p := n.Parent; p != nil; p = p.Parent {
		if p.DataAtom == atom.Table {
			return strings.Contains(attr(p, "class"), class)
		}
	}
	return false
}

func merged(a, b map[string]string) map[string]string {
	m := map[string]string{}
	for k, v := range a {
		m[k] = v
	}
	for k, v := range b {
		m[k] = v
	}
	return m
}
