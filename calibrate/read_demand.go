package calibrate

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"wxstress/calendar"
)

// DemandReadOptions controls how ReadDemand interprets a file. The zero value
// reads the file's own holiday column, if any, and nothing else.
type DemandReadOptions struct {
	// Holidays is a separate holiday list (see ReadHolidays), merged with
	// the file's holiday column: a day is a holiday when either says so.
	// Its rules are expanded over the calendar years of the demand record;
	// dates outside the record are ignored. Nil means no list.
	Holidays *Holidays
	// HolidaysName names the list in messages and in the model file.
	HolidaysName string
	// LoadColumn names the load column (matched without regard to case);
	// "" looks for one of the accepted names (load, demand, ...).
	LoadColumn string
}

// DemandSeries is a daily demand history as read: one entry per data row, in
// strictly increasing date order. Days without a row are not in it.
type DemandSeries struct {
	Name    string          // the file name, for messages and the manifest
	Dates   []calendar.Date // one per row, strictly increasing
	Load    []float64       // the row's load; NaN = missing (a gap, not an error)
	Holiday []bool          // from the holiday column and the holiday list
	// Line and Column locate each row's date field in the input, so that
	// later checks (the join with temperatures) can point at the row.
	Line   []int32
	Column []int32

	DateColumn    string // header name of the date column
	LoadColumn    string // header name of the load column
	HolidayColumn string // header name of the holiday column, "" without one
	HolidaysFile  string // DemandReadOptions.HolidaysName, when a list was merged
	Missing       int    // rows whose load is missing
	Absent        int    // days between the first and last row that have no row
	Holidays      int    // rows marked as holidays (column or list)
	Warnings      []string
	SHA256        string // hex SHA-256 of the input bytes
	// HolidayListDates and HolidayRules describe the merged holiday list:
	// how many dates it gives as such, and its rules in words.
	HolidayListDates int
	HolidayRules     []string
}

// DaysWithLoad returns the number of rows with a load.
func (d *DemandSeries) DaysWithLoad() int { return len(d.Dates) - d.Missing }

func (d *DemandSeries) setSHA256(hex string) { d.SHA256 = hex }

// Accepted column names of a demand file, compared case-insensitively.
var (
	loadNames    = []string{"load", "demand", "consumption", "value"}
	holidayNames = []string{"holiday", "is_holiday", "holidays"}
)

// MinDemandDays is the fewest days with a load ReadDemand accepts (and the
// fewest joined days FitDemand fits): a full year, so that the record holds a
// heating and a cooling season.
const MinDemandDays = 365

// ReadDemandFile opens path and reads it with ReadDemand, using path as the
// name.
func ReadDemandFile(path string, opt DemandReadOptions) (*DemandSeries, error) {
	return readPath(path, func(r io.Reader) (*DemandSeries, error) { return ReadDemand(r, path, opt) })
}

// ReadDemand reads a daily demand history from r; name is used in messages
// and stored in DemandSeries.Name.
//
// The input is CSV with a header row. Columns are found by name, ignoring
// case and surrounding spaces: the date (date or day, as YYYY-MM-DD), the
// load (load, demand, consumption or value; a number ≥ 0 in the unit the user
// states) and, optionally, a holiday flag (holiday, is_holiday or holidays:
// 1/0, true/false, yes/no, or empty for 0). Other columns are ignored. A
// UTF-8 byte order mark, CRLF line ends and blank lines are tolerated.
//
// Empty loads, NA, NaN, null and -9999 are missing: such a row is a gap,
// counted in Missing, not an error. Rows must be in date order without
// repeats, and at least MinDemandDays rows must have a load.
//
// Bad data is reported as an ErrorList of *PosError holding the problems
// found, each with its line and column (the first MaxErrors, then a count of
// the further bad rows); the list wraps ErrBadInput. A failure of r itself is returned wrapped, without ErrBadInput.
func ReadDemand(r io.Reader, name string, opt DemandReadOptions) (*DemandSeries, error) {
	p := &demandParser{rowScanner: newRowScanner(r, name), opt: opt}
	return readTable(&p.rowScanner, p.readHeader, p.readRow, p.series)
}

// demandParser holds the state of one ReadDemand call.
type demandParser struct {
	rowScanner
	opt     DemandReadOptions
	load    int // column index of the load
	holiday int // column index of the holiday flag, or -1
	d       DemandSeries
	loadPos [][2]int // line and column of each kept row's load field
}

func (p *demandParser) readHeader() error {
	if ok, err := p.headerRow(); !ok {
		return err
	}
	p.date = p.find(dateNames, "the date", true)
	p.holiday = p.find(holidayNames, "the holiday flag", true)
	p.needColumn(p.date, "date", dateNames)
	if p.opt.LoadColumn != "" {
		p.load = p.namedColumn(p.opt.LoadColumn, "load")
	} else {
		p.load = p.find(loadNames, "the load", true)
		p.needColumn(p.load, "load", loadNames)
	}
	if p.load >= 0 && p.load == p.holiday {
		p.errorf(1, 0, "", "the load column %q is the holiday flag's: name the column of the loads (--load-column)", p.header[p.load])
	}
	if len(p.errs) > 0 {
		return p.errList()
	}
	p.d.DateColumn = p.header[p.date]
	p.d.LoadColumn = p.header[p.load]
	if p.holiday >= 0 {
		p.d.HolidayColumn = p.header[p.holiday]
	}
	return nil
}

// readRow checks one data row and, when its date is usable, appends it.
func (p *demandParser) readRow(record []string) {
	before := len(p.errs)
	defer func() { sortByColumn(p.errs[before:]) }()

	load := p.loadValue(record)
	hol := false
	if p.holiday >= 0 {
		hol = p.holidayValue(record)
	}
	d, line, col, ok := p.rowDate(record, p.d.Dates, p.d.Line)
	if !ok {
		return
	}
	ll, lc := p.cr.FieldPos(p.load)
	p.loadPos = append(p.loadPos, [2]int{ll, lc})
	p.d.Dates = append(p.d.Dates, d)
	p.d.Load = append(p.d.Load, load)
	p.d.Holiday = append(p.d.Holiday, hol)
	p.d.Line = append(p.d.Line, lineNumber(line))
	p.d.Column = append(p.d.Column, lineNumber(col))
}

// loadValue parses the load field: NaN for a missing value, and NaN with an
// error recorded for a bad one.
func (p *demandParser) loadValue(record []string) float64 {
	v, raw, ok := p.number(record, p.load)
	if !ok {
		return math.NaN()
	}
	if v < 0 {
		p.fieldErrorf(p.load, "negative load %s: a load must be zero or more (leave it empty if it is missing)", quote(raw))
		return math.NaN()
	}
	return v
}

// loadOutlier is how many times the record's 90th percentile of positive
// loads a day's load may be: a thousandfold is no peak day but a typing or
// unit error (a cold winter's peak is a few times a typical day; a
// cooling-only load with a near-zero base still has a 90th percentile near
// its summer days).
const loadOutlier = 1000

// implausibleLoads names the rows whose load is more than loadOutlier
// times the record's 90th percentile of positive loads: one such value
// swamps every fit (it was read as "no dependence on temperature") and
// every season under way.
func (p *demandParser) implausibleLoads() error {
	var have []float64
	for _, v := range p.d.Load {
		if v > 0 {
			have = append(have, v)
		}
	}
	if len(have) == 0 {
		return nil
	}
	slices.Sort(have)
	p90 := have[len(have)*9/10]
	for i, v := range p.d.Load {
		if v > loadOutlier*p90 {
			p.errorf(p.loadPos[i][0], p.loadPos[i][1], p.header[p.load], "load %s is more than %s times the record's "+
				"90th percentile (%s): a typing or unit error?", strconv.FormatFloat(v, 'g', -1, 64),
				strconv.Itoa(loadOutlier), strconv.FormatFloat(p90, 'g', 6, 64))
		}
	}
	if len(p.errs) > 0 {
		return p.errList()
	}
	return nil
}

// holidayValue parses the holiday flag; a bad value is recorded and read as
// false.
func (p *demandParser) holidayValue(record []string) bool {
	raw := strings.TrimSpace(record[p.holiday])
	switch strings.ToLower(raw) {
	case "", "0", "false", "no":
		return false
	case "1", "true", "yes":
		return true
	}
	p.fieldErrorf(p.holiday, "not a holiday flag: %s (want 1/0, true/false, yes/no or empty)", quote(raw))
	return false
}

// series merges the holiday list and checks what needs the whole record.
func (p *demandParser) series() (*DemandSeries, error) {
	d := &p.d
	d.Name = p.name
	d.Warnings = p.warnings
	if len(d.Dates) == 0 {
		p.errorf(0, 0, "", "no data rows after the header")
		return nil, p.errList()
	}
	for _, v := range d.Load {
		if math.IsNaN(v) {
			d.Missing++
		}
	}
	if n := d.DaysWithLoad(); n < MinDemandDays {
		p.errorf(0, 0, "", "only %d days have a load: at least %d are needed (a full year, to see both heating and cooling seasons)",
			n, MinDemandDays)
		return nil, p.errList()
	}
	if err := p.implausibleLoads(); err != nil {
		return nil, err
	}
	d.Absent = int(d.Dates[len(d.Dates)-1]-d.Dates[0]) + 1 - len(d.Dates)
	if h := p.opt.Holidays; h != nil && len(h.Dates)+len(h.Rules) > 0 {
		d.HolidaysFile = p.opt.HolidaysName
		d.HolidayListDates, d.HolidayRules = len(h.Dates), h.RuleTexts()
		first, last := d.Dates[0], d.Dates[len(d.Dates)-1]
		matched := 0
		for _, day := range h.In(first.Year(), last.Year()) {
			if i, ok := slices.BinarySearch(d.Dates, day); ok {
				d.Holiday[i] = true
				matched++
			}
		}
		if matched == 0 {
			what := fmt.Sprintf("%d dates", len(h.Dates))
			if len(h.Rules) > 0 {
				what = fmt.Sprintf("%d dates and %d rules", len(h.Dates), len(h.Rules))
			}
			d.Warnings = append(d.Warnings, fmt.Sprintf("none of the %s in the holiday list %s falls on a day of the demand record (%s to %s)",
				what, p.opt.HolidaysName, first, last))
		}
	}
	for _, h := range d.Holiday {
		if h {
			d.Holidays++
		}
	}
	return d, nil
}
