package calibrate

import (
	"errors"
	"fmt"
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

// Date returns the date of index i.
func (s *Series) Date(i int) calendar.Date { return s.Start + calendar.Date(i) }

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

// ErrBadInput is the cause wrapped by every positioned input error.
var ErrBadInput = errors.New("bad input")

// PosError is an input error at a position in a file: file:line:column: message.
// Line and Column are 1-based; a zero Column means the whole line, a zero Line
// the whole file.
type PosError struct {
	File   string
	Line   int
	Column int
	Field  string // the column name, when the error is about one field
	Msg    string
	// MoreRows is set only on the entry that ends a list cut at MaxErrors:
	// the number of further rows with errors, which are not listed.
	MoreRows int
}

func (e *PosError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ":%d", e.Column)
		}
	}
	b.WriteString(": ")
	if e.Field != "" {
		fmt.Fprintf(&b, "field %s: ", e.Field)
	}
	b.WriteString(e.Msg)
	return b.String()
}

func (e *PosError) Unwrap() error { return ErrBadInput }

// ErrorList collects input errors in file order. Its message is the first ten
// errors, one a line, then "(and N more errors)". The readers keep at most
// MaxErrors entries; when more rows are bad, the list ends with one more
// entry, "… and N more bad rows" (its MoreRows is N), which the message
// always shows last.
type ErrorList []*PosError

// MaxShown is how many errors an ErrorList prints before summarising the rest.
const MaxShown = 10

// MaxErrors is how many errors a reader lists; beyond it, it only counts
// the rows with errors, so a file of bad rows takes no more memory for its
// errors than a file of 100.
const MaxErrors = 100

func (l ErrorList) Error() string {
	var more *PosError
	if n := len(l); n > 0 && l[n-1].MoreRows > 0 {
		more, l = l[n-1], l[:n-1]
	}
	var b strings.Builder
	for i, e := range l {
		if i == MaxShown {
			fmt.Fprintf(&b, "\n(and %d more errors)", len(l)-MaxShown)
			break
		}
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(e.Error())
	}
	if more != nil {
		b.WriteByte('\n')
		b.WriteString(more.Error())
	}
	return b.String()
}

func (l ErrorList) Unwrap() []error {
	out := make([]error, len(l))
	for i, e := range l {
		out[i] = e
	}
	return out
}

// Err returns nil for an empty list and the list otherwise.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	return l
}
