package calibrate

import (
	"fmt"
	"io"
	"math"
	"strings"

	"wxstress/calendar"
	"wxstress/model"
)

// Units of a temperature series: model.Units, whose home is package model.
type Units = model.Units

// The temperature units, as in package model.
const (
	Celsius    = model.Celsius
	Fahrenheit = model.Fahrenheit
)

// Series is a daily mean temperature record on a complete daily grid: Temps[i]
// is the mean of day Start+i, and NaN marks a missing day (a gap), whether the
// row was absent or its value was missing.
type Series struct {
	Name  string        // the file name, for messages and the manifest
	Start calendar.Date // first day with a value
	Temps []float64     // daily means in Units; NaN = missing; first and last are never NaN
	Units Units
	// MeanFrom says how the daily mean was obtained, e.g.
	// "(max + min)/2 from columns TMAX, TMIN" or "column tavg".
	MeanFrom string
	Warnings []string // things the user should know (inferred units, ...)
	SHA256   string   // hex SHA-256 of the input bytes, for the manifest
}

// End returns the last day of the series.
func (s *Series) End() calendar.Date { return s.Start + calendar.Date(len(s.Temps)-1) }

// Span returns the record's days from..to (which must lie inside it), each
// missing day replaced by fill(date), and how many were filled.
func (s *Series) Span(from, to calendar.Date, fill func(calendar.Date) float64) ([]float64, int) {
	days := make([]float64, 0, int(to-from)+1)
	missing := 0
	for d := from; d <= to; d++ {
		v := s.Temps[int(d-s.Start)]
		if math.IsNaN(v) {
			v = fill(d)
			missing++
		}
		days = append(days, v)
	}
	return days, missing
}

// Date returns the date of index i.
func (s *Series) Date(i int) calendar.Date { return s.Start + calendar.Date(i) }

func (s *Series) setSHA256(hex string) { s.SHA256 = hex }

// Gaps returns the number of missing days and the longest run of them.
func (s *Series) Gaps() (missing, longest int) {
	run := 0
	for _, v := range s.Temps {
		if math.IsNaN(v) {
			missing++
			run++
			longest = max(longest, run)
		} else {
			run = 0
		}
	}
	return missing, longest
}

// ReadOptions controls how ReadCSV interprets a file. The zero value reads a
// file of undeclared units with the default choice of mean.
type ReadOptions struct {
	// Units of the file's values. "" means not declared: the values are
	// taken as °C, and a warning is added when they look like °F.
	Units Units
	// MeanColumn names the column to use as the daily mean (matched without
	// regard to case or surrounding spaces). "" means the default rule:
	// (max + min)/2 when the file has a max/min pair, else its mean column.
	MeanColumn string
}

// Accepted column names of a temperature file (besides dateNames), in order
// of preference, compared case-insensitively.
var (
	meanNames = []string{"tavg", "tmean", "temp", "temp_mean", "mean", "tas"}
	maxNames  = []string{"tmax", "temp_max", "max", "tx", "maximum"}
	minNames  = []string{"tmin", "temp_min", "min", "tn", "minimum"}
)

// plausibleC bounds physically plausible daily temperatures: |T| beyond
// 60 °C (−76 °F to 140 °F) is an input error (a unit mix-up, a missing-value
// code or a typing slip).
const plausibleC = 60.0

// minDaysWithValues is the shortest record ReadCSV accepts: a seasonal cycle
// and its variability cannot be estimated from less than two full years.
const minDaysWithValues = 730

// fahrenheitHint is the warmest-month mean above which undeclared values are
// probably °F: no place on Earth has a calendar month averaging 45 °C.
const fahrenheitHint = 45.0

// celsiusHintF is the warmest calendar-month mean, in °F, below which data
// declared as °F are flagged as probably °C: 40 °F (4.4 °C) is colder than
// the warmest month of any station outside the polar regions, while °C data
// read as °F put every station's warmest month below it, since none averages
// 40 °C (a climatological fact, from memory; no standard sets it).
const celsiusHintF = 40.0

// longGap is the longest run of missing days that passes without a warning:
// a gap of more than a year usually means a mistyped date.
const longGap = 365

// monthGap is the longest run of missing days that passes without any
// warning; a longer one is named, as it drops the seasons it falls in from
// the record's own seasons.
const monthGap = 31

// ReadFile opens path and reads it with ReadCSV, using path as the name.
func ReadFile(path string, opt ReadOptions) (*Series, error) {
	return readPath(path, func(r io.Reader) (*Series, error) { return ReadCSV(r, path, opt) })
}

// ReadCSV reads a daily temperature record from r; name is used in messages
// and stored in Series.Name.
//
// The input is CSV with a header row. Columns are found by name, ignoring case
// and surrounding spaces: the date (date or day, as YYYY-MM-DD), and either a
// daily mean (tavg, tmean, temp, temp_mean, mean, tas) or a max/min pair
// (tmax/tmin, temp_max/temp_min, max/min, tx/tn, maximum/minimum); other
// columns are ignored. With a max/min pair the mean is (max + min)/2, the
// degree-day contract convention, unless opt.MeanColumn names another column.
// A UTF-8 byte order mark, CRLF line ends and blank lines are tolerated.
//
// Empty fields, NA, NaN, null and -9999 are missing values; a day with a
// missing value, or with no row at all, is a gap (NaN) in the returned
// series, which runs from the first to the last day with a value. Rows must
// be in date order without repeats.
//
// Bad data is reported as an ErrorList of *PosError holding the problems
// found, each with its line and column (the first MaxErrors, then a count of
// the further bad rows); the list wraps ErrBadInput. A failure
// of r itself is returned wrapped, without ErrBadInput.
func ReadCSV(r io.Reader, name string, opt ReadOptions) (*Series, error) {
	if opt.Units != "" && !opt.Units.Valid() {
		return nil, fmt.Errorf("calibrate: unknown units %q in read options: valid choices are %q and %q", string(opt.Units), string(Celsius), string(Fahrenheit))
	}
	p := &tempParser{rowScanner: newRowScanner(r, name), opt: opt}
	return readTable(&p.rowScanner, p.readHeader, p.readRow, p.series)
}

// tempParser holds the state of one ReadCSV call.
type tempParser struct {
	rowScanner
	opt ReadOptions

	mean     int // column index of the mean, or -1 when using max/min
	hi, lo   int // column indexes of max and min, or -1
	meanFrom string

	// Accepted rows, in strictly increasing date order.
	dates []calendar.Date
	lines []int32
	temps []float64
}

func (p *tempParser) readHeader() error {
	if ok, err := p.headerRow(); !ok {
		return err
	}

	p.date = p.find(dateNames, "the date", true)
	p.mean, p.hi, p.lo = -1, -1, -1
	p.needColumn(p.date, "date", dateNames)
	hi, lo := p.find(maxNames, "", false), p.find(minNames, "", false)
	switch {
	case p.opt.MeanColumn != "":
		if p.mean = p.namedColumn(p.opt.MeanColumn, "mean"); p.mean >= 0 {
			p.meanFrom = "column " + p.header[p.mean]
		}
	case hi >= 0 && lo >= 0:
		p.hi = p.find(maxNames, "the daily maximum", true)
		p.lo = p.find(minNames, "the daily minimum", true)
		p.meanFrom = fmt.Sprintf("(max + min)/2 from columns %s, %s", p.header[p.hi], p.header[p.lo])
	default:
		p.mean = p.find(meanNames, "the daily mean", true)
		if p.mean >= 0 {
			p.meanFrom = "column " + p.header[p.mean]
			break
		}
		pairs := make([]string, len(maxNames))
		for i := range maxNames {
			pairs[i] = maxNames[i] + "/" + minNames[i]
		}
		p.errorf(p.headerLine, 0, "", "no temperature columns: need a daily mean (%s) or a max/min pair (%s); columns found: %s",
			strings.Join(meanNames, ", "), strings.Join(pairs, ", "), p.listColumns())
	}
	if len(p.errs) > 0 {
		return p.errList()
	}
	return nil
}

// implausible reports whether v, in the declared units, is beyond ±60 °C.
func (p *tempParser) implausible(v float64) bool {
	if p.opt.Units == Fahrenheit {
		v = Fahrenheit.Convert(v, Celsius)
	}
	return math.Abs(v) > plausibleC
}

// readRow checks one data row and, when its date is usable, appends it.
func (p *tempParser) readRow(record []string) {
	before := len(p.errs)
	defer func() { sortByColumn(p.errs[before:]) }()

	var t float64
	if p.mean >= 0 {
		t = p.value(record, p.mean)
	} else {
		hi := p.value(record, p.hi)
		lo := p.value(record, p.lo)
		if hi < lo {
			p.fieldErrorf(p.lo, "minimum %s is above the maximum %s (column %s)",
				quote(strings.TrimSpace(record[p.lo])), quote(strings.TrimSpace(record[p.hi])), p.header[p.hi])
		}
		t = (hi + lo) / 2 // NaN when either is missing
	}

	d, line, _, ok := p.rowDate(record, p.dates, p.lines)
	if !ok {
		return
	}
	p.dates = append(p.dates, d)
	p.lines = append(p.lines, lineNumber(line))
	p.temps = append(p.temps, t)
}

// value parses field i of record: NaN for a missing value, and NaN with an
// error recorded for a bad or implausible one.
func (p *tempParser) value(record []string, i int) float64 {
	v, raw, ok := p.number(record, i)
	if !ok {
		return math.NaN()
	}
	if p.implausible(v) {
		hint, limits := "", "±60 °C"
		if p.opt.Units == "" && math.Abs(Fahrenheit.Convert(v, Celsius)) <= plausibleC {
			hint = "; if the file is in °F, pass --units F"
		}
		if p.opt.Units == Fahrenheit {
			limits = "−76 to 140 °F (±60 °C)"
		}
		p.fieldErrorf(i, "implausible temperature %s: beyond %s%s", quote(raw), limits, hint)
		return math.NaN()
	}
	return v
}

// series lays the accepted rows on a daily grid, trims missing ends and
// checks what needs the whole record.
func (p *tempParser) series() (*Series, error) {
	if len(p.dates) == 0 {
		p.errorf(0, 0, "", "no data rows after the header")
		return nil, p.errList()
	}
	first, last := -1, -1
	withValues := 0
	for i, v := range p.temps {
		if !math.IsNaN(v) {
			if first < 0 {
				first = i
			}
			last = i
			withValues++
		}
	}
	if withValues < minDaysWithValues {
		p.errorf(0, 0, "", "only %d days have a value: at least two full years are needed (%d days)",
			withValues, minDaysWithValues)
		return nil, p.errList()
	}
	start := p.dates[first]
	temps := make([]float64, int(p.dates[last]-start)+1)
	for i := range temps {
		temps[i] = math.NaN()
	}
	for i := first; i <= last; i++ {
		temps[p.dates[i]-start] = p.temps[i]
	}

	s := &Series{
		Name:     p.name,
		Start:    start,
		Temps:    temps,
		Units:    p.opt.Units,
		MeanFrom: p.meanFrom,
		Warnings: p.warnings,
	}
	switch from, n := longestGap(temps); {
	case n > longGap:
		s.Warnings = append(s.Warnings, fmt.Sprintf(
			"%d days without values from %v to %v; check the dates on either side",
			n, s.Date(from), s.Date(from+n-1)))
	case n > monthGap:
		s.Warnings = append(s.Warnings, fmt.Sprintf(
			"%d days without values from %v to %v: the fit skips them, and the seasons they fall in are left out of "+
				"the record's own seasons (--history, backtest)", n, s.Date(from), s.Date(from+n-1)))
	}
	switch k := len(p.dates) - 1 - last; {
	case k == 1:
		s.Warnings = append(s.Warnings, fmt.Sprintf(
			"the last row (%v) has no value: the record ends on %v, the day a conditional start takes its state from",
			p.dates[last+1], p.dates[last]))
	case k > 1:
		s.Warnings = append(s.Warnings, fmt.Sprintf(
			"the last %d rows (%v to %v) have no value: the record ends on %v, the day a conditional start takes its state from",
			k, p.dates[last+1], p.dates[len(p.dates)-1], p.dates[last]))
	}
	warm, ok := warmestMonthMean(s)
	switch {
	case s.Units == "":
		s.Units = Celsius
		if ok && warm > fahrenheitHint {
			s.Warnings = append(s.Warnings, fmt.Sprintf(
				"units not declared, so values are read as °C, but they look like °F (the warmest calendar month averages %.1f); if the file is in °F, pass --units F",
				warm))
		}
	case s.Units == Celsius && ok && warm > fahrenheitHint:
		// Declared, and still no station's climate: °F data given --units C.
		s.Warnings = append(s.Warnings, fmt.Sprintf(
			"values are read as °C (--units C), but they look like °F (the warmest calendar month averages %.1f, hotter than "+
				"any station's); if the file is in °F, pass --units F", warm))
	case s.Units == Fahrenheit && ok && warm < celsiusHintF:
		s.Warnings = append(s.Warnings, fmt.Sprintf(
			"values are read as °F, but they look like °C (the warmest calendar month averages %.1f °F, %.1f °C, colder than any but polar stations); if the file is in °C, drop --units F",
			warm, Fahrenheit.Convert(warm, Celsius)))
	}
	return s, nil
}

// longestGap returns the start index and length of the longest run of NaN.
func longestGap(temps []float64) (from, n int) {
	run := 0
	for i, v := range temps {
		if !math.IsNaN(v) {
			run = 0
			continue
		}
		run++
		if run > n {
			from, n = i-run+1, run
		}
	}
	return from, n
}

// warmestMonthMean returns the largest of the twelve calendar-month means of
// the values, over all years.
func warmestMonthMean(s *Series) (float64, bool) {
	var sum [12]float64
	var n [12]int
	for i, v := range s.Temps {
		if !math.IsNaN(v) {
			m := s.Date(i).Month() - 1
			sum[m] += v
			n[m]++
		}
	}
	best, ok := math.Inf(-1), false
	for m := range sum {
		if n[m] > 0 {
			best, ok = max(best, sum[m]/float64(n[m])), true
		}
	}
	return best, ok
}
