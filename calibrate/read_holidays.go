package calibrate

import (
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"
	"unicode"

	"wxstress/calendar"
)

// Holidays is a holiday list as ReadHolidays reads it: dates given as such
// and yearly rules (a fixed day, the n-th or last weekday of a month, a day
// relative to Easter).
type Holidays struct {
	Dates     []calendar.Date // sorted, without repeats
	DateNames []string        // the name of each of Dates, "" when none is given
	// Rules are in the order of the file, without repeats.
	Rules     []calendar.HolidayRule
	RuleNames []string // the name of each of Rules, "" when none is given
}

// In returns the holidays in the calendar years fromYear..toYear: the listed
// dates that fall in them and each rule's day in every one of them, sorted,
// without repeats.
func (h *Holidays) In(fromYear, toYear int) []calendar.Date {
	var out []calendar.Date
	for _, d := range h.Dates {
		if y := d.Year(); y >= fromYear && y <= toYear {
			out = append(out, d)
		}
	}
	for _, r := range h.Rules {
		out = append(out, r.Dates(fromYear, toYear)...)
	}
	slices.Sort(out)
	return slices.Compact(out)
}

// RuleTexts returns each rule in words ("fourth Thursday of November").
func (h *Holidays) RuleTexts() []string {
	out := make([]string, len(h.Rules))
	for i, r := range h.Rules {
		out[i] = r.String()
	}
	return out
}

// Accepted column names of a holiday list, compared case-insensitively (the
// date column takes dateNames).
var (
	ruleNames        = []string{"rule", "rules"}
	holidayNameNames = []string{"name", "holiday_name", "description"}
)

// ReadHolidaysFile opens path and reads it with ReadHolidays.
func ReadHolidaysFile(path string) (*Holidays, error) {
	return readPath(path, func(r io.Reader) (*Holidays, error) { return ReadHolidays(r, path) })
}

// ReadHolidays reads a holiday list of dates and yearly rules, in one of two
// layouts:
//
//   - a plain list, one entry per line: an ISO date (YYYY-MM-DD) or a rule
//     (see calendar.ParseHolidayRule: fixed 12-25, 4 Thu Nov, last Mon May,
//     easter -2); anything after a comma is ignored;
//   - CSV whose header names a date column (date or day), a rule column (rule
//     or rules), or both, and optionally a name column (name, holiday_name or
//     description); each row gives a date or a rule, not both. Other columns
//     are ignored.
//
// Lines starting with # are comments; blank lines are skipped; the order of
// the entries does not matter and repeats are harmless. Bad entries are
// reported as an ErrorList of *PosError, like ReadCSV's, each naming the
// line and column and what is accepted.
func ReadHolidays(r io.Reader, name string) (*Holidays, error) {
	hp := &holidayParser{rowScanner: newRowScanner(r, name), rule: -1, label: -1}
	hp.cr.FieldsPerRecord = -1 // rows may have any number of fields
	hp.cr.Comment = '#'
	header := false
	err := hp.scanRows(func(record []string) {
		if !header {
			header = true
			if hp.readHeader(record) {
				return
			}
			hp.date = 0 // a plain list: the entry is the first field
			hp.plain = true
		}
		hp.readRow(record)
	})
	if err != nil {
		return nil, err
	}
	if len(hp.dates) == 0 && len(hp.h.Rules) == 0 {
		hp.errorf(0, 0, "", "no holiday dates or rules")
		return nil, hp.errList()
	}
	h := &hp.h
	slices.SortStableFunc(hp.dates, func(a, b namedDate) int { return int(a.d) - int(b.d) })
	for i, nd := range hp.dates {
		if i > 0 && nd.d == hp.dates[i-1].d {
			continue // a repeat: the first name given stays
		}
		h.Dates = append(h.Dates, nd.d)
		h.DateNames = append(h.DateNames, nd.name)
	}
	return h, nil
}

type namedDate struct {
	d    calendar.Date
	name string
}

// holidayParser holds the state of one ReadHolidays call.
type holidayParser struct {
	rowScanner
	plain       bool // a list without a header
	rule, label int  // column indexes, -1 when absent (the date's is rowScanner.date)
	dates       []namedDate
	h           Holidays
}

// readHeader reports whether record is a header row (it names a date or a
// rule column) and, if so, finds the columns.
func (p *holidayParser) readHeader(record []string) bool {
	for i, f := range record {
		f = strings.TrimSpace(f)
		switch {
		case p.date < 0 && slicesIndexFold(dateNames, f) >= 0:
			p.date = i
		case p.rule < 0 && slicesIndexFold(ruleNames, f) >= 0:
			p.rule = i
		case p.label < 0 && slicesIndexFold(holidayNameNames, f) >= 0:
			p.label = i
		}
	}
	if p.date < 0 && p.rule < 0 {
		p.label = -1
		return false
	}
	p.header = make([]string, len(record))
	for i, f := range record {
		p.header[i] = strings.TrimSpace(f)
	}
	return true
}

// field returns column i of record, trimmed, and whether the record has it.
func field(record []string, i int) (string, bool) {
	if i < 0 || i >= len(record) {
		return "", false
	}
	return strings.TrimSpace(record[i]), true
}

// readRow reads one entry: a date or a rule.
func (p *holidayParser) readRow(record []string) {
	dateRaw, hasDate := field(record, p.date)
	ruleRaw, hasRule := field(record, p.rule)
	label, _ := field(record, p.label)
	line, _ := p.cr.FieldPos(0)
	switch {
	case !hasDate && !hasRule && p.rule < 0:
		p.errorf(line, 0, "", "no date: the row has %d fields, the date is field %d", len(record), p.date+1)
	case !hasDate && !hasRule && p.date < 0:
		p.errorf(line, 0, "", "no rule: the row has %d fields, the rule is field %d", len(record), p.rule+1)
	case !hasDate && !hasRule:
		p.errorf(line, 0, "", "no date or rule: the row has %d fields, the date is field %d and the rule field %d",
			len(record), p.date+1, p.rule+1)
	case dateRaw != "" && ruleRaw != "":
		l, c := p.cr.FieldPos(p.rule)
		p.errorf(l, c, "", "a row gives a date or a rule, not both (the date is %s)", quote(dateRaw))
	case p.plain:
		p.plainEntry(dateRaw)
	case dateRaw != "":
		p.dateEntry(dateRaw, label)
	case ruleRaw != "":
		p.ruleEntry(ruleRaw, label)
	default:
		col, want := p.date, "date"
		switch {
		case p.date < 0:
			col, want = p.rule, "rule"
		case p.rule >= 0:
			want = "date or rule"
		}
		l, c := p.cr.FieldPos(col)
		p.errorf(l, c, "", "missing %s", want)
	}
}

// plainEntry reads the first field of a list without a header: a date, or a
// rule when it holds a letter.
func (p *holidayParser) plainEntry(raw string) {
	if raw == "" {
		line, c := p.cr.FieldPos(0)
		p.errorf(line, c, "", "missing date or rule")
		return
	}
	if strings.IndexFunc(raw, unicode.IsLetter) >= 0 {
		p.ruleEntry(raw, "")
		return
	}
	p.dateEntry(raw, "")
}

func (p *holidayParser) dateEntry(raw, label string) {
	line, c := p.cr.FieldPos(p.date)
	d, err := calendar.Parse(raw)
	if err == nil {
		p.dates = append(p.dates, namedDate{d, label})
		return
	}
	hint := ""
	switch _, rerr := calendar.ParseHolidayRule("fixed " + raw); {
	case rerr == nil && len(raw) == 5:
		hint = fmt.Sprintf(" (for the same day every year, give the rule fixed %s)", raw)
	case !p.plain && strings.IndexFunc(raw, unicode.IsLetter) >= 0:
		if _, rerr := calendar.ParseHolidayRule(raw); rerr == nil {
			hint = " (a rule goes in a rule column)"
		}
	}
	p.errorf(line, c, "", "not a date of the form YYYY-MM-DD: %s%s", quote(raw), hint)
}

func (p *holidayParser) ruleEntry(raw, label string) {
	col := p.rule
	if p.plain {
		col = p.date
	}
	line, c := p.cr.FieldPos(col)
	rule, err := calendar.ParseHolidayRule(raw)
	if err != nil {
		reason := err.Error()
		if re, ok := errors.AsType[*calendar.RuleError](err); ok {
			reason = re.Reason
		}
		what := "a holiday rule"
		if p.plain {
			what = "a date (YYYY-MM-DD) or a holiday rule"
		}
		p.errorf(line, c, "", "not %s: %s: %s", what, quote(raw), reason)
		return
	}
	if !slices.Contains(p.h.Rules, rule) {
		p.h.Rules = append(p.h.Rules, rule)
		p.h.RuleNames = append(p.h.RuleNames, label)
	}
}
