package render

import (
	"fmt"
	"io"
	"math"
	"strings"
	"unicode/utf8"

	"wxstress/internal/numfmt"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/tw"
)

// table writes a boxed terminal table with the header as given and the
// body right-aligned except its first column.
func table(w io.Writer, header []string, rows [][]string) error {
	align := make([]tw.Align, len(header))
	for i := range align {
		align[i] = tw.AlignRight
	}
	align[0] = tw.AlignLeft
	t := tablewriter.NewTable(w,
		tablewriter.WithHeaderAutoFormat(tw.Off),
		tablewriter.WithHeaderAlignment(tw.AlignCenter),
		tablewriter.WithRowAlignmentConfig(tw.CellAlignment{PerColumn: align}),
	)
	t.Header(toAny(header)...)
	if err := t.Bulk(rows); err != nil {
		return err
	}
	return t.Render()
}

func toAny(s []string) []any {
	out := make([]any, len(s))
	for i, v := range s {
		out[i] = v
	}
	return out
}

// Num formats a value with d decimals, "—" for NaN.
func Num(v float64, d int) string {
	if math.IsNaN(v) {
		return "—"
	}
	return numfmt.Fixed(v, d)
}

// TableNum formats a value of a tail table: one decimal, none from 10 000
// on (a season's energy in GJ needs no tenths).
func TableNum(v float64) string {
	if math.Abs(v) >= 1e4 {
		return Num(v, 0)
	}
	return Num(v, 1)
}

// PValue formats a p-value: "< 0.0001" below that.
func PValue(p float64) string {
	switch {
	case math.IsNaN(p):
		return "—"
	case p < 1e-4:
		return "< 0.0001"
	}
	return fmt.Sprintf("%.4f", p)
}

// errWriter remembers the first write error so that long reports can be
// written without checking each line.
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) printf(format string, a ...any) {
	if e.err == nil {
		_, e.err = fmt.Fprintf(e.w, format, a...)
	}
}

func (e *errWriter) table(header []string, rows [][]string) {
	if e.err == nil {
		e.err = table(e.w, header, rows)
	}
}

// wrapWidth is the column at which prose lines of the terminal output break.
const wrapWidth = 100

// wrap breaks text at spaces into lines of at most width columns (a word
// longer than width stands alone), starting every line after the first with
// indent.
// Glue joins words that wrap must keep on one line (a value and its unit);
// it prints as a space.
const Glue = "\u00a0"

func wrap(text string, width int, indent string) string {
	var b strings.Builder
	lead := text[:len(text)-len(strings.TrimLeft(text, " "))]
	b.WriteString(lead)
	col := len(lead)
	for i, word := range strings.FieldsFunc(text, func(r rune) bool { return r == ' ' || r == '\t' || r == '\n' }) {
		word = strings.ReplaceAll(word, Glue, " ")
		n := utf8.RuneCountInString(word)
		switch {
		case i == 0:
		case col+1+n > width:
			b.WriteString("\n" + indent)
			col = utf8.RuneCountInString(indent)
		default:
			b.WriteByte(' ')
			col++
		}
		b.WriteString(word)
		col += n
	}
	return b.String()
}
