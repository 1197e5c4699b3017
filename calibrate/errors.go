package calibrate

import (
	"errors"
	"fmt"
	"strings"
)

// ErrBadInput is the cause wrapped by every positioned input error.
var ErrBadInput = errors.New("bad input")

// ErrFit is wrapped by errors that come from the data being unfit for the
// model (too short, too many gaps in a month, degenerate values).
var ErrFit = errors.New("cannot fit")

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
// folds into its last line: "(and 90 more errors, then 752 more bad rows,
// in FILE)".
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
			break
		}
		if i > 0 {
			b.WriteByte('\n')
		}
		b.WriteString(e.Error())
	}
	switch hidden := len(l) - MaxShown; {
	case hidden > 0 && more != nil:
		fmt.Fprintf(&b, "\n(and %d more errors, then %d more bad rows, in %s)", hidden, more.MoreRows, more.File)
	case hidden > 0:
		fmt.Fprintf(&b, "\n(and %d more errors)", hidden)
	case more != nil:
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
