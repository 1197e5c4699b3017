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
)

// What the three readers (temperatures, demand, holidays) share: the input
// with its byte order mark skipped and its bytes hashed, the loop over CSV
// records, positioned errors capped at MaxErrors, the search for columns by
// name, and the parsing of date and number fields.

// dateNames are the accepted names of the date column, in order of
// preference, compared case-insensitively.
var dateNames = []string{"date", "day"}

// missingCode is the numeric missing-value sentinel; any spelling that parses
// to it (-9999, -9999.0, ...) marks a gap.
const missingCode = -9999.0

// Limits on how much of a pathological file is echoed back in messages.
const (
	maxQuoted = 40 // bytes of a field shown in a message
	maxListed = 20 // column names listed in a message
)

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

// rowScanner is the state every reader shares: the input, the header once
// found, the warnings, and the errors recorded so far. The readers embed it.
type rowScanner struct {
	name string // the input's name, for messages
	in   *csvInput
	cr   *csv.Reader

	header     []string // trimmed column names as written
	headerLine int
	date       int // column index of the date, -1 when there is none
	warnings   []string

	errs ErrorList
	// Past MaxErrors, errors are counted by record rather than kept:
	// record numbers the records read, moreRows counts those with an error
	// not listed, and droppedAt is the last of them.
	record, moreRows, droppedAt int
}

// newRowScanner starts reading r, named name in messages: strict CSV (every
// record has the header's number of fields), leading spaces trimmed, no
// comments.
func newRowScanner(r io.Reader, name string) rowScanner {
	in := newCSVInput(r)
	return rowScanner{name: name, in: in, cr: in.cr, date: -1}
}

// hashed is a reader's result, which records the SHA-256 of its input.
type hashed interface{ setSHA256(hex string) }

// readTable reads a table whose first record is its header: header checks
// the header row (see headerRow), row checks each data row (see scanRows),
// and build makes the result from the rows accepted once the whole table
// has been read without an error. The result records the hex SHA-256 of the
// input.
func readTable[T hashed](s *rowScanner, header func() error, row func(record []string), build func() (T, error)) (T, error) {
	var zero T
	if err := header(); err != nil {
		return zero, err
	}
	if err := s.scanRows(row); err != nil {
		return zero, err
	}
	v, err := build()
	if err != nil {
		return zero, err
	}
	sum, err := s.in.finish(s.name)
	if err != nil {
		return zero, err
	}
	v.setSHA256(sum)
	return v, nil
}

// read reads the next CSV record.
func (s *rowScanner) read() ([]string, error) {
	s.record++
	return s.cr.Read()
}

// scanRows reads the records up to the end of the input and hands each to
// row, which records what is wrong with it through errorf. Blank records
// (empty fields or spaces only, whatever their number) are skipped; a CSV
// syntax error is recorded and reading goes on. It returns a failure of the
// input itself, or the error list when any error was recorded.
func (s *rowScanner) scanRows(row func(record []string)) error {
	for {
		record, err := s.read()
		if err == io.EOF {
			break
		}
		if (err == nil || errors.Is(err, csv.ErrFieldCount)) && blank(record) {
			continue // a line of spaces or empty fields
		}
		if err != nil {
			if fatal := s.csvError(err, record); fatal != nil {
				return fatal
			}
			continue
		}
		row(record)
	}
	if len(s.errs) > 0 {
		return s.errList()
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

// errorf records an error at line and column (0 for the whole line or file);
// field names the column it concerns, or is "".
func (s *rowScanner) errorf(line, col int, field, format string, args ...any) {
	if len(s.errs) >= MaxErrors {
		if s.droppedAt != s.record {
			s.moreRows++
			s.droppedAt = s.record
		}
		return
	}
	s.errs = append(s.errs, &PosError{File: s.name, Line: line, Column: col, Field: field, Msg: fmt.Sprintf(format, args...)})
}

// fieldErrorf records an error at field i of the record last read.
func (s *rowScanner) fieldErrorf(i int, format string, args ...any) {
	line, col := s.cr.FieldPos(i)
	s.errorf(line, col, s.header[i], format, args...)
}

// errList returns the errors found, ending with a count of the bad rows not
// listed when there were more than MaxErrors errors.
func (s *rowScanner) errList() ErrorList {
	if s.moreRows == 0 {
		return s.errs
	}
	return append(s.errs[:len(s.errs):len(s.errs)], &PosError{File: s.name,
		Msg: fmt.Sprintf("… and %d more bad rows", s.moreRows), MoreRows: s.moreRows})
}

// csvError records a syntax error from encoding/csv, after which reading
// goes on; any other error comes from the underlying reader and is returned,
// to end reading.
func (s *rowScanner) csvError(err error, record []string) (fatal error) {
	var pe *csv.ParseError
	if !errors.As(err, &pe) {
		return fmt.Errorf("calibrate: reading %s: %w", s.name, err)
	}
	if errors.Is(pe.Err, csv.ErrFieldCount) {
		s.errorf(pe.Line, pe.Column, "", "wrong number of fields: %d, the header has %d", len(record), len(s.header))
		return nil
	}
	if pe.StartLine != pe.Line {
		s.errorf(pe.Line, pe.Column, "", "csv syntax: %v (in the record that starts on line %d)", pe.Err, pe.StartLine)
		return nil
	}
	s.errorf(pe.Line, pe.Column, "", "csv syntax: %v", pe.Err)
	return nil
}

// headerRow reads the first record as the header into s.header and
// s.headerLine. It returns false when there is no usable header, with the
// error to return: the error list, or a failure of the input itself.
func (s *rowScanner) headerRow() (bool, error) {
	record, err := s.read()
	if err == io.EOF {
		s.errorf(0, 0, "", "empty file: no header row")
		return false, s.errList()
	}
	if err != nil {
		if fatal := s.csvError(err, record); fatal != nil {
			return false, fatal
		}
		return false, s.errList()
	}
	s.headerLine, _ = s.cr.FieldPos(0)
	s.header = make([]string, len(record))
	for i, h := range record {
		s.header[i] = strings.TrimSpace(h)
	}
	return true, nil
}

// find returns the index of the header column whose name comes first in
// names, or -1; with warn set, it warns when other columns could have served
// as role.
func (s *rowScanner) find(names []string, role string, warn bool) int {
	best, rank := -1, len(names)
	var also []string
	for i, h := range s.header {
		r := slicesIndexFold(names, h)
		if r < 0 {
			continue
		}
		if best >= 0 {
			if r < rank {
				also = append(also, s.header[best])
			} else {
				also = append(also, h)
				continue
			}
		}
		best, rank = i, r
	}
	if warn && len(also) > 0 {
		s.warnings = append(s.warnings, fmt.Sprintf("columns %s could also be %s; using column %s",
			strings.Join(also, ", "), role, s.header[best]))
	}
	return best
}

// needColumn records an error on the header line when the column of role
// (accepted names: names) is missing (index < 0).
func (s *rowScanner) needColumn(index int, role string, names []string) {
	if index < 0 {
		s.errorf(s.headerLine, 0, "", "no %s column (accepted names: %s); columns found: %s",
			role, strings.Join(names, ", "), s.listColumns())
	}
}

// namedColumn finds the column a flag names (matched without regard to
// case or surrounding space) for role ("mean", "load"), and records an error
// on the header line when there is none or it is the date column; it then
// returns −1. The date column must be found first.
func (s *rowScanner) namedColumn(want, role string) int {
	want = strings.TrimSpace(want)
	i := slicesIndexFold(s.header, want)
	switch {
	case i < 0:
		s.errorf(s.headerLine, 0, "", "%s column %s not found; columns found: %s", role, quote(want), s.listColumns())
	case i == s.date:
		s.errorf(s.headerLine, 0, "", "%s column %s is the date column", role, quote(want))
		return -1
	}
	return i
}

func slicesIndexFold(list []string, s string) int {
	for i, v := range list {
		if strings.EqualFold(v, s) {
			return i
		}
	}
	return -1
}

func (s *rowScanner) listColumns() string {
	n := min(len(s.header), maxListed)
	names := make([]string, n)
	for i := range n {
		names[i] = quote(s.header[i])
	}
	list := strings.Join(names, ", ")
	if len(s.header) > n {
		list += fmt.Sprintf(" (and %d more)", len(s.header)-n)
	}
	if len(s.header) == 1 {
		for _, c := range []struct{ sep, name string }{{";", "semicolons"}, {"\t", "tabs"}, {"|", "bars"}} {
			if sep, name := c.sep, c.name; strings.Contains(s.header[0], sep) {
				list += fmt.Sprintf(": one column only, with %s inside; the file reads like values separated by %s, "+
					"and these files must be comma-separated", name, name)
				break
			}
		}
	}
	return list
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

func isMissing(s string) bool {
	return s == "" || strings.EqualFold(s, "na") || strings.EqualFold(s, "nan") || strings.EqualFold(s, "null")
}

// number parses field i of record as a finite number. ok is false, and v
// NaN, when the field is missing (empty, NA, NaN, null or -9999) or is not a
// finite number, in which case an error is recorded. raw is the trimmed
// field, for the caller's own checks.
func (s *rowScanner) number(record []string, i int) (v float64, raw string, ok bool) {
	raw = strings.TrimSpace(record[i])
	if isMissing(raw) {
		return math.NaN(), raw, false
	}
	v, err := strconv.ParseFloat(raw, 64)
	switch {
	case err == nil && !math.IsInf(v, 0) && !math.IsNaN(v) && !strings.ContainsAny(raw, "_xX"):
	case errors.Is(err, strconv.ErrRange) || (err == nil && (math.IsInf(v, 0) || math.IsNaN(v))):
		s.fieldErrorf(i, "not a finite number: %s", quote(raw))
		return math.NaN(), raw, false
	default:
		s.fieldErrorf(i, "not a number: %s", quote(raw))
		return math.NaN(), raw, false
	}
	if v == missingCode {
		return math.NaN(), raw, false
	}
	return v, raw, true
}

// rowDate parses the date field of record (YYYY-MM-DD) and checks
// that it comes after the dates of the rows accepted before it, which were
// on lines. ok is false, with an error recorded, when the date is bad or
// out of order; line and col locate the field.
func (s *rowScanner) rowDate(record []string, dates []calendar.Date, lines []int32) (d calendar.Date, line, col int, ok bool) {
	i := s.date
	raw := strings.TrimSpace(record[i])
	line, col = s.cr.FieldPos(i)
	field := s.header[i]
	d, err := calendar.Parse(raw)
	if err != nil {
		if raw == "" {
			s.errorf(line, col, field, "missing date")
		} else {
			s.errorf(line, col, field, "not a date of the form YYYY-MM-DD: %s", quote(raw))
		}
		return d, line, col, false
	}
	if n := len(dates); n > 0 && d <= dates[n-1] {
		if j := sort.Search(n, func(j int) bool { return dates[j] >= d }); dates[j] == d {
			s.errorf(line, col, field, "duplicate date %s, first on line %d", quote(raw), lines[j])
		} else {
			s.errorf(line, col, field, "date %s is out of order: it follows %s on line %d",
				quote(raw), dates[n-1], lines[n-1])
		}
		return d, line, col, false
	}
	return d, line, col, true
}

// lineNumber narrows a line or column number for storage.
func lineNumber(n int) int32 { return int32(min(n, math.MaxInt32)) }

// sortByColumn puts the errors of one row in column order (insertion sort:
// a row has at most a few).
func sortByColumn(errs []*PosError) {
	for i := 1; i < len(errs); i++ {
		for j := i; j > 0 && errs[j].Column < errs[j-1].Column; j-- {
			errs[j], errs[j-1] = errs[j-1], errs[j]
		}
	}
}
