package calibrate

import (
	"bufio"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"
	"unicode/utf8"

	"wxstress/calendar"
	"wxstress/model"
)

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

// Accepted column names, in order of preference, compared case-insensitively.
var (
	dateNames = []string{"date", "day"}
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

// longGap is the longest run of missing days that passes without a warning:
// a gap of more than a year usually means a mistyped date.
const longGap = 365

// missingCode is the numeric missing-value sentinel; any spelling that parses
// to it (-9999, -9999.0, ...) marks a gap.
const missingCode = -9999.0

// Limits on how much of a pathological file is echoed back in messages.
const (
	maxQuoted = 40 // bytes of a field shown in a message
	maxListed = 20 // column names listed in a message
)

// ParseUnits reads a units name: C or F in any case, also degC, degF, °C and
// °F.
//
// Deprecated: use model.ParseUnits.
func ParseUnits(s string) (Units, error) {
	u, err := model.ParseUnits(s)
	if err != nil {
		return "", fmt.Errorf("calibrate: unknown units %q: valid choices are C and F (also degC, degF, °C, °F)", s)
	}
	return u, nil
}

// ReadFile opens path and reads it with ReadCSV, using path as the name.
func ReadFile(path string, opt ReadOptions) (*Series, error) {
	return readPath(path, func(r io.Reader) (*Series, error) { return ReadCSV(r, path, opt) })
}

// readPath opens path and hands it to read.
func readPath[T any](path string, read func(io.Reader) (T, error)) (T, error) {
	f, err := os.Open(path)
	if err != nil {
		var zero T
		return zero, fmt.Errorf("calibrate: %w", err)
	}
	defer f.Close()
	return read(f)
}

// csvInput is a CSV reader over an input that skips a UTF-8 byte order mark
// and hashes every byte it reads.
type csvInput struct {
	hash hash.Hash
	br   *bufio.Reader
	cr   *csv.Reader
}

func newCSVInput(r io.Reader) *csvInput {
	in := &csvInput{hash: sha256.New()}
	in.br = bufio.NewReader(io.TeeReader(r, in.hash))
	if b, err := in.br.Peek(3); err == nil && string(b) == "\uFEFF" {
		in.br.Discard(3)
	}
	in.cr = csv.NewReader(in.br)
	in.cr.ReuseRecord = true
	in.cr.TrimLeadingSpace = true
	return in
}

// finish drains what the CSV reader left unread, so that the hash covers
// every byte, and returns the input's hex SHA-256.
func (in *csvInput) finish(name string) (string, error) {
	if _, err := io.Copy(io.Discard, in.br); err != nil {
		return "", fmt.Errorf("calibrate: reading %s: %w", name, err)
	}
	return hex.EncodeToString(in.hash.Sum(nil)), nil
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
	in := newCSVInput(r)
	p := &parser{name: name, opt: opt, cr: in.cr}
	if err := p.readHeader(); err != nil {
		return nil, err
	}
	if err := p.readRows(); err != nil {
		return nil, err
	}
	s, err := p.series()
	if err != nil {
		return nil, err
	}
	if s.SHA256, err = in.finish(name); err != nil {
		return nil, err
	}
	return s, nil
}

// parser holds the state of one ReadCSV call.
type parser struct {
	name string
	opt  ReadOptions
	cr   *csv.Reader

	header     []string // trimmed column names as written
	headerLine int
	date       int // column index of the date
	mean       int // column index of the mean, or -1 when using max/min
	hi, lo     int // column indexes of max and min, or -1
	meanFrom   string
	warnings   []string

	// Accepted rows, in strictly increasing date order.
	dates []calendar.Date
	lines []int32
	temps []float64

	errs ErrorList
	// Past MaxErrors, errors are counted by record rather than kept:
	// record numbers the records read, moreRows counts those with an error
	// not listed, and droppedAt is the last of them.
	record, moreRows, droppedAt int
}

// read reads the next CSV record.
func (p *parser) read() ([]string, error) {
	p.record++
	return p.cr.Read()
}

func (p *parser) errorf(line, col int, field, format string, args ...any) {
	if len(p.errs) >= MaxErrors {
		if p.droppedAt != p.record {
			p.moreRows++
			p.droppedAt = p.record
		}
		return
	}
	p.errs = append(p.errs, &PosError{File: p.name, Line: line, Column: col, Field: field, Msg: fmt.Sprintf(format, args...)})
}

// errList returns the errors found, ending with a count of the bad rows not
// listed when there were more than MaxErrors errors.
func (p *parser) errList() ErrorList {
	if p.moreRows == 0 {
		return p.errs
	}
	return append(p.errs[:len(p.errs):len(p.errs)], &PosError{File: p.name,
		Msg: fmt.Sprintf("… and %d more bad rows", p.moreRows), MoreRows: p.moreRows})
}

// csvError records a syntax error from encoding/csv, after which reading
// goes on; any other error comes from the underlying reader and is returned,
// to end reading.
func (p *parser) csvError(err error, record []string) (fatal error) {
	var pe *csv.ParseError
	if !errors.As(err, &pe) {
		return fmt.Errorf("calibrate: reading %s: %w", p.name, err)
	}
	if errors.Is(pe.Err, csv.ErrFieldCount) {
		p.errorf(pe.Line, pe.Column, "", "wrong number of fields: %d, the header has %d", len(record), len(p.header))
		return nil
	}
	if pe.StartLine != pe.Line {
		p.errorf(pe.Line, pe.Column, "", "csv syntax: %v (in the record that starts on line %d)", pe.Err, pe.StartLine)
		return nil
	}
	p.errorf(pe.Line, pe.Column, "", "csv syntax: %v", pe.Err)
	return nil
}

// headerRow reads the header record into p.header and p.headerLine. It
// returns false when there is no usable header, with the error to return:
// the error list, or a failure of the input itself.
func (p *parser) headerRow() (bool, error) {
	record, err := p.read()
	if err == io.EOF {
		p.errorf(0, 0, "", "empty file: no header row")
		return false, p.errList()
	}
	if err != nil {
		if fatal := p.csvError(err, record); fatal != nil {
			return false, fatal
		}
		return false, p.errList()
	}
	p.headerLine, _ = p.cr.FieldPos(0)
	p.header = make([]string, len(record))
	for i, h := range record {
		p.header[i] = strings.TrimSpace(h)
	}
	return true, nil
}

func (p *parser) readHeader() error {
	if ok, err := p.headerRow(); !ok {
		return err
	}

	p.date = p.find(dateNames, "the date", true)
	p.mean, p.hi, p.lo = -1, -1, -1
	if p.date < 0 {
		p.errorf(p.headerLine, 0, "", "no date column (accepted names: %s); columns found: %s",
			strings.Join(dateNames, ", "), p.listColumns())
	}
	hi, lo := p.find(maxNames, "", false), p.find(minNames, "", false)
	switch {
	case p.opt.MeanColumn != "":
		want := strings.TrimSpace(p.opt.MeanColumn)
		p.mean = slicesIndexFold(p.header, want)
		switch {
		case p.mean < 0:
			p.errorf(p.headerLine, 0, "", "mean column %s not found; columns found: %s", quote(want), p.listColumns())
		case p.mean == p.date:
			p.errorf(p.headerLine, 0, "", "mean column %s is the date column", quote(want))
		default:
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

// find returns the index of the header column whose name comes first in
// names, or -1; with warn set, it warns when other columns could have served
// as role.
func (p *parser) find(names []string, role string, warn bool) int {
	best, rank := -1, len(names)
	var also []string
	for i, h := range p.header {
		r := slicesIndexFold(names, h)
		if r < 0 {
			continue
		}
		if best >= 0 {
			if r < rank {
				also = append(also, p.header[best])
			} else {
				also = append(also, h)
				continue
			}
		}
		best, rank = i, r
	}
	if warn && len(also) > 0 {
		p.warnings = append(p.warnings, fmt.Sprintf("columns %s could also be %s; using column %s",
			strings.Join(also, ", "), role, p.header[best]))
	}
	return best
}

func slicesIndexFold(list []string, s string) int {
	for i, v := range list {
		if strings.EqualFold(v, s) {
			return i
		}
	}
	return -1
}

func (p *parser) listColumns() string {
	n := min(len(p.header), maxListed)
	names := make([]string, n)
	for i := range n {
		names[i] = quote(p.header[i])
	}
	s := strings.Join(names, ", ")
	if len(p.header) > n {
		s += fmt.Sprintf(" (and %d more)", len(p.header)-n)
	}
	return s
}

// quote quotes s for a message, shortening it when it is long.
func quote(s string) string {
	if len(s) <= maxQuoted {
		return strconv.Quote(s)
	}
	cut := maxQuoted
	for cut > 0 && !utf8.RuneStart(s[cut]) {
		cut--
	}
	return strconv.Quote(s[:cut]) + "…"
}

// implausible reports whether v, in the declared units, is beyond ±60 °C.
func (p *parser) implausible(v float64) bool {
	if p.opt.Units == Fahrenheit {
		v = Fahrenheit.Convert(v, Celsius)
	}
	return math.Abs(v) > plausibleC
}

func (p *parser) readRows() error {
	for {
		record, err := p.read()
		if err == io.EOF {
			break
		}
		if (err == nil || errors.Is(err, csv.ErrFieldCount)) && blank(record) {
			continue // a line of spaces or empty fields
		}
		if err != nil {
			if fatal := p.csvError(err, record); fatal != nil {
				return fatal
			}
			continue
		}
		p.readRow(record)
	}
	if len(p.errs) > 0 {
		return p.errList()
	}
	return nil
}

func blank(record []string) bool {
	for _, f := range record {
		if strings.TrimSpace(f) != "" {
			return false
		}
	}
	return true
}

// readRow checks one data row and, when its date is usable, appends it.
func (p *parser) readRow(record []string) {
	before := len(p.errs)
	defer func() { sortByColumn(p.errs[before:]) }()

	var t float64
	if p.mean >= 0 {
		t = p.value(record, p.mean)
	} else {
		hi := p.value(record, p.hi)
		lo := p.value(record, p.lo)
		if hi < lo {
			line, col := p.cr.FieldPos(p.lo)
			p.errorf(line, col, p.header[p.lo], "minimum %s is above the maximum %s (column %s)",
				quote(strings.TrimSpace(record[p.lo])), quote(strings.TrimSpace(record[p.hi])), p.header[p.hi])
		}
		t = (hi + lo) / 2 // NaN when either is missing
	}

	raw := strings.TrimSpace(record[p.date])
	line, col := p.cr.FieldPos(p.date)
	field := p.header[p.date]
	d, err := calendar.Parse(raw)
	if err != nil {
		if raw == "" {
			p.errorf(line, col, field, "missing date")
		} else {
			p.errorf(line, col, field, "not a date of the form YYYY-MM-DD: %s", quote(raw))
		}
		return
	}
	if n := len(p.dates); n > 0 && d <= p.dates[n-1] {
		if i := sort.Search(n, func(i int) bool { return p.dates[i] >= d }); p.dates[i] == d {
			p.errorf(line, col, field, "duplicate date %s, first on line %d", quote(raw), p.lines[i])
		} else {
			p.errorf(line, col, field, "date %s is out of order: it follows %s on line %d",
				quote(raw), p.dates[n-1], p.lines[n-1])
		}
		return
	}
	p.dates = append(p.dates, d)
	p.lines = append(p.lines, int32(min(line, math.MaxInt32)))
	p.temps = append(p.temps, t)
}

// value parses field i of record: NaN for a missing value, and NaN with an
// error recorded for a bad one.
func (p *parser) value(record []string, i int) float64 {
	raw := strings.TrimSpace(record[i])
	if isMissing(raw) {
		return math.NaN()
	}
	line, col := p.cr.FieldPos(i)
	field := p.header[i]
	v, err := strconv.ParseFloat(raw, 64)
	switch {
	case err == nil && !math.IsInf(v, 0) && !math.IsNaN(v) && !strings.ContainsAny(raw, "_xX"):
	case errors.Is(err, strconv.ErrRange) || (err == nil && (math.IsInf(v, 0) || math.IsNaN(v))):
		p.errorf(line, col, field, "not a finite number: %s", quote(raw))
		return math.NaN()
	default:
		p.errorf(line, col, field, "not a number: %s", quote(raw))
		return math.NaN()
	}
	if v == missingCode {
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
		p.errorf(line, col, field, "implausible temperature %s: beyond %s%s", quote(raw), limits, hint)
		return math.NaN()
	}
	return v
}

func isMissing(s string) bool {
	return s == "" || strings.EqualFold(s, "na") || strings.EqualFold(s, "nan") || strings.EqualFold(s, "null")
}

// sortByColumn puts the errors of one row in column order (insertion sort:
// a row has at most a few).
func sortByColumn(errs []*PosError) {
	for i := 1; i < len(errs); i++ {
		for j := i; j > 0 && errs[j].Column < errs[j-1].Column; j-- {
			errs[j], errs[j-1] = errs[j-1], errs[j]
		}
	}
}

// series lays the accepted rows on a daily grid, trims missing ends and
// checks what needs the whole record.
func (p *parser) series() (*Series, error) {
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
	if from, n := longestGap(temps); n > longGap {
		s.Warnings = append(s.Warnings, fmt.Sprintf(
			"%d days without values from %v to %v; check the dates on either side",
			n, s.Date(from), s.Date(from+n-1)))
	}
	if s.Units == "" {
		s.Units = Celsius
		if warm, ok := warmestMonthMean(s); ok && warm > fahrenheitHint {
			s.Warnings = append(s.Warnings, fmt.Sprintf(
				"units not declared, so values are read as °C, but they look like °F (the warmest calendar month averages %.1f); if the file is in °F, pass --units F",
				warm))
		}
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
