package render

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
	"unicode"
	"unicode/utf8"

	"wxstress/internal/numfmt"

	"github.com/olekukonko/tablewriter"
	"github.com/olekukonko/tablewriter/pkg/twwidth"
	"github.com/olekukonko/tablewriter/tw"
)

// table writes a boxed terminal table with the header as given and the
// body right-aligned except its first column. A table wider than wrapWidth
// is written as several, each with the row's key (the first column and the
// keyHeaders columns) and as many of the other columns as fit.
func table(w io.Writer, header []string, rows [][]string) error {
	var b bytes.Buffer
	if err := boxed(&b, header, rows); err != nil {
		return err
	}
	// The row's key: the first column and the keyHeaders ones (a period,
	// a unit, a standard, a target, a return period); these lead every
	// part.
	key := []int{0}
	var rest []int
	for c := 1; c < len(header); c++ {
		if keyHeaders[header[c]] {
			key = append(key, c)
		} else {
			rest = append(rest, c)
		}
	}
	if width(b.String()) <= wrapWidth || len(rest) <= 1 {
		_, err := w.Write(b.Bytes())
		return err
	}
	pick := func(cols []int) ([]string, [][]string) {
		h := make([]string, len(cols))
		for i, c := range cols {
			h[i] = header[c]
		}
		rs := make([][]string, len(rows))
		for r, row := range rows {
			rs[r] = make([]string, len(cols))
			for i, c := range cols {
				if c < len(row) {
					rs[r][i] = row[c]
				}
			}
		}
		return h, rs
	}
	for next := 0; next < len(rest); {
		// As many further columns as fit (at least one).
		cols := append(slices.Clone(key), rest[next])
		next++
		var part bytes.Buffer
		h, rs := pick(cols)
		if err := boxed(&part, h, rs); err != nil {
			return err
		}
		for next < len(rest) {
			var wider bytes.Buffer
			h, rs := pick(append(slices.Clone(cols), rest[next]))
			if err := boxed(&wider, h, rs); err != nil {
				return err
			}
			if width(wider.String()) > wrapWidth {
				break
			}
			cols, part = append(cols, rest[next]), wider
			next++
		}
		if _, err := w.Write(part.Bytes()); err != nil {
			return err
		}
	}
	return nil
}

// keyHeaders are the column titles that, beside the first column, identify
// a row: a split table repeats them in every part.
var keyHeaders = map[string]bool{"period": true, "unit": true, "T": true, "standard": true, "target": true}

// width is the widest line of s, in terminal columns (a wide character
// takes two, as the tables pad it).
func width(s string) int {
	n := 0
	for line := range strings.SplitSeq(s, "\n") {
		n = max(n, twwidth.Width(line))
	}
	return n
}

// boxed renders one table (table's layout, unsplit).
func boxed(w io.Writer, header []string, rows [][]string) error {
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
	raw bool // machine output (a CSV's manifest lines): never wrapped
}

// printf writes a formatted text, breaking its prose lines longer than
// wrapWidth (not the lines of tables) at spaces, each continuation indented
// two columns past its line.
func (e *errWriter) printf(format string, a ...any) {
	if e.err != nil {
		return
	}
	s := fmt.Sprintf(format, a...)
	if !e.raw && (width(s) > wrapWidth || strings.Contains(s, Glue)) {
		var b strings.Builder
		for line := range strings.SplitAfterSeq(s, "\n") {
			text := strings.TrimSuffix(line, "\n")
			body := strings.TrimLeft(text, " ")
			if twwidth.Width(text) <= wrapWidth || strings.ContainsAny(body[:min(len(body), 3)], "┌│├└") {
				b.WriteString(strings.ReplaceAll(line, Glue, " "))
				continue
			}
			b.WriteString(wrap(text, wrapWidth, text[:len(text)-len(body)]+"  "))
			b.WriteString(line[len(text):])
		}
		s = b.String()
	}
	_, e.err = io.WriteString(e.w, s)
}

func (e *errWriter) table(header []string, rows [][]string) {
	if e.err == nil {
		e.err = table(e.w, header, rows)
	}
}

// wrapWidth is the column at which prose lines of the terminal output break.
const wrapWidth = 100

// Glue joins words that wrap must keep on one line (a value and its unit);
// it prints as a space.
const Glue = "\u00a0"

// glueUnits joins to its neighbour each word wrap must not stand alone at a
// line's start or end: a unit of degrees or a per cent sign goes with the
// number before it ("+0.174 °C/decade", "5 %"), and so does a unit-like
// word ("1,200 GJ/day", "40 TJ"); a "±" goes with the error after it, a
// "×" or "=" with the words on both sides.
func glueUnits(words []string) []string {
	out := words[:0:0]
	for i := 0; i < len(words); i++ {
		w := words[i]
		if (w == "±" || w == "×" || w == "=" || w == "≤" || w == "≥" || w == "<" || w == ">") && i+1 < len(words) {
			w += Glue + words[i+1]
			i++
		}
		if n := len(out); n > 0 && (strings.HasPrefix(w, "°") || w == "%" || strings.HasPrefix(w, "%") || strings.HasPrefix(w, "×") ||
			strings.HasPrefix(w, "=") || endsInDigit(out[n-1]) && unitLike(w)) {
			out[n-1] += Glue + w
			continue
		}
		out = append(out, w)
	}
	return out
}

// endsInDigit reports whether a word ends in a digit (a number).
func endsInDigit(w string) bool {
	return w != "" && w[len(w)-1] >= '0' && w[len(w)-1] <= '9'
}

// unitLike reports whether a word reads as a unit after a number: a rate
// ("GJ/day", "EUR/GJ") or a short capitalised symbol ("GJ", "TJ", "EUR",
// "MWh"), possibly followed by punctuation.
func unitLike(w string) bool {
	w = strings.TrimRight(w, ".,;:)")
	if strings.Contains(w, "/") {
		return true
	}
	if n := utf8.RuneCountInString(w); n == 0 || n > 4 {
		return false
	}
	r, _ := utf8.DecodeRuneInString(w)
	return unicode.IsUpper(r)
}

// wrap breaks text at spaces into lines of at most width columns (a word
// longer than width stands alone), starting every line after the first with
// indent.
func wrap(text string, width int, indent string) string {
	var b strings.Builder
	lead := text[:len(text)-len(strings.TrimLeft(text, " "))]
	b.WriteString(lead)
	col := len(lead)
	for i, word := range glueUnits(strings.FieldsFunc(text, func(r rune) bool { return r == ' ' || r == '\t' || r == '\n' })) {
		word = strings.ReplaceAll(word, Glue, " ")
		n := twwidth.Width(word)
		switch {
		case i == 0:
		case col+1+n > width:
			b.WriteString("\n" + indent)
			col = twwidth.Width(indent)
		default:
			b.WriteByte(' ')
			col++
		}
		b.WriteString(word)
		col += n
	}
	return b.String()
}
