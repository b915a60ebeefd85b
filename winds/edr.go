package winds

import (
	"fmt"
	"slices"
	"strings"
)

// edrNames are the parameters of GRIB2 code table 4.2.0.19 that carry an
// eddy dissipation rate (m^(2/3)/s).
var edrNames = map[int]string{
	28: "mountain wave turbulence EDR",
	29: "clear air turbulence EDR",
	30: "eddy dissipation parameter",
	31: "maximum of eddy dissipation parameter in layer",
}

// isEDR reports whether m carries EDR: kept as ParamEDR, or GRIB2
// discipline 0, category 19, 28-31 whatever its product template and level.
func isEDR(m *Message) bool {
	return m.Param == ParamEDR || (m.Edition == 2 && m.Discipline == 0 && m.Category == 19 && edrNames[m.Number] != "")
}

func edrName(n int) string { return fmt.Sprintf("0.19.%d (%s)", n, edrNames[n]) }

// selectEDR chooses the EDR parameter number to use among the EDR
// messages of msgs: want when not 0 (an error if absent), else
// DefaultEDRParam if present, else the only one, else the first of 29,
// 28, 31 present. It returns 0 when msgs hold no EDR, and warnings naming
// the EDR parameters present but not used, EDR in product templates
// that are not read (anything but 4.0, 4.1 and 4.15) and EDR taken from
// spatial statistics (4.15), each naming the first message it is about.
func selectEDR(msgs []Message, want int) (int, []Warning, error) {
	present := map[int]int{}     // number -> messages, kept templates
	ignored := map[[2]int]int{}  // {template, number} -> messages not read
	offLevel := map[[2]int]int{} // {level type, number} -> messages not read
	spatial := map[int]int{}     // number -> template 4.15 messages
	// The first message of each count, named by the warning about it.
	firstOf := map[[3]int]*Message{}
	note := func(kind int, k [2]int, m *Message) {
		if firstOf[[3]int{kind, k[0], k[1]}] == nil {
			firstOf[[3]int{kind, k[0], k[1]}] = m
		}
	}
	warn := func(m *Message, what string) Warning {
		return Warning{Source: m.Source, Message: m.Index, Offset: m.Offset, What: what}
	}
	for i := range msgs {
		m := &msgs[i]
		if !isEDR(m) {
			continue
		}
		switch {
		case m.Param == ParamEDR:
		case m.Product == 0 || m.Product == 1 || m.Product == 15:
			k := [2]int{m.LevelType, m.Number}
			offLevel[k]++
			note(1, k, m)
			continue
		default:
			k := [2]int{m.Product, m.Number}
			ignored[k]++
			note(2, k, m)
			continue
		}
		present[m.Number]++
		note(0, [2]int{0, m.Number}, m)
		if m.Product == 15 {
			spatial[m.Number]++
			note(3, [2]int{0, m.Number}, m)
		}
	}
	var nums []int
	for n := range present {
		nums = append(nums, n)
	}
	slices.Sort(nums)
	var warnings []Warning
	for k, c := range ignored {
		warnings = append(warnings, warn(firstOf[[3]int{2, k[0], k[1]}], fmt.Sprintf("EDR %s in product template 4.%d (%d messages) not read: only templates 4.0, 4.1 and 4.15 are", edrName(k[1]), k[0], c)))
	}
	for k, c := range offLevel {
		warnings = append(warnings, warn(firstOf[[3]int{1, k[0], k[1]}], fmt.Sprintf("EDR %s on fixed surface type %d (%d messages) not read: only isobaric surfaces (type 100) are", edrName(k[1]), k[0], c)))
	}
	slices.SortFunc(warnings, func(a, b Warning) int { return strings.Compare(a.What, b.What) })
	chosen := 0
	switch {
	case want != 0:
		if present[want] == 0 {
			var have []string
			for _, n := range nums {
				have = append(have, edrName(n))
			}
			if len(have) == 0 {
				have = []string{"none"}
			}
			return 0, nil, fmt.Errorf("winds: EDR parameter %d asked for, but the files hold EDR parameters: %s", want, strings.Join(have, ", "))
		}
		chosen = want
	case len(nums) == 0:
		return 0, warnings, nil
	case present[DefaultEDRParam] > 0:
		chosen = DefaultEDRParam
	case len(nums) == 1:
		chosen = nums[0]
	default:
		for _, n := range []int{29, 28, 31} {
			if present[n] > 0 {
				chosen = n
				break
			}
		}
	}
	if len(nums) > 1 {
		var others []string
		for _, n := range nums {
			if n != chosen {
				others = append(others, edrName(n))
			}
		}
		how := "the default"
		if want != 0 {
			how = "as asked"
		}
		warnings = append(warnings, warn(firstOf[[3]int{0, 0, chosen}], fmt.Sprintf("EDR: using %s (%s); also in the files, not used: %s", edrName(chosen), how, strings.Join(others, ", "))))
	}
	if c := spatial[chosen]; c > 0 {
		warnings = append(warnings, warn(firstOf[[3]int{3, 0, chosen}], fmt.Sprintf("EDR %s: %d messages are spatial statistics (product template 4.15, e.g. a maximum over neighbouring points), used as the value at each grid point", edrName(chosen), c)))
	}
	return chosen, warnings, nil
}
