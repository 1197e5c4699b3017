package calendar

import (
	"testing"
	"time"
)

func TestRoundTrip(t *testing.T) {
	t.Parallel()
	// Known day numbers: 1970-01-01 is day 0 by definition; 2000-01-01 is
	// day 10957 (30 years with 7 leap days: 30*365+7), common practice for Unix days.
	cases := []struct {
		s    string
		want Date
	}{{"1970-01-01", 0}, {"2000-01-01", 10957}, {"1969-12-31", -1}, {"2024-02-29", 19782}}
	for _, c := range cases {
		d, err := Parse(c.s)
		if err != nil || d != c.want {
			t.Errorf("Parse(%q) = %d, %v; want %d", c.s, d, err, c.want)
		}
		if d.String() != c.s {
			t.Errorf("String() = %q, want %q", d.String(), c.s)
		}
	}
	if Epoch.ModelTime() != 0 {
		t.Errorf("Epoch.ModelTime() = %v", Epoch.ModelTime())
	}
}

func TestParseRejects(t *testing.T) {
	t.Parallel()
	for _, s := range []string{"2023-02-30", "2023-13-01", "20230101", "01/02/2023", "", "2023-1-1"} {
		if _, err := Parse(s); err == nil {
			t.Errorf("Parse(%q) accepted", s)
		}
	}
}

func TestCalendarParts(t *testing.T) {
	t.Parallel()
	d := FromYMD(2024, time.December, 31)
	if d.DayOfYear() != 366 || DaysIn(2024) != 366 || DaysIn(2023) != 365 || DaysIn(1900) != 365 || DaysIn(2000) != 366 {
		t.Errorf("leap-year arithmetic wrong: doy=%d", d.DayOfYear())
	}
	if FromYMD(2026, time.December, 1).Weekday() != time.Tuesday {
		t.Error("2026-12-01 should be a Tuesday")
	}
}
