package optimizer

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"levelpath/perf"
	"levelpath/route"
)

var nan = math.NaN()

// Units, perf's: nautical miles and feet to metres.
const (
	nmToM = perf.NMToM
	ftToM = perf.FtToM
)

// Change is a level change that begins at AtDist metres from departure.
type Change struct {
	AtDist float64
	FL     int
}

// Profile is a vertical profile: the initial cruise level and the level
// changes along the route, in order of distance.
type Profile struct {
	Initial int
	Changes []Change
}

// ProfileError reports a malformed profile string.
type ProfileError struct {
	Input string
	Part  string
	Msg   string
}

func (e *ProfileError) Error() string {
	return fmt.Sprintf("profile %q: %q: %s", e.Input, e.Part, e.Msg)
}

// ParseProfile parses "FL350,FL370@1250,FL390@2900": the initial level,
// then level@NM where each change begins, NM counted from departure. The
// "FL" prefix is optional; distances must increase and levels are read
// by route.ParseFL (FL010..FL600 in steps of 10).
func ParseProfile(s string) (Profile, error) {
	var p Profile
	parts := strings.Split(strings.TrimSpace(s), ",")
	if len(parts) == 0 || strings.TrimSpace(parts[0]) == "" {
		return p, &ProfileError{s, s, "empty profile; want e.g. FL350,FL370@1250"}
	}
	last := -1.0
	for i, raw := range parts {
		part := strings.TrimSpace(raw)
		lvl, at, hasAt := strings.Cut(part, "@")
		fl, err := route.ParseFL(lvl)
		if err != nil {
			return p, &ProfileError{s, part, err.Error()}
		}
		if i == 0 {
			if hasAt {
				return p, &ProfileError{s, part, "the initial level takes no @distance"}
			}
			p.Initial = fl
			continue
		}
		if !hasAt {
			return p, &ProfileError{s, part, "a level change needs @NM (distance from departure where it begins)"}
		}
		nm, err := strconv.ParseFloat(strings.TrimSpace(at), 64)
		if err != nil || math.IsNaN(nm) || math.IsInf(nm, 0) || nm < 0 || nm > 30000 {
			return p, &ProfileError{s, part, "distance must be a number of NM from 0 to 30000"}
		}
		if nm <= last {
			return p, &ProfileError{s, part, "distances must increase along the profile"}
		}
		last = nm
		p.Changes = append(p.Changes, Change{AtDist: nm * nmToM, FL: fl})
	}
	return p, nil
}

// String formats the profile in the form ParseProfile reads, distances in
// whole NM.
func (p Profile) String() string {
	var b strings.Builder
	fmt.Fprintf(&b, "FL%03d", p.Initial)
	for _, c := range p.Changes {
		fmt.Fprintf(&b, ",FL%03d@%.0f", c.FL, c.AtDist/nmToM)
	}
	return b.String()
}

// sorted reports whether changes are in increasing distance.
func (p Profile) sorted() bool {
	return sort.SliceIsSorted(p.Changes, func(i, j int) bool { return p.Changes[i].AtDist < p.Changes[j].AtDist })
}
