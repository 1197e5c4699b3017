package render

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/olekukonko/tablewriter/pkg/twwidth"

	"wxstress/calendar"
	"wxstress/sim"
	"wxstress/stress"
)

// TestWrap checks that wrapping keeps every word in order, breaks only at
// spaces, indents continuation lines and respects the width.
func TestWrap(t *testing.T) {
	text := "Monte Carlo error: 12 of the 13 rows above have a far-tail figure less precise than a twentieth of the sd"
	got := wrap(text, 30, "  ")
	if strings.Join(strings.Fields(got), " ") != text {
		t.Fatalf("wrap changed the words:\n%s", got)
	}
	lines := strings.Split(got, "\n")
	if len(lines) < 4 {
		t.Fatalf("wrap at 30 gave %d lines:\n%s", len(lines), got)
	}
	for i, l := range lines {
		if n := utf8.RuneCountInString(l); n > 30 {
			t.Errorf("line %d has %d columns: %q", i, n, l)
		}
		if i > 0 && !strings.HasPrefix(l, "  ") {
			t.Errorf("line %d not indented: %q", i, l)
		}
	}
	if got := wrap("  kept indent and wrapped", 14, "    "); got != "  kept indent\n    and\n    wrapped" {
		t.Errorf("the first line's indent must stay, got %q", got)
	}
	if got := wrap("a-very-long-word-indeed", 5, ""); got != "a-very-long-word-indeed" {
		t.Errorf("a long word must stand alone, got %q", got)
	}
}

// TestChangeText checks the scenario change column: a paired change with its
// error, an exact shift, and a change below the tables' one decimal.
func TestChangeText(t *testing.T) {
	for _, c := range []struct {
		mean, se float64
		want     string
	}{
		{12.34, 1.8, "+12 ± 1.8"},
		{-56.2, 0.11, "-56.2 ± 0.11"},
		{1, 0, "+1.0 (exact)"},
		{-5e-7, 4e-7, "|change| < 0.05"},
		{0, 3e-8, "|change| < 0.05"},
		{0.03, 0.02, "+0.03 ± 0.020"},
	} {
		if got := ChangeText(c.mean, c.se); got != c.want {
			t.Errorf("ChangeText(%v, %v) = %q, want %q", c.mean, c.se, got, c.want)
		}
	}
}

// TestExceedText: an exceedance with its error, and the none/all cases
// that say how many years they rest on instead of "0 ± 0".
func TestExceedText(t *testing.T) {
	for _, c := range []struct {
		x    sim.Exceedance
		want string
	}{
		{sim.Exceedance{Threshold: 3300, Prob: 0.11, SE: 0.0031}, "0.110 ± 0.0031"},
		{sim.Exceedance{Threshold: 5000}, "0 (none of 10,000 years)"},
		{sim.Exceedance{Threshold: 10, Prob: 1}, "1 (all 10,000 years)"},
	} {
		if got := ExceedText(c.x, 10000); got != c.want {
			t.Errorf("%+v: %q, want %q", c.x, got, c.want)
		}
	}
}

// TestWrapKeepsGluedWords: words joined by Glue (a value and its unit) move
// to the next line together and print with a plain space.
func TestWrapKeepsGluedWords(t *testing.T) {
	got := wrap("worst the ES 99% of coldest day (-20.6"+Glue+"±"+Glue+"0.36"+Glue+"°C); more", 40, "  ")
	want := "worst the ES 99% of coldest day\n  (-20.6 ± 0.36 °C); more"
	if got != want {
		t.Errorf("got %q, want %q", got, want)
	}
}

// TestWideTableSplits checks that a table wider than the terminal's 100
// columns is written as several that fit, each with the rows' key (the
// first column and the period beside it), and every other column once, in
// order.
func TestWideTableSplits(t *testing.T) {
	header := []string{"index", "period"}
	var rows [][]string
	for c := range 9 {
		header = append(header, "a rather long column title "+string(rune('A'+c)))
	}
	for r := range 3 {
		row := []string{"index " + string(rune('p'+r)), "heating"}
		for c := range 9 {
			row = append(row, string(rune('A'+c))+strings.Repeat("9", r+1))
		}
		rows = append(rows, row)
	}
	var b strings.Builder
	if err := table(&b, header, rows); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for i, l := range strings.Split(out, "\n") {
		if n := utf8.RuneCountInString(l); n > wrapWidth {
			t.Errorf("line %d has %d columns: %q", i, n, l)
		}
	}
	parts := strings.Count(out, "┌")
	if parts < 3 {
		t.Errorf("a table of about 300 columns came out in %d parts:\n%s", parts, out)
	}
	if n := strings.Count(out, "index q"); n != parts {
		t.Errorf("row key in %d of %d parts:\n%s", n, parts, out)
	}
	if n := strings.Count(out, "heating"); n != 3*parts {
		t.Errorf("period in %d cells, want %d:\n%s", n, 3*parts, out)
	}
	last := -1
	for c := range 9 {
		title := "column title " + string(rune('A'+c))
		if strings.Count(out, title) != 1 {
			t.Errorf("%q appears %d times", title, strings.Count(out, title))
		}
		if i := strings.Index(out, title); i < last {
			t.Errorf("%q out of order", title)
		} else {
			last = i
		}
		if cell := string(rune('A'+c)) + "999"; strings.Count(out, cell) != 1 {
			t.Errorf("cell %q appears %d times", cell, strings.Count(out, cell))
		}
	}
	// A key column anywhere (a return period T) leads every part.
	b.Reset()
	wide := strings.Repeat("w", 40)
	if err := table(&b, []string{"index", "seasons", "T", "a " + wide, "b " + wide, "c " + wide},
		[][]string{{"coldest day", "70", "50", "1", "2", "3"}}); err != nil {
		t.Fatal(err)
	}
	if parts := strings.Count(b.String(), "┌"); parts < 2 || strings.Count(b.String(), " T ") != parts {
		t.Errorf("the T column is not in each of %d parts:\n%s", parts, b.String())
	}
	// A narrow table is left whole.
	b.Reset()
	table(&b, []string{"index", "value"}, [][]string{{"HDD", "1"}})
	if strings.Count(b.String(), "┌") != 1 {
		t.Errorf("a narrow table was split:\n%s", b.String())
	}
}

// TestPrintfWrapsProse checks that the renderers' printf breaks prose lines
// longer than 100 columns with a hanging indent, leaves table lines and
// short lines alone, and prints Glue as a space.
func TestPrintfWrapsProse(t *testing.T) {
	var b strings.Builder
	e := &errWriter{w: &b}
	long := "  Monte Carlo error: " + strings.Repeat("the far tail of this figure is imprecise ", 5) + "±" + Glue + "0.25"
	box := "│ " + strings.Repeat("x ", 60) + "│"
	e.printf("%s\n%s\nshort"+Glue+"line\n", long, box)
	lines := strings.Split(strings.TrimSuffix(b.String(), "\n"), "\n")
	if lines[len(lines)-1] != "short line" || lines[len(lines)-2] != box {
		t.Errorf("short or table lines changed:\n%s", b.String())
	}
	prose := lines[:len(lines)-2]
	if len(prose) < 3 {
		t.Fatalf("a %d-column line was not wrapped:\n%s", len(long), b.String())
	}
	for i, l := range prose {
		if utf8.RuneCountInString(l) > wrapWidth {
			t.Errorf("line %d too wide: %q", i, l)
		}
		if i > 0 && !strings.HasPrefix(l, "    ") {
			t.Errorf("continuation %d not indented past its line: %q", i, l)
		}
	}
	if !strings.HasSuffix(prose[len(prose)-1], "± 0.25") || strings.Contains(b.String(), Glue) {
		t.Errorf("glued value split or glue printed:\n%s", b.String())
	}
}

// TestWrapKeepsUnits checks that wrap keeps a degree unit or a per cent
// sign with its number and a "±" with its error.
func TestWrapKeepsUnits(t *testing.T) {
	for _, c := range []struct{ text, keep string }{
		{"trend-2050: climate of 2050 along the trend: level +0.42 °C against 2026 (fitted trend +0.174 °C/decade)", "+0.174 °C/decade"},
		{"the model's spread of annual means would be wider by about 12.5 % than it is now without", "12.5 %"},
		{"Monte Carlo error: the ES 99% of coldest day is -20.5 ± 0.20 from 20,000 paths", "± 0.20"},
		{"Capacity with a 0.10% chance a year of any day over it, 11-15:03-15: 158,403 ± 1,200 GJ/day", "1,200 GJ/day"},
		{"Demand energy of the heating season: 11,431 TJ, far above plan", "11,431 TJ,"},
	} {
		for width := 10; width <= len(c.text); width++ {
			got := wrap(c.text, width, "  ")
			if strings.Join(strings.Fields(got), " ") != c.text {
				t.Fatalf("wrap at %d changed the words:\n%s", width, got)
			}
			if !strings.Contains(got, c.keep) {
				t.Errorf("wrap at %d split %q:\n%s", width, c.keep, got)
				break
			}
		}
	}
}

// TestBandCellsReadUnambiguously: a band beside a value reads "[lo to hi]"
// (a comma would clash with the thousands separators) at the value's own
// precision.
func TestBandCellsReadUnambiguously(t *testing.T) {
	nan := math.NaN()
	_, cells := DesignTable([]stress.DesignRow{{Period: "heating", T: 20, Coldest: -15.2741, ColdestSE: 0.062,
		Snap: -12.25, SnapSE: 0.048, Peak: 130657.4, PeakSE: 204, SnapEnergy: nan, SnapEnerSE: nan,
		ColdestBand: stress.Band{Lo: -15.8312, Hi: -14.6461}, PeakBand: stress.Band{Lo: 128879.2, Hi: 132324.6}}}, 3, "C", "GJ/day")
	if got := cells[0][2]; got != "-15.27 ± 0.062 [-15.83 to -14.65]" {
		t.Errorf("design day cell %q", got)
	}
	if got := cells[0][4]; got != "130,700 ± 200 [128,900 to 132,300]" {
		t.Errorf("design-day demand cell %q", got)
	}
}

// TestDatesText: the months under 1 % are summed, not dropped, and a
// period whose peaks fall in separate runs of months (a calendar year's
// two winters) gets no median date.
func TestDatesText(t *testing.T) {
	row := sim.Row{Name: "day of the peak", Dates: &sim.DateSpread{Median: calendar.FromYMD(2026, 2, 9),
		Months: []sim.MonthShare{{Month: time.January, Share: 0.408}, {Month: time.February, Share: 0.302},
			{Month: time.March, Share: 0.082}, {Month: time.April, Share: 0.0057}, {Month: time.November, Share: 0.017},
			{Month: time.December, Share: 0.1863}}}}
	if got, want := DatesText(row), "Day of the peak: in separate parts of the period (no single median); by month "+
		"Jan 40.8%, Feb 30.2%, Mar 8.2%, Nov 1.7%, Dec 18.6%, other months 0.57%"; got != want {
		t.Errorf("got  %q\nwant %q", got, want)
	}
	row.Dates.Months = []sim.MonthShare{{Month: time.December, Share: 0.2}, {Month: time.January, Share: 0.5},
		{Month: time.February, Share: 0.3}}
	if got := DatesText(row); !strings.HasPrefix(got, "Day of the peak: median 9 Feb 2026; by month Dec 20.0%") {
		t.Errorf("a winter across the year end: %q", got)
	}
}

// TestWideCharactersSplit: a table is split by terminal columns, not
// runes: wide characters (a contract named in CJK script in a user's file)
// take two columns each.
func TestWideCharactersSplit(t *testing.T) {
	name := strings.Repeat("冬", 20) // 20 runes, 40 columns
	var b strings.Builder
	if err := table(&b, []string{"contract", "a " + name, "b " + name, "c"}, [][]string{{name, "1", "2", "3"}}); err != nil {
		t.Fatal(err)
	}
	for _, l := range strings.Split(b.String(), "\n") {
		if w := twwidth.Width(l); w > wrapWidth {
			t.Errorf("a line of %d columns: %q", w, l)
		}
	}
}

// TestPeriodMapOrder: return levels are written in increasing order of the
// period ("2", "5", …, "100"), not of the text ("10", "100", "2").
func TestPeriodMapOrder(t *testing.T) {
	b, err := json.Marshal(periodMap[float64]{"100": 3, "2": 1, "10": 2, "2.5": 1.5})
	if err != nil {
		t.Fatal(err)
	}
	if got := string(b); got != `{"2":1,"2.5":1.5,"10":2,"100":3}` {
		t.Errorf("%s", got)
	}
}
