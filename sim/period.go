package sim

import (
	"errors"
	"fmt"
	"strings"
	"time"

	"wxstress/calendar"
)

// Period is an index window of the target year: the days From..To inclusive.
type Period struct {
	Name string // as the user gave it: "year", "heating", "jan", "12-01:02-28", ...
	From calendar.Date
	To   calendar.Date
}

// Days returns the number of days in the period.
func (p Period) Days() int { return int(p.To-p.From) + 1 }

var monthKeys = []string{"jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec"}

// DefaultPeriods returns the periods used when none is named (a new slice
// each time).
func DefaultPeriods() []string { return []string{"year", "heating", "cooling"} }

// PeriodForms describes the accepted period names, for usage messages.
const PeriodForms = "year; jan..dec; heating (1 Nov of Y−1 to 31 Mar of Y); cooling (1 May to 30 Sep); " +
	"gas-year (1 Oct of Y−1 to 30 Sep of Y); or a window MM-DD:MM-DD (one that crosses the year end starts in Y−1)"

// ParsePeriod resolves a period name for target year y. Periods that cross
// the year end are the ones that end in y: the heating season of y runs from
// 1 November of y−1 to 31 March of y, the gas year of y from 1 October of y−1
// to 30 September of y, and a window 12-01:02-28 from 1 December of y−1.
func ParsePeriod(name string, y int) (Period, error) {
	key := strings.ToLower(strings.TrimSpace(name))
	d := func(yy int, m time.Month, day int) calendar.Date { return calendar.FromYMD(yy, m, day) }
	p := Period{Name: key}
	switch key {
	case "year":
		p.From, p.To = d(y, 1, 1), d(y, 12, 31)
	case "heating":
		p.From, p.To = d(y-1, 11, 1), d(y, 3, 31)
	case "cooling":
		p.From, p.To = d(y, 5, 1), d(y, 9, 30)
	case "gas-year":
		p.From, p.To = d(y-1, 10, 1), d(y, 9, 30)
	default:
		for i, m := range monthKeys {
			if key == m {
				mm := time.Month(i + 1)
				p.From, p.To = d(y, mm, 1), d(y, mm+1, 1)-1
				return p, nil
			}
		}
		a, b, ok := strings.Cut(key, ":")
		if !ok {
			return p, fmt.Errorf("sim: unknown period %q: want %s", name, PeriodForms)
		}
		fm, fd, err1 := monthDay(a)
		tm, td, err2 := monthDay(b)
		if err1 != nil || err2 != nil {
			return p, fmt.Errorf("sim: malformed window %q: want MM-DD:MM-DD with real dates, e.g. 12-01:02-28", name)
		}
		fy := y
		if fm > tm || fm == tm && fd > td {
			fy = y - 1
		}
		p.From, p.To = d(fy, fm, fd), d(y, tm, td)
		if fd == 29 && fm == 2 && calendar.DaysIn(fy) == 365 {
			p.From = d(fy, 3, 1)
		}
		if td == 29 && tm == 2 && calendar.DaysIn(y) == 365 {
			p.To = d(y, 2, 28)
		}
		if p.To < p.From {
			return p, fmt.Errorf("%w %q has no days in %d: 29 February is not in that year", ErrPeriod, name, y)
		}
	}
	return p, nil
}

// ErrPeriod is wrapped by the error for a window that has no days in the
// target year (02-29:02-29 outside a leap year), or fewer than the cold
// snap's: a usage error.
var ErrPeriod = errors.New("sim: period")

// monthDay parses MM-DD, allowing 02-29.
func monthDay(s string) (time.Month, int, error) {
	d, err := calendar.Parse("2000-" + s)
	if err != nil || len(s) != 5 {
		return 0, 0, fmt.Errorf("bad month-day %q", s)
	}
	_, m, day := d.YMD()
	return m, day, nil
}
