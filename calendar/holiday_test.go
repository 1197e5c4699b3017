package calendar

import (
	"bufio"
	"errors"
	"fmt"
	"os"
	"strconv"
	"strings"
	"testing"
	"time"
)

// gaussEaster is Gauss's Easter algorithm in its corrected Gregorian form
// (C. F. Gauss, 1800, with the correction of 1816 to p; the two exceptions
// as usually stated; from memory). It shares no step with EasterSunday's
// anonymous Gregorian algorithm beyond Y mod 19, so agreement over the full
// 1583..4099 range checks one formulation against another.
func gaussEaster(y int) Date {
	a, b, c := y%19, y%4, y%7
	k := y / 100
	p := (13 + 8*k) / 25
	q := k / 4
	M := (15 - p + k - q) % 30
	N := (4 + k - q) % 7
	d := (19*a + M) % 30
	e := (2*b + 4*c + 6*d + N) % 7
	switch {
	case d == 29 && e == 6:
		return FromYMD(y, time.April, 19)
	case d == 28 && e == 6 && (11*M+11)%30 < 19:
		return FromYMD(y, time.April, 18)
	}
	return FromYMD(y, time.March, 22+d+e) // normalises past 31 March into April
}

func TestEasterPublishedDates(t *testing.T) {
	t.Parallel()
	// Easter Sunday as listed in published Easter tables (Gregorian computus;
	// from memory): the earliest possible date, 22 March (1818, 2285), the
	// latest, 25 April (1943, 2038), the two exceptional cases of Gauss's
	// rule (1954: 18 April; 1981: 19 April) and some recent years.
	for _, s := range []string{"1818-03-22", "2285-03-22", "1943-04-25", "2038-04-25", "1954-04-18", "1981-04-19",
		"2000-04-23", "2019-04-21", "2024-03-31", "2025-04-20", "2026-04-05", "2027-03-28"} {
		want, _ := Parse(s)
		if got := EasterSunday(want.Year()); got != want {
			t.Errorf("EasterSunday(%d) = %s, want %s", want.Year(), got, want)
		}
	}
}

func TestEasterMatchesR(t *testing.T) {
	t.Parallel()
	// R 4.2.2 timeDate::Easter (timeDate 4022.108), see testdata/easter.R.
	f, err := os.Open("testdata/easter.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	n := 0
	for sc.Scan() {
		line := sc.Text()
		if strings.HasPrefix(line, "#") || strings.HasPrefix(line, "year,") {
			continue
		}
		ys, ds, _ := strings.Cut(line, ",")
		y, err := strconv.Atoi(ys)
		want, err2 := Parse(ds)
		if err != nil || err2 != nil {
			t.Fatalf("bad golden line %q", line)
		}
		if got := EasterSunday(y); got != want {
			t.Errorf("EasterSunday(%d) = %s, R gives %s", y, got, want)
		}
		n++
	}
	if n != 4099-1583+1 {
		t.Errorf("read %d golden years, want %d", n, 4099-1583+1)
	}
}

func TestEasterMatchesGauss(t *testing.T) {
	t.Parallel()
	for y := 1583; y <= 4099; y++ {
		got, want := EasterSunday(y), gaussEaster(y)
		if got != want {
			t.Errorf("%d: anonymous Gregorian %s, Gauss %s", y, got, want)
		}
		// Easter is a Sunday between 22 March and 25 April (common practice).
		if got.Weekday() != time.Sunday || got < FromYMD(y, time.March, 22) || got > FromYMD(y, time.April, 25) {
			t.Errorf("%d: Easter %s is not a Sunday in 22 March..25 April", y, got)
		}
	}
}

func TestRuleKnownDates(t *testing.T) {
	t.Parallel()
	// Common practice: US Thanksgiving is the fourth Thursday of November,
	// the UK late May bank holiday and US Memorial Day the last Monday of
	// May, US Labor Day the first Monday of September, Martin Luther King Jr.
	// Day the third Monday of January; Good Friday is Easter − 2 days, Easter
	// Monday + 1, Ascension Day + 39, Whit Monday + 50 (Easter 2024: 31 March).
	cases := []struct {
		rule  HolidayRule
		dates []string
	}{
		{Nth(4, time.Thursday, time.November), []string{"2020-11-26", "2021-11-25", "2022-11-24", "2023-11-23", "2024-11-28"}},
		{Last(time.Monday, time.May), []string{"2019-05-27", "2020-05-25", "2021-05-31", "2023-05-29", "2024-05-27"}},
		{Nth(1, time.Monday, time.September), []string{"2023-09-04", "2024-09-02"}},
		{Nth(3, time.Monday, time.January), []string{"2024-01-15", "2025-01-20"}},
		{Easter(-2), []string{"2024-03-29", "2025-04-18"}},
		{Easter(1), []string{"2024-04-01", "2025-04-21"}},
		{Easter(39), []string{"2024-05-09"}},
		{Easter(50), []string{"2024-05-20"}},
		{Fixed(time.December, 25), []string{"2023-12-25", "2024-12-25"}},
		{Fixed(time.February, 29), []string{"2024-02-29"}},
	}
	for _, c := range cases {
		for _, s := range c.dates {
			want, _ := Parse(s)
			if got, ok := c.rule.In(want.Year()); !ok || got != want {
				t.Errorf("%s in %d = %s, %v; want %s", c.rule, want.Year(), got, ok, want)
			}
		}
	}
	if d, ok := Fixed(time.February, 29).In(2023); ok {
		t.Errorf("29 February in 2023 = %s", d)
	}
}

// TestWeekdayRulesBruteForce counts weekdays day by day, independently of
// In's arithmetic, for every month of 1900..2100.
func TestWeekdayRulesBruteForce(t *testing.T) {
	t.Parallel()
	for y := 1900; y <= 2100; y++ {
		for m := time.January; m <= time.December; m++ {
			var seen [7][]Date
			for d := FromYMD(y, m, 1); d.Month() == m; d++ {
				seen[d.Weekday()] = append(seen[d.Weekday()], d)
			}
			for wd := time.Sunday; wd <= time.Saturday; wd++ {
				for n := 1; n <= MaxNth; n++ {
					if got, _ := Nth(n, wd, m).In(y); got != seen[wd][n-1] {
						t.Fatalf("%s in %d = %s, want %s", Nth(n, wd, m), y, got, seen[wd][n-1])
					}
				}
				if got, _ := Last(wd, m).In(y); got != seen[wd][len(seen[wd])-1] {
					t.Fatalf("%s in %d = %s", Last(wd, m), y, got)
				}
			}
		}
	}
}

func TestEasterOffsetsStayInYear(t *testing.T) {
	t.Parallel()
	for y := 1583; y <= 4099; y++ {
		for _, off := range []int{MinEasterOffset, MaxEasterOffset} {
			if d, _ := Easter(off).In(y); d.Year() != y {
				t.Fatalf("Easter %+d in %d is %s", off, y, d)
			}
		}
	}
}

func TestRuleDates(t *testing.T) {
	t.Parallel()
	got := Fixed(time.February, 29).Dates(2019, 2025)
	if fmt.Sprint(got) != "[2020-02-29 2024-02-29]" {
		t.Errorf("29 February over 2019..2025: %v", got)
	}
	got = Easter(0).Dates(2024, 2026)
	if fmt.Sprint(got) != "[2024-03-31 2025-04-20 2026-04-05]" {
		t.Errorf("Easter over 2024..2026: %v", got)
	}
	if got := Easter(0).Dates(2025, 2024); len(got) != 0 {
		t.Errorf("empty range: %v", got)
	}
}

func TestParseHolidayRule(t *testing.T) {
	t.Parallel()
	cases := []struct {
		in   string
		want HolidayRule
		text string
	}{
		{"fixed 12-25", Fixed(time.December, 25), "25 December"},
		{"FIXED 02-29", Fixed(time.February, 29), "29 February"},
		{"25 December", Fixed(time.December, 25), "25 December"},
		{"1 jan", Fixed(time.January, 1), "1 January"},
		{"4 Thu Nov", Nth(4, time.Thursday, time.November), "fourth Thursday of November"},
		{"4th thursday of november", Nth(4, time.Thursday, time.November), "fourth Thursday of November"},
		{"  first   Mon  Sep ", Nth(1, time.Monday, time.September), "first Monday of September"},
		{"2nd Tue Oct", Nth(2, time.Tuesday, time.October), "second Tuesday of October"},
		{"3 MON jan", Nth(3, time.Monday, time.January), "third Monday of January"},
		{"last Mon May", Last(time.Monday, time.May), "last Monday of May"},
		{"last monday of may", Last(time.Monday, time.May), "last Monday of May"},
		{"easter", Easter(0), "Easter Sunday"},
		{"Easter Sunday", Easter(0), "Easter Sunday"},
		{"easter +1", Easter(1), "Easter + 1 day"},
		{"easter+1", Easter(1), "Easter + 1 day"},
		{"easter -2", Easter(-2), "Easter − 2 days"},
		{"Easter − 2 days", Easter(-2), "Easter − 2 days"},
		{"easter + 39 days", Easter(39), "Easter + 39 days"},
		{"easter -1", Easter(-1), "Easter − 1 day"},
		{"easter +250", Easter(250), "Easter + 250 days"},
	}
	for _, c := range cases {
		got, err := ParseHolidayRule(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseHolidayRule(%q) = %+v, %v; want %+v", c.in, got, err, c.want)
			continue
		}
		if got.String() != c.text {
			t.Errorf("%q reads %q, want %q", c.in, got.String(), c.text)
		}
		// What String writes reads back as the same rule.
		if back, err := ParseHolidayRule(got.String()); err != nil || back != got {
			t.Errorf("%q does not read back: %+v, %v", got.String(), back, err)
		}
	}
}

func TestParseHolidayRuleErrors(t *testing.T) {
	t.Parallel()
	cases := []struct{ in, want string }{
		{"", "empty: want fixed MM-DD"},
		{"5 Thu Nov", `a fifth Thursday is not in every November: use last Thu Nov`},
		{"fifth friday of march", `a fifth Friday is not in every March: use last Fri Mar`},
		{"0 Thu Nov", `"0" is not 1..4 or last`},
		{"4 Thx Nov", `"Thx" is not a weekday: want Mon, Tue`},
		{"4 Thu Novembr", `"Novembr" is not a month: want Jan..Dec`},
		{"fixed 02-30", `"02-30" is not a month and day of the form MM-DD`},
		{"fixed 2-3", `"2-3" is not a month and day`},
		{"31 April", "April has no day 31"},
		{"easter 1", "want easter, or easter followed by a signed number of days"},
		{"easter +x", `"+x" is not a signed whole number`},
		{"easter -81", "offset -81 is outside -80..+250 days"},
		{"easter +251", "offset 251 is outside"},
		{"12-25", "want fixed MM-DD (fixed 12-25); N WEEKDAY MONTH"},
		{"2024-12-25", "want fixed MM-DD"},
		{"every thursday", "want fixed MM-DD"},
	}
	for _, c := range cases {
		_, err := ParseHolidayRule(c.in)
		var re *RuleError
		if !errors.As(err, &re) || re.Rule != c.in || !strings.Contains(err.Error(), c.want) ||
			!strings.HasPrefix(err.Error(), "calendar: holiday rule ") {
			t.Errorf("ParseHolidayRule(%q): %v; want a *RuleError containing %q", c.in, err, c.want)
		}
	}
}

func TestRuleConstructorsPanic(t *testing.T) {
	t.Parallel()
	for name, f := range map[string]func(){
		"fifth":     func() { Nth(5, time.Monday, time.May) },
		"month 13":  func() { Last(time.Monday, 13) },
		"30 Feb":    func() { Fixed(time.February, 30) },
		"offset":    func() { Easter(300) },
		"zero rule": func() { HolidayRule{}.In(2024) },
		"year -1":   func() { EasterSunday(-1) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic", name)
				}
			}()
			f()
		}()
	}
}

func ExampleParseHolidayRule() {
	for _, s := range []string{"fixed 12-25", "4 Thu Nov", "last Mon May", "easter -2", "easter +1"} {
		r, err := ParseHolidayRule(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		d, _ := r.In(2024)
		fmt.Printf("%-13s %-28s %s\n", s, r, d)
	}
	// Output:
	// fixed 12-25   25 December                  2024-12-25
	// 4 Thu Nov     fourth Thursday of November  2024-11-28
	// last Mon May  last Monday of May           2024-05-27
	// easter -2     Easter − 2 days              2024-03-29
	// easter +1     Easter + 1 day               2024-04-01
}

// FuzzParseHolidayRule checks that whatever parses is a valid rule that
// reads back from its own String, and has a day in a leap year.
func FuzzParseHolidayRule(f *testing.F) {
	for _, s := range []string{"fixed 12-25", "4 Thu Nov", "last Mon May", "easter -2", "Easter + 39 days", "25 December", "5 mon may", ""} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		r, err := ParseHolidayRule(s)
		if err != nil {
			return
		}
		if back, err := ParseHolidayRule(r.String()); err != nil || back != r {
			t.Fatalf("%q parsed as %+v, which reads back as %+v, %v", s, r, back, err)
		}
		if _, ok := r.In(2024); !ok {
			t.Fatalf("%q has no day in 2024", s)
		}
	})
}

func TestHolidaysIn(t *testing.T) {
	t.Parallel()
	in := []Date{FromYMD(2021, time.December, 25), FromYMD(2022, time.December, 25),
		FromYMD(2020, time.February, 29)}
	// Listed dates keep their month and day; 29 February only in the leap
	// year 2024. US Thanksgiving, the fourth Thursday of November: 2023-11-23,
	// 2024-11-28, 2025-11-27 (common practice).
	got := HolidaysIn(in, []HolidayRule{Nth(4, time.Thursday, time.November)}, 2023, 2025)
	want := "[2023-11-23 2023-12-25 2024-02-29 2024-11-28 2024-12-25 2025-11-27 2025-12-25]"
	if fmt.Sprint(got) != want {
		t.Errorf("HolidaysIn = %v\nwant         %s", got, want)
	}
	if got := HolidaysIn(in, nil, 2025, 2025); fmt.Sprint(got) != "[2025-12-25]" {
		t.Errorf("one common year: %v", got)
	}
}
