package calibrate

import (
	"errors"
	"fmt"
	"slices"
	"strings"
	"testing"
	"time"

	"wxstress/calendar"
)

func TestReadHolidaysDateLists(t *testing.T) {
	t.Parallel()
	want := []calendar.Date{calendar.FromYMD(2021, 1, 1), calendar.FromYMD(2021, 3, 14), calendar.FromYMD(2021, 12, 25)}
	check := func(name string, got *Holidays, err error, names []string) {
		t.Helper()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if fmt.Sprint(got.Dates) != fmt.Sprint(want) || len(got.Rules) != 0 {
			t.Errorf("%s: dates %v, rules %v; want %v and no rules", name, got.Dates, got.Rules, want)
		}
		if !slices.Equal(got.DateNames, names) {
			t.Errorf("%s: names %q, want %q", name, got.DateNames, names)
		}
	}
	// A plain list, out of order, with a repeat, a comment and a blank line.
	got, err := ReadHolidays(strings.NewReader("# Kestrel Bay public holidays\n2021-12-25\n\n2021-01-01\n2021-03-14\n2021-01-01\n"), "h.txt")
	check("list", got, err, []string{"", "", ""})
	// CSV with a date column that is not the first; the name column is read.
	got, err = ReadHolidays(strings.NewReader("name,Date\nNew Year's Day,2021-01-01\nFounders' Day,2021-03-14\n\"Christmas Day, observed\",2021-12-25\n"), "h.csv")
	check("csv", got, err, []string{"New Year's Day", "Founders' Day", "Christmas Day, observed"})
	got, err = ReadHolidaysFile("testdata/demand/holidays.csv")
	check("file", got, err, []string{"New Year's Day", "Founders' Day", "Christmas Day"})
}

func TestReadHolidaysRules(t *testing.T) {
	t.Parallel()
	// Rules and dates mixed in a plain list; "4th thursday of november"
	// repeats "4 Thu Nov" in other words and is dropped.
	list := "# Kestrel Bay holidays (invented)\n2021-03-14\nfixed 12-25\n4 Thu Nov\nlast Mon May\neaster -2\n" +
		"easter +1\n2021-01-01\n4th thursday of november\n"
	h, err := ReadHolidays(strings.NewReader(list), "h.txt")
	if err != nil {
		t.Fatal(err)
	}
	wantRules := []string{"25 December", "fourth Thursday of November", "last Monday of May", "Easter − 2 days", "Easter + 1 day"}
	if fmt.Sprint(h.Dates) != "[2021-01-01 2021-03-14]" || !slices.Equal(h.RuleTexts(), wantRules) {
		t.Errorf("dates %v, rules %q; want 2 dates and %q", h.Dates, h.RuleTexts(), wantRules)
	}
	// Expanded over 2020..2021: US Thanksgiving 2020-11-26 and 2021-11-25,
	// UK late May bank holiday 2020-05-25 and 2021-05-31 (common practice);
	// Easter Sunday 2020-04-12 and 2021-04-04 (published Easter tables,
	// from memory), so Good Friday and Easter Monday around them.
	wantDays := "[2020-04-10 2020-04-13 2020-05-25 2020-11-26 2020-12-25 2021-01-01 2021-03-14 2021-04-02 2021-04-05 " +
		"2021-05-31 2021-11-25 2021-12-25]"
	if got := fmt.Sprint(h.In(2020, 2021)); got != wantDays {
		t.Errorf("In(2020, 2021) = %s\nwant            %s", got, wantDays)
	}
	// Listed dates outside the years are left out; a rule's day that is also
	// listed appears once.
	h.Dates = append(h.Dates, calendar.FromYMD(2022, 12, 25))
	if got := fmt.Sprint(h.In(2022, 2022)); got != "[2022-04-15 2022-04-18 2022-05-30 2022-11-24 2022-12-25]" {
		t.Errorf("In(2022, 2022) = %s", got)
	}

	// CSV with a date, a rule and a name column; each row has one of the two.
	csvText := "date,rule,name\n2021-03-14,,Founders' Day\n,4 Thu Nov,Thanksgiving\n, easter +1 ,Easter Monday\n,last Mon May,\n"
	h, err = ReadHolidays(strings.NewReader(csvText), "h.csv")
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(h.Dates) != "[2021-03-14]" || !slices.Equal(h.DateNames, []string{"Founders' Day"}) ||
		!slices.Equal(h.RuleTexts(), []string{"fourth Thursday of November", "Easter + 1 day", "last Monday of May"}) ||
		!slices.Equal(h.RuleNames, []string{"Thanksgiving", "Easter Monday", ""}) {
		t.Errorf("csv: dates %v %q, rules %q %q", h.Dates, h.DateNames, h.RuleTexts(), h.RuleNames)
	}
	// A rule column alone.
	h, err = ReadHolidays(strings.NewReader("Rule\nlast Mon May\n"), "h.csv")
	if err != nil || len(h.Dates) != 0 || len(h.Rules) != 1 || h.Rules[0] != calendar.Last(time.Monday, time.May) {
		t.Errorf("rule column alone: %v, %+v", err, h)
	}
}

func TestReadHolidaysErrors(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ in, want string }{
		// The date-only formats, as before rules.
		{"2021-01-01\n2021-02-30\n", `h.txt:2:1: not a date of the form YYYY-MM-DD: "2021-02-30"`},
		{"name,date\nNew Year,2021-01-01\nFounders,14/03/2021\n", `h.txt:3:10: not a date of the form YYYY-MM-DD: "14/03/2021"`},
		{"name,date\nNew Year\n", `h.txt:2: no date: the row has 1 fields, the date is field 2`},
		{"# nothing\n", `h.txt: no holiday dates or rules`},
		// Rules.
		{"2021-01-01\n4 Thu Novembr\n",
			`h.txt:2:1: not a date (YYYY-MM-DD) or a holiday rule: "4 Thu Novembr": "Novembr" is not a month: want Jan..Dec or the full name`},
		{"date,rule,name\n,5 Mon May,Spring\n",
			`h.txt:2:2: not a holiday rule: "5 Mon May": a fifth Monday is not in every May: use last Mon May`},
		{"rule,name\nfixed 13-01,x\n",
			`h.txt:2:1: not a holiday rule: "fixed 13-01": "13-01" is not a month and day of the form MM-DD (12-25)`},
		{"rule\nevery other Friday\n",
			`h.txt:2:1: not a holiday rule: "every other Friday": want fixed MM-DD (fixed 12-25); N WEEKDAY MONTH with N 1..4 (4 Thu Nov); ` +
				`last WEEKDAY MONTH (last Mon May); easter or easter ±DAYS (easter -2, easter +1)`},
		{"date,rule\n2021-01-01,easter\n", `h.txt:2:12: a row gives a date or a rule, not both (the date is "2021-01-01")`},
		{"date,rule,name\n,,Nameless\n", `h.txt:2:1: missing date or rule`},
		{"date,name\n4 Thu Nov,Thanksgiving\n", `h.txt:2:1: not a date of the form YYYY-MM-DD: "4 Thu Nov" (a rule goes in a rule column)`},
		{"12-25\n", `h.txt:1:1: not a date of the form YYYY-MM-DD: "12-25" (for the same day every year, give the rule fixed 12-25)`},
		{"name,rule\nThanksgiving\n", `h.txt:2: no rule: the row has 1 fields, the rule is field 2`},
		{"name,date,rule\nThanksgiving\n", `h.txt:2: no date or rule: the row has 1 fields, the date is field 2 and the rule field 3`},
	} {
		_, err := ReadHolidays(strings.NewReader(c.in), "h.txt")
		if err == nil || err.Error() != c.want || !errors.Is(err, ErrBadInput) {
			t.Errorf("%q: error %v\nwant %s", c.in, err, c.want)
		}
	}
	// Every bad entry is reported, in file order.
	_, err := ReadHolidays(strings.NewReader("easter 2\n2021-13-01\nlast Mon May\n6 Sun Jun\n"), "h.txt")
	var list ErrorList
	if !errors.As(err, &list) || len(list) != 3 || list[0].Line != 1 || list[1].Line != 2 || list[2].Line != 4 {
		t.Errorf("several errors: %v", err)
	}
}

func TestReadDemandMergesHolidayList(t *testing.T) {
	t.Parallel()
	start := calendar.FromYMD(2021, time.January, 1) // 400 days: to 2022-02-04
	text := demandCSV(start, 400, func(i int, r string) string {
		if i == 1 { // the file marks 2 January itself
			return fmt.Sprintf("%s,100,1", start+1)
		}
		return r
	})
	list := &Holidays{Dates: []calendar.Date{start, start + 1, start + 72, calendar.FromYMD(2030, 1, 1)}}
	d, err := ReadDemand(strings.NewReader(text), "d.csv", DemandReadOptions{Holidays: list, HolidaysName: "h.txt"})
	if err != nil {
		t.Fatal(err)
	}
	if d.Holidays != 3 || !d.Holiday[0] || !d.Holiday[1] || !d.Holiday[72] || d.Holiday[2] || d.HolidaysFile != "h.txt" ||
		d.HolidayListDates != 4 || len(d.HolidayRules) != 0 {
		t.Errorf("holidays %d (first days %v), file %q, %d listed dates; want 3 (1 Jan, 2 Jan, 14 Mar)",
			d.Holidays, d.Holiday[:3], d.HolidaysFile, d.HolidayListDates)
	}
	if len(d.Warnings) != 0 {
		t.Errorf("warnings %q", d.Warnings)
	}
	d, err = ReadDemand(strings.NewReader(text), "d.csv", DemandReadOptions{Holidays: &Holidays{Dates: list.Dates[3:]}, HolidaysName: "h.txt"})
	if err != nil || len(d.Warnings) != 1 || !strings.Contains(d.Warnings[0], "none of the 1 dates in the holiday list h.txt") {
		t.Errorf("unmatched list: %v, warnings %q", err, d.Warnings)
	}

	// Rules are expanded over the record's years, 2021 and 2022: 1 January
	// of both, Easter Monday 2021 (5 April); Easter Monday 2022 (18 April)
	// is after the record's end.
	rules := &Holidays{Rules: []calendar.HolidayRule{calendar.Easter(1), calendar.Fixed(time.January, 1)}}
	d, err = ReadDemand(strings.NewReader(text), "d.csv", DemandReadOptions{Holidays: rules, HolidaysName: "h.txt"})
	if err != nil {
		t.Fatal(err)
	}
	var marked []string
	for i, h := range d.Holiday {
		if h {
			marked = append(marked, d.Dates[i].String())
		}
	}
	want := []string{"2021-01-01", "2021-01-02", "2021-04-05", "2022-01-01"} // 2 January from the file's column
	if !slices.Equal(marked, want) || d.Holidays != 4 || !slices.Equal(d.HolidayRules, []string{"Easter + 1 day", "1 January"}) {
		t.Errorf("holidays %v (%d), rules %q; want %v", marked, d.Holidays, d.HolidayRules, want)
	}
}

// FuzzReadHolidays checks that the reader never panics and that what it
// returns is sorted, without repeats, with a name for every entry.
func FuzzReadHolidays(f *testing.F) {
	f.Add([]byte("2021-12-25\nfixed 01-01\n4 Thu Nov\n"))
	f.Add([]byte("date,rule,name\n2021-03-14,,Founders' Day\n,easter +1,Easter Monday\n"))
	f.Add([]byte("rule\nlast Mon May\n5 Mon May\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		h, err := ReadHolidays(strings.NewReader(string(data)), "h.txt")
		if err != nil {
			return
		}
		if len(h.Dates) != len(h.DateNames) || len(h.Rules) != len(h.RuleNames) || len(h.Dates)+len(h.Rules) == 0 {
			t.Fatalf("lengths: %+v", h)
		}
		for i := 1; i < len(h.Dates); i++ {
			if h.Dates[i] <= h.Dates[i-1] {
				t.Fatalf("dates not strictly increasing: %v", h.Dates)
			}
		}
		for i, r := range h.Rules {
			if slices.Contains(h.Rules[:i], r) {
				t.Fatalf("repeated rule %s", r)
			}
			r.Dates(2024, 2024) // panics for an invalid rule
		}
	})
}
