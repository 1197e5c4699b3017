package sim

import (
	"slices"
	"strings"

	"wxstress/model"
)

// TargetYear returns year, or when it is 0 the default target year of a run
// of m over the named periods (DefaultPeriods when none): the season under
// way at the data end. With the heating season among the periods, that is
// the first year from the data end's whose heating season has not ended by
// the data end: a record ending on 31 December targets the next year, one
// ending on 15 December or 15 January the heating season under way (which
// ends the next March, or that March), one ending on 30 June the coming
// winter. Without it, the first year in which a period has not ended. This
// is the one place the default is decided; run output says which year was
// taken.
func TargetYear(m *model.File, year int, periods []string) int {
	if year != 0 {
		return year
	}
	if len(periods) == 0 {
		periods = DefaultPeriods()
	}
	if slices.ContainsFunc(periods, func(p string) bool { return strings.EqualFold(strings.TrimSpace(p), "heating") }) {
		periods = []string{"heating"} // the season a winter run is about (names as ParsePeriod reads them)
	}
	end := m.Data.LastDate
	for y := end.Year(); y <= end.Year()+1; y++ {
		for _, name := range periods {
			if p, err := ParsePeriod(name, y); err == nil && p.To > end { // a bad name is reported by the run
				return y
			}
		}
	}
	return end.Year() + 1
}
