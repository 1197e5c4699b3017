package render

import (
	"strings"
	"testing"
	"unicode/utf8"

	"wxstress/sim"
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
