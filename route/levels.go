package route

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// Level-rule kinds accepted by ParseLevelRule.
const (
	// RuleOddEvenMagnetic is the ICAO semicircular rule on magnetic course
	// (Annex 2, Appendix 3, table of cruising levels, RVSM): course 000-179
	// gets the odd thousands FL10, 30, ..., 270, then FL290, 310, ..., 410,
	// 450, 490, 530...; course 180-359 the even thousands FL20, 40, ...,
	// 280, then FL300, 320, ..., 400, 430, 470, 510...
	RuleOddEvenMagnetic = "odd-even-magnetic"
	// RuleOddEvenTrue is the same table applied to the true course, as some
	// airspace (e.g. polar areas) prescribes.
	RuleOddEvenTrue = "odd-even-true"
	// RuleEvery1000 allows every flight level that is a multiple of 10
	// between Min and Max, whatever the course.
	RuleEvery1000 = "every-1000"
	// RuleList allows exactly the listed levels, whatever the course.
	RuleList = "list"
)

// Default level band of a LevelRule whose Min and Max are zero.
const (
	DefaultMinLevel = 100 // FL100
	DefaultMaxLevel = 510 // FL510
)

// LevelRule says which flight levels (hundreds of feet) a segment may use.
// The zero value is RuleOddEvenMagnetic between FL100 and FL510.
type LevelRule struct {
	Kind     string // one of the Rule* constants; "" means RuleOddEvenMagnetic
	Min, Max int    // band in FL, inclusive; 0 means the default; ignored by RuleList
	List     []int  // levels for RuleList
}

// ParseLevelRule parses a rule written as KIND or KIND:MIN-MAX for the
// kinds odd-even-magnetic, odd-even-true and every-1000 (levels as FL
// numbers, an "FL" prefix allowed: "odd-even-true:290-430",
// "every-1000:FL290-FL410"), or list:FL,FL,... ("list:310,330,350").
// The empty string gives the default rule. Levels must be positive
// multiples of 10 from FL010 to FL600 (ParseFL). Errors name the bad part.
func ParseLevelRule(s string) (LevelRule, error) {
	s = strings.TrimSpace(s)
	if s == "" {
		return LevelRule{Kind: RuleOddEvenMagnetic, Min: DefaultMinLevel, Max: DefaultMaxLevel}, nil
	}
	kind, arg, hasArg := strings.Cut(s, ":")
	kind = strings.ToLower(strings.TrimSpace(kind))
	bad := func(part, why string) (LevelRule, error) {
		return LevelRule{}, &FormatError{Source: "level rule " + strconv.Quote(s), Msg: fmt.Sprintf("%q %s", part, why)}
	}
	r := LevelRule{Kind: kind, Min: DefaultMinLevel, Max: DefaultMaxLevel}
	switch kind {
	case RuleOddEvenMagnetic, RuleOddEvenTrue, RuleEvery1000:
		if !hasArg {
			return r, nil
		}
		lo, hi, ok := strings.Cut(arg, "-")
		if !ok {
			return bad(arg, "is not a band MIN-MAX")
		}
		var err error
		if r.Min, err = ParseFL(lo); err != nil {
			return bad(lo, err.Error())
		}
		if r.Max, err = ParseFL(hi); err != nil {
			return bad(hi, err.Error())
		}
		if r.Min > r.Max {
			return bad(arg, "has MIN above MAX")
		}
	case RuleList:
		if !hasArg || strings.TrimSpace(arg) == "" {
			return bad(s, "lists no levels; want list:FL,FL,...")
		}
		r.Min, r.Max = 0, 0
		for f := range strings.SplitSeq(arg, ",") {
			fl, err := ParseFL(f)
			if err != nil {
				return bad(f, err.Error())
			}
			r.List = append(r.List, fl)
		}
	default:
		return bad(kind, "is not a level rule; want odd-even-magnetic, odd-even-true, every-1000 or list")
	}
	return r, nil
}

// Flight levels accepted anywhere levelpath reads one (level rules,
// profiles, blocks): FL010 to FL600 in steps of 10.
const (
	MinFlightLevel = 10
	MaxFlightLevel = 600
)

// ParseFL reads a flight level such as "FL350", "fl350" or "350": an
// integer number of hundreds of feet, a multiple of 10 from FL010 to
// FL600. The error says what is wrong without repeating the text, so a
// caller can quote it in its own context.
func ParseFL(s string) (int, error) {
	t := strings.TrimSpace(s)
	if len(t) > 2 && strings.EqualFold(t[:2], "FL") {
		t = t[2:]
	}
	v, err := strconv.Atoi(t)
	if err != nil || v < MinFlightLevel || v > MaxFlightLevel || v%10 != 0 {
		return 0, fmt.Errorf("is not a flight level (FL%03d to FL%d in steps of 10, such as FL350)", MinFlightLevel, MaxFlightLevel)
	}
	return v, nil
}

// check validates a rule built by hand (ParseLevelRule's output always
// passes).
func (r LevelRule) check() error {
	src := "level rule"
	switch r.Kind {
	case "", RuleOddEvenMagnetic, RuleOddEvenTrue, RuleEvery1000:
		lo, hi := r.band()
		if lo <= 0 || lo > hi {
			return &FormatError{Source: src, Msg: fmt.Sprintf("band FL%d-FL%d is empty or negative", lo, hi)}
		}
	case RuleList:
		if len(r.List) == 0 {
			return &FormatError{Source: src, Msg: "list rule with no levels"}
		}
	default:
		return &FormatError{Source: src, Msg: fmt.Sprintf("%q is not a level rule", r.Kind)}
	}
	return nil
}

func (r LevelRule) band() (lo, hi int) {
	lo, hi = r.Min, r.Max
	if lo == 0 {
		lo = DefaultMinLevel
	}
	if hi == 0 {
		hi = DefaultMaxLevel
	}
	return lo, hi
}

// class returns 0 for the eastern semicircle (course 000-179), 1 for the
// western one, and -1 when the rule ignores the course.
func (r LevelRule) class(trueCourse, magCourse float64) int {
	var c float64
	switch r.Kind {
	case "", RuleOddEvenMagnetic:
		c = magCourse
	case RuleOddEvenTrue:
		c = trueCourse
	default:
		return -1
	}
	if course360(c) < 180 {
		return 0
	}
	return 1
}

// Allowed returns the flight levels, ascending, that the rule allows on a
// segment with the given true and magnetic courses (degrees). It returns a
// new slice each call. Cost O(levels in the band).
func (r LevelRule) Allowed(trueCourse, magCourse float64) []int {
	if r.Kind == RuleList {
		out := slices.Clone(r.List)
		slices.Sort(out)
		return slices.Compact(out)
	}
	lo, hi := r.band()
	cls := r.class(trueCourse, magCourse)
	if cls != -1 && (math.IsNaN(trueCourse) || math.IsNaN(magCourse)) {
		return nil
	}
	var out []int
	for fl := (lo + 9) / 10 * 10; fl <= hi; fl += 10 {
		if cls == -1 || semicircle(fl) == cls {
			out = append(out, fl)
		}
	}
	return out
}

// semicircle returns which semicircle level fl belongs to under ICAO
// Annex 2 Appendix 3 (RVSM table), or -2 for a level in neither: 0 for the
// odd thousands below FL290, FL290-410 in steps of 20, and FL450 + 40k;
// 1 for the even thousands below FL290, FL300-400 in steps of 20 and
// FL430 + 40k.
func semicircle(fl int) int {
	switch {
	case fl%10 != 0:
		return -2
	case fl <= 410:
		if (fl/10)%2 == 1 {
			return 0
		}
		return 1
	case (fl-450)%40 == 0:
		return 0
	case (fl-430)%40 == 0:
		return 1
	}
	return -2
}
