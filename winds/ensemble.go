package winds

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"time"
)

// A MemberError reports an ensemble member asked for that the files do
// not hold, or members that cannot form one ensemble (on different grids,
// levels or times). It is bad input.
type MemberError struct {
	Source string // the files read, comma-separated
	Member int    // the member at fault (perturbation number), -1 for none
	What   string
}

func (e *MemberError) Error() string {
	return fmt.Sprintf("winds: %s: %s", e.Source, e.What)
}

// memberOf returns the perturbation number shared by every u, v and
// temperature message of msgs, or -1 when they hold none or several.
func memberOf(msgs []Message) int {
	n := -2
	for i := range msgs {
		m := &msgs[i]
		if s := slotOf(m.Param); s < 0 || s == slotEDR {
			continue
		}
		switch {
		case n == -2:
			n = m.Ensemble
		case n != m.Ensemble:
			return -1
		}
	}
	return max(n, -1)
}

// Member returns the ensemble member (GRIB2 perturbation number, product
// template 4.1) of the field's winds and temperature, or -1 when they
// come from no ensemble product.
func (f *Field) Member() int { return f.member }

// members returns the distinct perturbation numbers of msgs, ascending.
func members(msgs []Message) []int {
	seen := map[int]bool{}
	var out []int
	for i := range msgs {
		if n := msgs[i].Ensemble; n >= 0 && !seen[n] {
			seen[n] = true
			out = append(out, n)
		}
	}
	slices.Sort(out)
	return out
}

// listMembers writes members compactly: "0-9", "0, 2, 5-7".
func listMembers(ns []int) string {
	var parts []string
	for i := 0; i < len(ns); {
		j := i
		for j+1 < len(ns) && ns[j+1] == ns[j]+1 {
			j++
		}
		if j > i {
			parts = append(parts, fmt.Sprintf("%d-%d", ns[i], ns[j]))
		} else {
			parts = append(parts, fmt.Sprint(ns[i]))
		}
		i = j + 1
	}
	return strings.Join(parts, ", ")
}

// checkMember reports a *MemberError when member n is not among the
// members of all (the messages before the member filter).
func checkMember(n int, all []Message) error {
	ns := members(all)
	src := sources(all)
	if n < 0 {
		return &MemberError{Source: src, Member: n, What: fmt.Sprintf("ensemble member %d: a member is a perturbation number, 0 or more", n)}
	}
	if slices.Contains(ns, n) {
		return nil
	}
	if len(ns) == 0 {
		return &MemberError{Source: src, Member: n, What: fmt.Sprintf("ensemble member %d asked for, but the files hold no ensemble members (no product template 4.1 winds or temperature)", n)}
	}
	return &MemberError{Source: src, Member: n, What: fmt.Sprintf("ensemble member %d is not in the files; members present: %s", n, listMembers(ns))}
}

// sources lists the distinct sources of msgs, in order.
func sources(msgs []Message) string {
	var out []string
	for i := range msgs {
		if !slices.Contains(out, msgs[i].Source) {
			out = append(out, msgs[i].Source)
		}
	}
	return strings.Join(out, ", ")
}

// selectMember keeps only member n (and the fields of no member).
func (r *aread) selectMember(n int) error {
	if err := checkMember(n, r.kept); err != nil {
		return err
	}
	r.member = &n
	kept := r.kept[:0:0]
	for i := range r.kept {
		if r.want(&r.kept[i]) {
			kept = append(kept, r.kept[i])
		}
	}
	r.kept = kept
	return nil
}

// An Ensemble is the members of an ensemble forecast, each a Field on the
// same grids, levels and times, ascending by member number (so the
// control forecast, which producers number 0, common practice, comes
// first when present). Fields of no
// member in the files read (say EDR from a deterministic hazard file) are
// shared by every member. Memory is that of one Field per member.
type Ensemble struct {
	Members []int    // perturbation numbers, ascending
	Fields  []*Field // Fields[i] is member Members[i]
}

// OpenEnsemble opens every ensemble member of the files at paths (one
// file holding all members, one file per member, or any mix), with the
// default Options.
func OpenEnsemble(paths ...string) (*Ensemble, error) { return Options{}.OpenEnsemble(paths...) }

// OpenEnsemble is Open for every ensemble member: messages are grouped by
// perturbation number (product template 4.1), those of no member go to
// every member, and each group is laid out as Open lays out a Field. The
// members must agree in every variable's grid, levels and valid times; a
// member that does not is a *MemberError naming its file and number.
// o.Member, when set, keeps that member alone (an Ensemble of one).
// Files without any member are a *MemberError (open them with Open).
// The budget covers all members together, checked from the headers
// before anything is allocated; each file is read twice, as in Open.
// Time and memory: those of Open times the number of members.
func (o Options) OpenEnsemble(paths ...string) (*Ensemble, error) {
	return o.OpenEnsembleBetween(0, math.Inf(1), paths...)
}

// OpenEnsembleBetween is OpenEnsemble keeping the isobaric levels from
// pLow to pHigh (Pa) as OpenBetween does.
func (o Options) OpenEnsembleBetween(pLow, pHigh float64, paths ...string) (*Ensemble, error) {
	r, err := o.prepare(pLow, pHigh, paths)
	if err != nil {
		return nil, err
	}
	ns := members(r.kept)
	if len(ns) == 0 {
		return nil, &MemberError{Source: strings.Join(paths, ", "), Member: -1,
			What: "no ensemble members (no product template 4.1 winds or temperature): open the files as one forecast"}
	}
	if len(ns) > maxMembers {
		return nil, &MemberError{Source: strings.Join(paths, ", "), Member: ns[maxMembers],
			What: fmt.Sprintf("%d ensemble members; at most %d", len(ns), maxMembers)}
	}
	groups := make([][]Message, len(ns))
	var shared []Message
	for i := range r.kept {
		m := &r.kept[i]
		if m.Ensemble < 0 {
			shared = append(shared, *m)
			continue
		}
		j, _ := slices.BinarySearch(ns, m.Ensemble)
		groups[j] = append(groups[j], *m)
	}
	for j := range groups {
		groups[j] = append(groups[j], shared...)
	}
	// Layouts first, from the headers (members that disagree are an
	// error of their own), then the budget of every member's Field
	// together, before anything is allocated.
	e := &Ensemble{Members: ns, Fields: make([]*Field, len(ns))}
	for j := range groups {
		if err := sameLayout(groups[0], groups[j], ns[0], ns[j]); err != nil {
			return nil, err
		}
	}
	need, what := 0.0, ""
	for j := range groups {
		b, w := fieldNeed(groups[j])
		need, what = need+b, w
	}
	if budget := o.budget(); need > float64(budget) {
		n := uint64(math.MaxUint64)
		if need < 1<<63 {
			n = uint64(need)
		}
		return nil, &BudgetError{Source: strings.Join(paths, ", "), Need: n, Budget: uint64(budget),
			What: fmt.Sprintf("%d ensemble members, each %s", len(ns), what)}
	}
	for j := range groups {
		f, err := layout(groups[j])
		if err != nil {
			return nil, fmt.Errorf("member %d: %w", ns[j], err)
		}
		if f.rhRef, err = rhReference(o.RHReference, groups[j]); err != nil {
			return nil, err
		}
		f.member = ns[j]
		e.Fields[j] = f
	}
	if err := r.fill(o, paths, func(m *Message) error {
		if !r.want(m) {
			return nil
		}
		if m.Ensemble < 0 {
			for _, f := range e.Fields {
				if err := f.put(m); err != nil {
					return err
				}
			}
			return nil
		}
		j, ok := slices.BinarySearch(ns, m.Ensemble)
		if !ok {
			return fmt.Errorf("winds: %s: member %d not in the headers read before (file changed between reads?)", where(m), m.Ensemble)
		}
		return e.Fields[j].put(m)
	}); err != nil {
		return nil, err
	}
	for j, f := range e.Fields {
		f.warnings = append(append([]Warning(nil), r.warns...), f.windSanity(groups[j])...)
	}
	if o.Warn != nil {
		for _, w := range r.warns {
			o.Warn(w)
		}
	}
	return e, nil
}

// maxMembers bounds the members of one Ensemble (the largest operational
// ensembles run 50 perturbed members and a control, common practice).
const maxMembers = 1000

// layoutKey is one variable's plane at one level and time.
type layoutKey struct {
	slot  int
	level float64
	t     int64
}

// sameLayout reports a *MemberError when member b's messages do not lie
// on the grids, levels and valid times of member a's: each variable's
// grid, and the set of (variable, level, time) planes.
func sameLayout(a, b []Message, na, nb int) error {
	if na == nb {
		return nil
	}
	var ga [nslots]*Message
	planes := map[layoutKey]*Message{}
	for i := range a {
		m := &a[i]
		s := slotOf(m.Param)
		if ga[s] == nil {
			ga[s] = m
		}
		planes[layoutKey{s, roundLevel(m.Level), m.ValidTime.Unix()}] = m
	}
	seen := map[layoutKey]bool{}
	for i := range b {
		m := &b[i]
		s := slotOf(m.Param)
		if ga[s] == nil {
			return &MemberError{Source: m.Source, Member: nb, What: fmt.Sprintf("member %d has %s (%s) that member %d lacks", nb, m.Param, where(m), na)}
		}
		if !sameGrid(ga[s], m) {
			return &MemberError{Source: m.Source, Member: nb, What: fmt.Sprintf("member %d: %s is on grid %dx%d from (%g, %g) step (%g, %g), member %d on %dx%d from (%g, %g) step (%g, %g) (%s): members must share one grid",
				nb, where(m), m.Ni, m.Nj, m.Lat1, m.Lon1, m.Di, m.Dj, na, ga[s].Ni, ga[s].Nj, ga[s].Lat1, ga[s].Lon1, ga[s].Di, ga[s].Dj, where(ga[s]))}
		}
		k := layoutKey{s, roundLevel(m.Level), m.ValidTime.Unix()}
		if planes[k] == nil {
			return &MemberError{Source: m.Source, Member: nb, What: fmt.Sprintf("member %d: %s has no counterpart in member %d (%s): members must share levels and valid times",
				nb, where(m), na, planeList(a, s))}
		}
		seen[k] = true
	}
	for k, m := range planes {
		if !seen[k] {
			src := sources(b)
			return &MemberError{Source: src, Member: nb, What: fmt.Sprintf("member %d lacks %s at %g Pa, %s, which member %d has (%s): members must share levels and valid times",
				nb, m.Param, m.Level, m.ValidTime.UTC().Format(time.RFC3339), na, where(m))}
		}
	}
	return nil
}

// roundLevel maps a pressure to a key that levels within LevelTolerance
// share in practice (to 1 % of a decade on the log axis is too coarse;
// producers write one member's levels as every other's, so equality to
// 1 Pa is enough).
func roundLevel(p float64) float64 { return math.Round(p) }

// planeList names the valid times of variable s in msgs, for an error.
func planeList(msgs []Message, s int) string {
	seen := map[int64]bool{}
	var ts []string
	for i := range msgs {
		m := &msgs[i]
		if slotOf(m.Param) == s && !seen[m.ValidTime.Unix()] {
			seen[m.ValidTime.Unix()] = true
			ts = append(ts, m.ValidTime.UTC().Format(time.RFC3339))
		}
	}
	slices.Sort(ts)
	return "its valid times " + strings.Join(ts, ", ")
}
