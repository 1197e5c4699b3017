package sim

import (
	"wxstress/model"
)

// TargetYear returns year, or when it is 0 the default target year of a run
// of m over the named periods (DefaultPeriods when none): the first year from
// the data end's in which a period has not ended by the data end — the
// season under way. A record ending on 31 December targets the next year; one
// ending on 15 January targets the heating season under way, which ends that
// March. This is the one place the default is decided; run output says which
// year was taken.
func TargetYear(m *model.File, year int, periods []string) int {
	if year != 0 {
		return year
	}
	if len(periods) == 0 {
		periods = DefaultPeriods()
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
