package calendar

import (
	"fmt"
	"slices"
	"strconv"
	"strings"
	"time"
)

// RuleKind says how a HolidayRule finds its day.
type RuleKind uint8

// The kinds of holiday rule.
const (
	FixedDate    RuleKind = iota + 1 // Month and Day
	NthWeekday                       // the N-th Weekday of Month
	LastWeekday                      // the last Weekday of Month
	EasterOffset                     // Easter Sunday + Offset days
)

// Limits of a rule's fields.
const (
	// MaxNth is the largest N of an NthWeekday rule: every month has four
	// of each weekday, but not always a fifth.
	MaxNth = 4
	// MinEasterOffset and MaxEasterOffset keep an Easter-relative day in
	// Easter's own year: Easter falls between 22 March (day 81 of a common
	// year) and 25 April (day 115, or 116 of a leap year), so day 1 is at
	// most 80 days before it and the year's last day at least 250 after.
	MinEasterOffset = -80
	MaxEasterOffset = 250
)

// RuleForms describes the accepted rule syntax, for usage and error messages.
const RuleForms = "fixed MM-DD (fixed 12-25); N WEEKDAY MONTH with N 1..4 (4 Thu Nov); " +
	"last WEEKDAY MONTH (last Mon May); easter or easter ±DAYS (easter -2, easter +1)"

// HolidayRule is a holiday that falls on one day of every year. Which fields
// count depends on Kind:
//
//	FixedDate     Month, Day (a 29 February rule has no day in common years)
//	NthWeekday    N (1..MaxNth), Weekday, Month
//	LastWeekday   Weekday, Month
//	EasterOffset  Offset, days after Easter Sunday (negative: before),
//	              MinEasterOffset..MaxEasterOffset
//
// The zero value is not a rule. Rules are comparable: two rules that name
// the same day are ==.
type HolidayRule struct {
	Kind    RuleKind
	Month   time.Month
	Day     int
	N       int
	Weekday time.Weekday
	Offset  int
}

// Fixed returns the rule for month m, day d every year. It panics unless
// the day exists in some year (29 February does, in leap years).
func Fixed(m time.Month, d int) HolidayRule {
	r := HolidayRule{Kind: FixedDate, Month: m, Day: d}
	r.mustValid()
	return r
}

// Nth returns the rule for the n-th weekday wd of month m, n = 1..MaxNth.
// It panics for other n.
func Nth(n int, wd time.Weekday, m time.Month) HolidayRule {
	r := HolidayRule{Kind: NthWeekday, N: n, Weekday: wd, Month: m}
	r.mustValid()
	return r
}

// Last returns the rule for the last weekday wd of month m.
func Last(wd time.Weekday, m time.Month) HolidayRule {
	r := HolidayRule{Kind: LastWeekday, Weekday: wd, Month: m}
	r.mustValid()
	return r
}

// Easter returns the rule for Easter Sunday plus offset days. It panics
// for an offset outside MinEasterOffset..MaxEasterOffset.
func Easter(offset int) HolidayRule {
	r := HolidayRule{Kind: EasterOffset, Offset: offset}
	r.mustValid()
	return r
}

func (r HolidayRule) mustValid() {
	if err := r.check(); err != nil {
		panic("calendar: " + err.Error())
	}
}

// check reports a rule whose fields are out of range.
func (r HolidayRule) check() error {
	monthOK := r.Month >= time.January && r.Month <= time.December
	weekdayOK := r.Weekday >= time.Sunday && r.Weekday <= time.Saturday
	switch r.Kind {
	case FixedDate:
		if !monthOK || r.Day < 1 || r.Day > daysInMonth(r.Month) {
			return fmt.Errorf("no day %02d-%02d in any year", int(r.Month), r.Day)
		}
	case NthWeekday:
		if !monthOK || !weekdayOK || r.N < 1 || r.N > MaxNth {
			return fmt.Errorf("n-th weekday rule with n %d, weekday %d, month %d", r.N, int(r.Weekday), int(r.Month))
		}
	case LastWeekday:
		if !monthOK || !weekdayOK {
			return fmt.Errorf("last-weekday rule with weekday %d, month %d", int(r.Weekday), int(r.Month))
		}
	case EasterOffset:
		if r.Offset < MinEasterOffset || r.Offset > MaxEasterOffset {
			return fmt.Errorf("Easter offset %d outside %d..%+d", r.Offset, MinEasterOffset, MaxEasterOffset)
		}
	default:
		return fmt.Errorf("unknown rule kind %d", r.Kind)
	}
	return nil
}

// daysInMonth is the longest the month gets (29 for February).
func daysInMonth(m time.Month) int {
	if m == time.February {
		return 29
	}
	return FromYMD(2001, m+1, 0).Time().Day()
}

// EasterSunday returns the date of Easter Sunday in year y by the Gregorian
// computus (the anonymous Gregorian algorithm of Meeus, Jones and Butcher;
// see the package documentation). For y < 1583 the date is proleptic. It
// panics for a negative year.
func EasterSunday(y int) Date {
	if y < 0 {
		panic(fmt.Sprintf("calendar: Easter of negative year %d", y))
	}
	a := y % 19
	b, c := y/100, y%100
	d, e := b/4, b%4
	f := (b + 8) / 25
	g := (b - f + 1) / 3
	h := (19*a + b - d - g + 15) % 30
	i, k := c/4, c%4
	l := (32 + 2*e + 2*i - h - k) % 7
	m := (a + 11*h + 22*l) / 451
	n := h + l - 7*m + 114
	return FromYMD(y, time.Month(n/31), n%31+1)
}

// In returns the rule's day in year y, and false when the rule has no day
// that year (29 February of a common year). It panics for a rule that is not
// valid (the zero value, or fields out of range).
func (r HolidayRule) In(y int) (Date, bool) {
	r.mustValid()
	switch r.Kind {
	case FixedDate:
		d := FromYMD(y, r.Month, r.Day)
		return d, d.Month() == r.Month
	case NthWeekday:
		first := FromYMD(y, r.Month, 1)
		ahead := (int(r.Weekday) - int(first.Weekday()) + 7) % 7
		return first + Date(ahead+7*(r.N-1)), true
	case LastWeekday:
		last := FromYMD(y, r.Month+1, 0)
		back := (int(last.Weekday()) - int(r.Weekday) + 7) % 7
		return last - Date(back), true
	default: // EasterOffset
		return EasterSunday(y) + Date(r.Offset), true
	}
}

// Dates returns the rule's days in the years fromYear..toYear inclusive, in
// date order; none when toYear < fromYear.
func (r HolidayRule) Dates(fromYear, toYear int) []Date {
	var out []Date
	for y := fromYear; y <= toYear; y++ {
		if d, ok := r.In(y); ok {
			out = append(out, d)
		}
	}
	return out
}

// HolidaysIn returns the holidays of the calendar years fromYear..toYear
// given by a list of dates and a set of rules: the month and day of each
// listed date repeated in every one of those years, as fixed-date holidays
// (a 29 February only in leap years), and each rule's day in every one of
// them; sorted, without repeats. Movable holidays belong in rules: a listed
// date keeps its month and day.
func HolidaysIn(dates []Date, rules []HolidayRule, fromYear, toYear int) []Date {
	var out []Date
	for _, d := range dates {
		_, m, day := d.YMD()
		for y := fromYear; y <= toYear; y++ {
			if h := FromYMD(y, m, day); h.Month() == m {
				out = append(out, h)
			}
		}
	}
	for _, r := range rules {
		out = append(out, r.Dates(fromYear, toYear)...)
	}
	slices.Sort(out)
	return slices.Compact(out)
}

var ordinalWords = [...]string{"", "first", "second", "third", "fourth"}

// String describes the rule in words: "25 December", "fourth Thursday of
// November", "last Monday of May", "Easter Sunday", "Easter + 1 day",
// "Easter − 2 days". ParseHolidayRule reads it back.
func (r HolidayRule) String() string {
	if err := r.check(); err != nil {
		return "invalid holiday rule: " + err.Error()
	}
	switch r.Kind {
	case FixedDate:
		return fmt.Sprintf("%d %s", r.Day, r.Month)
	case NthWeekday:
		return fmt.Sprintf("%s %s of %s", ordinalWords[r.N], r.Weekday, r.Month)
	case LastWeekday:
		return fmt.Sprintf("last %s of %s", r.Weekday, r.Month)
	}
	switch n := r.Offset; {
	case n == 0:
		return "Easter Sunday"
	case n == 1:
		return "Easter + 1 day"
	case n == -1:
		return "Easter − 1 day"
	case n > 0:
		return fmt.Sprintf("Easter + %d days", n)
	default:
		return fmt.Sprintf("Easter − %d days", -n)
	}
}

// RuleError is a holiday rule that does not parse.
type RuleError struct {
	Rule   string // the text as given
	Reason string // what is wrong, naming what is accepted
}

func (e *RuleError) Error() string {
	return "calendar: holiday rule " + strconv.Quote(e.Rule) + ": " + e.Reason
}

// ParseHolidayRule reads a holiday rule in the compact form ("fixed 12-25",
// "4 Thu Nov", "last Mon May", "easter -2") or the natural one String writes
// ("25 December", "fourth Thursday of November", "Easter − 2 days"). Case
// does not matter; weekdays and months are their English names or their
// first three letters; "of" is optional. An error is a *RuleError.
func ParseHolidayRule(s string) (HolidayRule, error) {
	fail := func(format string, args ...any) (HolidayRule, error) {
		return HolidayRule{}, &RuleError{Rule: s, Reason: fmt.Sprintf(format, args...)}
	}
	text := strings.ToLower(strings.Join(strings.Fields(s), " "))
	text = strings.ReplaceAll(text, "−", "-") // U+2212, as String writes it
	if text == "" {
		return fail("empty: want %s", RuleForms)
	}
	if rest, ok := strings.CutPrefix(text, "easter"); ok {
		return parseEaster(rest, fail)
	}
	w := strings.Fields(text)
	orig := strings.Fields(s) // as written, for messages
	if len(w) == 4 && w[2] == "of" {
		w = []string{w[0], w[1], w[3]}
		orig = []string{orig[0], orig[1], orig[3]}
	}
	switch {
	case len(w) == 2 && w[0] == "fixed":
		md, err := Parse("2000-" + w[1]) // a leap year, so 02-29 is accepted
		if err != nil || len(w[1]) != 5 {
			return fail("%q is not a month and day of the form MM-DD (12-25)", orig[1])
		}
		_, m, d := md.YMD()
		return HolidayRule{Kind: FixedDate, Month: m, Day: d}, nil
	case len(w) == 2: // 25 December, as String writes it
		m, okM := monthNamed(w[1])
		d, err := strconv.Atoi(w[0])
		if !okM || err != nil {
			break
		}
		r := HolidayRule{Kind: FixedDate, Month: m, Day: d}
		if r.check() != nil {
			return fail("%s has no day %d", m, d)
		}
		return r, nil
	case len(w) == 3:
		n, okN := ordinal(w[0])
		if !okN && w[0][0] >= '0' && w[0][0] <= '9' {
			return fail("%q is not 1..4 or last (first..fourth and 1st..4th too)", orig[0])
		}
		if !okN {
			break
		}
		wd, ok := weekdayNamed(w[1])
		if !ok {
			return fail("%q is not a weekday: want Mon, Tue, Wed, Thu, Fri, Sat, Sun or the full name", orig[1])
		}
		m, ok := monthNamed(w[2])
		if !ok {
			return fail("%q is not a month: want Jan..Dec or the full name", orig[2])
		}
		switch {
		case n == 0:
			return HolidayRule{Kind: LastWeekday, Weekday: wd, Month: m}, nil
		case n > MaxNth:
			return fail("a fifth %s is not in every %s: use last %s %s", wd, m, wd.String()[:3], m.String()[:3])
		}
		return HolidayRule{Kind: NthWeekday, N: n, Weekday: wd, Month: m}, nil
	}
	return fail("want %s", RuleForms)
}

// parseEaster reads what follows "easter": nothing or "sunday" for Easter
// Sunday, else a signed day count with an optional "day" or "days".
func parseEaster(rest string, fail func(string, ...any) (HolidayRule, error)) (HolidayRule, error) {
	rest = strings.ReplaceAll(rest, " ", "")
	if rest == "" || rest == "sunday" {
		return HolidayRule{Kind: EasterOffset}, nil
	}
	num := strings.TrimSuffix(strings.TrimSuffix(rest, "s"), "day")
	if num == "" || (num[0] != '+' && num[0] != '-') {
		return fail("want easter, or easter followed by a signed number of days (easter -2, easter +1)")
	}
	n, err := strconv.Atoi(num)
	if err != nil {
		return fail("%q is not a signed whole number of days (easter -2, easter +1)", num)
	}
	if n < MinEasterOffset || n > MaxEasterOffset {
		return fail("offset %d is outside %d..%+d days (the day must stay in Easter's year)", n, MinEasterOffset, MaxEasterOffset)
	}
	return HolidayRule{Kind: EasterOffset, Offset: n}, nil
}

// ordinal reads 1..5, 1st..5th or first..fifth as n, and last as 0.
func ordinal(s string) (int, bool) {
	if s == "last" {
		return 0, true
	}
	for i, w := range []string{"first", "second", "third", "fourth", "fifth"} {
		n := strconv.Itoa(i + 1)
		if s == w || s == n || s == n+[]string{"st", "nd", "rd", "th", "th"}[i] {
			return i + 1, true
		}
	}
	return 0, false
}

func weekdayNamed(s string) (time.Weekday, bool) {
	for wd := time.Sunday; wd <= time.Saturday; wd++ {
		full := strings.ToLower(wd.String())
		if s == full || s == full[:3] {
			return wd, true
		}
	}
	return 0, false
}

func monthNamed(s string) (time.Month, bool) {
	for m := time.January; m <= time.December; m++ {
		full := strings.ToLower(m.String())
		if s == full || s == full[:3] {
			return m, true
		}
	}
	return 0, false
}
