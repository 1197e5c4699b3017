package sim

import (
	"context"
	"errors"
	"slices"
	"strings"
	"testing"
	"time"

	"wxstress/calendar"
	"wxstress/model"
)

func TestParsePeriod(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name     string
		year     int
		from, to string
		days     int
	}{
		{"year", 2024, "2024-01-01", "2024-12-31", 366},
		{"Heating", 2025, "2024-11-01", "2025-03-31", 151},
		{"heating", 2024, "2023-11-01", "2024-03-31", 152},
		{"cooling", 2025, "2025-05-01", "2025-09-30", 153},
		{"gas-year", 2025, "2024-10-01", "2025-09-30", 365},
		{"feb", 2024, "2024-02-01", "2024-02-29", 29},
		{"dec", 2025, "2025-12-01", "2025-12-31", 31},
		{"12-15:01-15", 2025, "2024-12-15", "2025-01-15", 32},
		{"06-01:06-01", 2025, "2025-06-01", "2025-06-01", 1},
		{"02-01:02-29", 2025, "2025-02-01", "2025-02-28", 28},
	}
	for _, c := range cases {
		p, err := ParsePeriod(c.name, c.year)
		if err != nil {
			t.Errorf("%s: %v", c.name, err)
			continue
		}
		if p.From.String() != c.from || p.To.String() != c.to || p.Days() != c.days {
			t.Errorf("%s %d: %s..%s (%d days), want %s..%s (%d)", c.name, c.year, p.From, p.To, p.Days(), c.from, c.to, c.days)
		}
	}
}

func TestParsePeriodErrorsListValidForms(t *testing.T) {
	t.Parallel()
	for _, bad := range []string{"winter", "13-01:02-01", "02-30:03-01", "1-1:2-2", "01-01", "01-01:", ""} {
		_, err := ParsePeriod(bad, 2025)
		if err == nil {
			t.Errorf("%q accepted", bad)
			continue
		}
		if !strings.Contains(err.Error(), "MM-DD:MM-DD") {
			t.Errorf("%q: error %q does not show the valid form", bad, err)
		}
	}
}

func TestParseThreshold(t *testing.T) {
	t.Parallel()
	cases := []struct {
		in     string
		x      Index
		period string
		v      float64
	}{
		{"hdd:2800", HDD, "", 2800},
		{"HDD:heating:2800.5", HDD, "heating", 2800.5},
		{"coldest:-15", Coldest, "", -15},
		{"hdd:12-01:02-28:1500", HDD, "12-01:02-28", 1500},
		{"peak-demand:year:130000", PeakDemand, "year", 130000},
	}
	for _, c := range cases {
		th, err := ParseThreshold(c.in)
		if err != nil || th.Index != c.x || th.Period != c.period || th.Value != c.v {
			t.Errorf("%q: %+v, %v", c.in, th, err)
		}
	}
	for _, bad := range []string{"hdd", "hdd:", "frost:3", "hdd:heating:warm", ":5", "hdd::5"} {
		if _, err := ParseThreshold(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// TestDateSpread checks the day-of-the-peak summary on a hand-made heating
// season of 2026 (1 Nov 2025 = day 1): days 1 and 31 fall in November and
// December, 62 and 62 on 1 January, 151 on 31 March; the lower median of
// {1, 31, 62, 62, 151} is day 62, 1 January 2026.
func TestDateSpread(t *testing.T) {
	t.Parallel()
	p, err := ParsePeriod("heating", 2026)
	if err != nil {
		t.Fatal(err)
	}
	d := dateSpread(p, []float64{62, 151, 1, 62, 31})
	if want := calendar.FromYMD(2026, time.January, 1); d.Median != want {
		t.Errorf("median %s, want %s", d.Median, want)
	}
	want := []MonthShare{{time.November, 0.2}, {time.December, 0.2}, {time.January, 0.4}, {time.March, 0.2}}
	if !slices.Equal(d.Months, want) {
		t.Errorf("months %v, want %v (calendar order within the period, empty months left out)", d.Months, want)
	}
}

// TestBasesImplausible checks the unit-sanity warnings: a °F base given to
// a °C model (65, 32) and a °C base given to a °F model (18, 0) are flagged
// with the conversion (65 °F = 18.3 °C: the usual bases, common practice),
// and the usual bases of each scale are not.
func TestBasesImplausible(t *testing.T) {
	t.Parallel()
	if w := BasesFor(model.Celsius).Implausible(model.Celsius); len(w) != 0 {
		t.Errorf("the usual °C bases flagged: %q", w)
	}
	if w := BasesFor(model.Fahrenheit).Implausible(model.Fahrenheit); len(w) != 0 {
		t.Errorf("the usual °F bases flagged: %q", w)
	}
	w := Bases{HDD: 65, CDD: 18, ColdBelow: 32}.Implausible(model.Celsius)
	if len(w) != 2 || !strings.Contains(w[0], "HDD base 65 °C") || !strings.Contains(w[0], "65 °F = 18.3 °C") ||
		!strings.Contains(w[1], "cold-day threshold 32 °C") {
		t.Errorf("°F values for a °C model: %q", w)
	}
	// 0 °F (−17.8 °C) is a plausible cold threshold in either reading: not
	// flagged.
	w = Bases{HDD: 18, CDD: 65, ColdBelow: 0}.Implausible(model.Fahrenheit)
	if len(w) != 1 || !strings.Contains(w[0], "HDD base 18 °F") || !strings.Contains(w[0], "18 °C = 64.4 °F") {
		t.Errorf("°C values for a °F model: %q", w)
	}
}

// TestLeapDayWindow: a window of 29 February alone has no days outside a
// leap year, an error (ErrPeriod, a usage error for the command) rather
// than an empty period that the run cannot simulate; in a leap year it is
// one day.
func TestLeapDayWindow(t *testing.T) {
	if _, err := ParsePeriod("02-29:02-29", 2026); !errors.Is(err, ErrPeriod) {
		t.Errorf("2026: %v, want ErrPeriod", err)
	}
	p, err := ParsePeriod("02-29:02-29", 2028)
	if err != nil || p.Days() != 1 || p.From.String() != "2028-02-29" {
		t.Errorf("2028: %+v, %v", p, err)
	}
}

// TestTargetYear: the default target year is the season under way at the
// data end — with the heating season among the periods, the winter under
// way or coming (a record ending mid-December targets the winter that
// began in November, not the year with its whole last winter on record);
// without it, the first year with a period still running.
func TestTargetYear(t *testing.T) {
	m := seasonalModel([]float64{0.7})
	for _, c := range []struct {
		end     string
		periods []string
		want    int
	}{
		{"2025-12-31", nil, 2026},
		{"2025-12-15", nil, 2026},
		{"2026-01-15", nil, 2026},
		{"2025-06-30", nil, 2026},
		{"2025-06-30", []string{"cooling"}, 2025},
		{"2025-06-30", []string{"year", "jul"}, 2025},
		{"2025-10-31", []string{"heating"}, 2026},
		{"2025-06-30", []string{"year", " Heating"}, 2026}, // names as ParsePeriod reads them
	} {
		d, err := calendar.Parse(c.end)
		if err != nil {
			t.Fatal(err)
		}
		m.Data.LastDate = d
		if got := TargetYear(m, 0, c.periods); got != c.want {
			t.Errorf("data end %s, periods %v: target %d, want %d", c.end, c.periods, got, c.want)
		}
	}
	if got := TargetYear(m, 2031, nil); got != 2031 {
		t.Errorf("an explicit year %d came back as %d", 2031, got)
	}
}

// TestSnapLongerThanPeriod: a cold snap longer than a period has no window
// in it (its lowest k-day mean would be +∞, which JSON cannot carry); the
// run refuses it as a period error, which the command reports as a usage
// error naming the window.
func TestSnapLongerThanPeriod(t *testing.T) {
	m := flatModel(10, 0.7, 2, model.FamilyNormal, 0)
	_, err := Run(context.Background(), m, Config{Paths: 10, Periods: []string{"12-24:12-25"}, SnapDays: 3, Bases: BasesFor(model.Celsius)})
	if !errors.Is(err, ErrPeriod) || !strings.Contains(err.Error(), `"12-24:12-25" has 2 days, fewer than the 3-day cold snap`) {
		t.Errorf("error %v", err)
	}
	if _, err := Run(context.Background(), m, Config{Paths: 10, Periods: []string{"12-24:12-26"}, SnapDays: 3, Bases: BasesFor(model.Celsius)}); err != nil {
		t.Errorf("a 3-day period with a 3-day snap: %v", err)
	}
}

// TestPeriodListedTwice: a period named twice would give every one of its
// rows twice in the JSON and CSV; it is a period error (a usage error).
func TestPeriodListedTwice(t *testing.T) {
	m := flatModel(10, 0.7, 2, model.FamilyNormal, 0)
	_, err := Run(context.Background(), m, Config{Paths: 10, Periods: []string{"year", "jan", "year"}, Bases: BasesFor(model.Celsius)})
	if !errors.Is(err, ErrPeriod) || !strings.Contains(err.Error(), `"year" is listed twice`) {
		t.Errorf("error %v", err)
	}
	// The same days under another name.
	_, err = Run(context.Background(), m, Config{Paths: 10, Periods: []string{"heating", "11-01:03-31"}, Bases: BasesFor(model.Celsius)})
	if !errors.Is(err, ErrPeriod) || !strings.Contains(err.Error(), `"11-01:03-31" is the same days as "heating"`) {
		t.Errorf("error %v", err)
	}
}
