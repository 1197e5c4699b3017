package calibrate

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"wxstress/calendar"
)

// kestrelDay is one synthetic day of the fictional Kestrel Bay record.
type kestrelDay struct {
	date   calendar.Date
	hi, lo float64 // °C, rounded to 0.1 so that their text round-trips exactly
}

// kestrelBay returns n synthetic days from start: a mild maritime climate
// (annual mean 11 °C, seasonal amplitude 7 °C) with noise from a fixed seed.
// level and scale shift and stretch it (for °F-like records).
func kestrelBay(start calendar.Date, n int, level, scale float64) []kestrelDay {
	rng := rand.New(rand.NewPCG(1, 2))
	days := make([]kestrelDay, n)
	round := func(x float64) float64 { return math.Round(x*10) / 10 }
	for i := range days {
		d := start + calendar.Date(i)
		mean := 11 + 7*math.Sin(2*math.Pi*(float64(d.DayOfYear())-110)/calendar.DaysPerYear) + 2*rng.NormFloat64()
		half := 3 + 2*rng.Float64()
		days[i] = kestrelDay{d, round(level + scale*(mean+half)), round(level + scale*(mean-half))}
	}
	return days
}

func ftoa(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// csvText joins a header and rows into CSV text with the given line end.
func csvText(header string, rows []string, eol string) string {
	var b strings.Builder
	b.WriteString(header)
	b.WriteString(eol)
	for _, r := range rows {
		b.WriteString(r)
		b.WriteString(eol)
	}
	return b.String()
}

// pairRows formats days as "date,max,min" rows.
func pairRows(days []kestrelDay) []string {
	rows := make([]string, len(days))
	for i, d := range days {
		rows[i] = d.date.String() + "," + ftoa(d.hi) + "," + ftoa(d.lo)
	}
	return rows
}

// meanRows formats days as "date,mean" rows, with mean = (max + min)/2.
func meanRows(days []kestrelDay) []string {
	rows := make([]string, len(days))
	for i, d := range days {
		rows[i] = d.date.String() + "," + ftoa((d.hi+d.lo)/2)
	}
	return rows
}

var kestrelStart = calendar.FromYMD(2019, time.March, 1)

const kestrelDays = 800 // a little over two years

func TestReadColumnVariants(t *testing.T) {
	t.Parallel()
	days := kestrelBay(kestrelStart, kestrelDays, 0, 1)
	var cases []struct{ header, from string }
	for _, m := range append(append([]string{}, meanNames...), "TAVG", "Temp_Mean") {
		cases = append(cases, struct{ header, from string }{"date," + m, "column " + m})
	}
	for i := range maxNames {
		hi, lo := maxNames[i], minNames[i]
		cases = append(cases, struct{ header, from string }{"date," + hi + "," + lo, "(max + min)/2 from columns " + hi + ", " + lo})
	}
	cases = append(cases,
		struct{ header, from string }{"DAY,TMAX,TMIN", "(max + min)/2 from columns TMAX, TMIN"},
		struct{ header, from string }{"Date,Tx,Tn", "(max + min)/2 from columns Tx, Tn"},
	)
	for _, c := range cases {
		t.Run(c.header, func(t *testing.T) {
			t.Parallel()
			rows := meanRows(days)
			if strings.Count(c.header, ",") == 2 {
				rows = pairRows(days)
			}
			s, err := ReadCSV(strings.NewReader(csvText(c.header, rows, "\n")), "kestrel.csv", ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			checkKestrel(t, s, days)
			if s.MeanFrom != c.from {
				t.Errorf("MeanFrom = %q, want %q", s.MeanFrom, c.from)
			}
			if len(s.Warnings) != 0 {
				t.Errorf("unexpected warnings %q", s.Warnings)
			}
		})
	}
}

// checkKestrel compares a complete series with the days it was written from;
// the daily mean is (max + min)/2 (common practice for degree-day indices).
func checkKestrel(t *testing.T, s *Series, days []kestrelDay) {
	t.Helper()
	if s.Name != "kestrel.csv" || s.Units != Celsius {
		t.Errorf("Name, Units = %q, %q; want kestrel.csv, C", s.Name, s.Units)
	}
	if s.Start != days[0].date || len(s.Temps) != len(days) {
		t.Fatalf("grid %v + %d days, want %v + %d", s.Start, len(s.Temps), days[0].date, len(days))
	}
	for i, d := range days {
		if want := (d.hi + d.lo) / 2; s.Temps[i] != want {
			t.Fatalf("Temps[%d] (%v) = %v, want %v", i, d.date, s.Temps[i], want)
		}
	}
	if missing, longest := s.Gaps(); missing != 0 || longest != 0 {
		t.Errorf("Gaps() = %d, %d on a complete record", missing, longest)
	}
}

func TestReadMeanChoice(t *testing.T) {
	t.Parallel()
	days := kestrelBay(kestrelStart, kestrelDays, 0, 1)
	// tavg differs from (max + min)/2 on purpose, as a mean of hourly
	// readings would.
	const offset = 0.3
	rows := make([]string, len(days))
	for i, d := range days {
		rows[i] = d.date.String() + "," + ftoa(d.hi) + "," + ftoa(d.lo) + "," + ftoa((d.hi+d.lo)/2+offset)
	}
	text := csvText("date,TMAX,TMIN,tavg", rows, "\n")
	const tol = 1e-12

	cases := []struct {
		mean string
		from string
		want func(kestrelDay) float64
	}{
		{"", "(max + min)/2 from columns TMAX, TMIN", func(d kestrelDay) float64 { return (d.hi + d.lo) / 2 }},
		{"TAVG", "column tavg", func(d kestrelDay) float64 { return (d.hi+d.lo)/2 + offset }},
		{" tmax ", "column TMAX", func(d kestrelDay) float64 { return d.hi }},
	}
	for _, c := range cases {
		s, err := ReadCSV(strings.NewReader(text), "kestrel.csv", ReadOptions{MeanColumn: c.mean})
		if err != nil {
			t.Fatalf("MeanColumn %q: %v", c.mean, err)
		}
		if s.MeanFrom != c.from {
			t.Errorf("MeanColumn %q: MeanFrom = %q, want %q", c.mean, s.MeanFrom, c.from)
		}
		for i, d := range days {
			if math.Abs(s.Temps[i]-c.want(d)) > tol {
				t.Fatalf("MeanColumn %q: Temps[%d] = %v, want %v", c.mean, i, s.Temps[i], c.want(d))
			}
		}
	}

	_, err := ReadCSV(strings.NewReader(text), "kestrel.csv", ReadOptions{MeanColumn: "tmean"})
	want := `kestrel.csv:1: mean column "tmean" not found; columns found: "date", "TMAX", "TMIN", "tavg"`
	if err == nil || err.Error() != want {
		t.Errorf("absent mean column: error %v, want %q", err, want)
	}
}

func TestReadAmbiguousColumns(t *testing.T) {
	t.Parallel()
	days := kestrelBay(kestrelStart, kestrelDays, 0, 1)
	rows := make([]string, len(days))
	for i, d := range days {
		// The temp and max columns hold a value that would be rejected as
		// implausible if either were read.
		rows[i] = d.date.String() + ",99," + ftoa((d.hi+d.lo)/2) + ",99"
	}
	// tavg is preferred to temp, wherever it stands; tmax alone is no pair.
	s, err := ReadCSV(strings.NewReader(csvText("date,temp,tavg,tmax", rows, "\n")), "kestrel.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	checkKestrel(t, s, days)
	if len(s.Warnings) != 1 || !strings.Contains(s.Warnings[0], "columns temp could also be the daily mean; using column tavg") {
		t.Errorf("warnings %q, want one naming temp and tavg", s.Warnings)
	}

	// Of two max/min pairs, tmax/tmin is preferred.
	pairs := pairRows(days)
	for i := range pairs {
		pairs[i] += ",99,-99"
	}
	s, err = ReadCSV(strings.NewReader(csvText("date,tmax,tmin,max,min", pairs, "\n")), "kestrel.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	checkKestrel(t, s, days)
	if len(s.Warnings) != 2 || !strings.Contains(s.Warnings[0], "columns max could also be the daily maximum") {
		t.Errorf("two pairs: warnings %q", s.Warnings)
	}

	// Two max columns do not matter when the mean is named.
	s, err = ReadCSV(strings.NewReader(csvText("date,max,tavg,tmax", rows, "\n")), "kestrel.csv", ReadOptions{MeanColumn: "tavg"})
	if err != nil {
		t.Fatal(err)
	}
	checkKestrel(t, s, days)
	if len(s.Warnings) != 0 || s.MeanFrom != "column tavg" {
		t.Errorf("named mean: MeanFrom %q, warnings %q", s.MeanFrom, s.Warnings)
	}
}

func TestReadGaps(t *testing.T) {
	t.Parallel()
	days := kestrelBay(kestrelStart, kestrelDays, 0, 1)
	rows := pairRows(days)
	wantNaN := map[int]bool{}
	// Missing-value spellings, every third day from day 100 (common practice
	// in station files; -9999 is the usual numeric code).
	codes := []string{"", "NA", "NaN", "nan", "null", "-9999", "-9999.0", " NA "}
	for k, code := range codes {
		i := 100 + 3*k
		if k%2 == 0 {
			rows[i] = days[i].date.String() + "," + code + "," + ftoa(days[i].lo)
		} else {
			rows[i] = days[i].date.String() + "," + ftoa(days[i].hi) + "," + code
		}
		wantNaN[i] = true
	}
	// Days 300..304 absent from the file.
	for i := 300; i < 305; i++ {
		rows[i] = ""
		wantNaN[i] = true
	}
	// Leading and trailing rows without values are trimmed.
	const lead, trail = 3, 4
	for i := range lead {
		rows[i] = days[i].date.String() + ",NA,NA"
	}
	for i := len(rows) - trail; i < len(rows); i++ {
		rows[i] = days[i].date.String() + ",,"
	}
	var kept []string
	for _, r := range rows {
		if r != "" {
			kept = append(kept, r)
		}
	}
	s, err := ReadCSV(strings.NewReader(csvText("date,tmax,tmin", kept, "\n")), "kestrel.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// Trailing rows without values move the data end, which a conditional
	// start depends on: that, and only that, is said.
	want := fmt.Sprintf("the last %d rows (%v to %v) have no value: the record ends on %v, the day a conditional start takes its state from",
		trail, days[len(days)-trail].date, days[len(days)-1].date, days[len(days)-trail-1].date)
	if len(s.Warnings) != 1 || s.Warnings[0] != want {
		t.Errorf("warnings %q, want only %q", s.Warnings, want)
	}
	if s.Start != days[lead].date || s.End() != days[len(days)-trail-1].date {
		t.Fatalf("span %v..%v, want %v..%v", s.Start, s.End(), days[lead].date, days[len(days)-trail-1].date)
	}
	for i, v := range s.Temps {
		j := i + lead
		if wantNaN[j] != math.IsNaN(v) {
			t.Errorf("day %v: value %v, want gap=%v", days[j].date, v, wantNaN[j])
		}
	}
	// 8 missing values and 5 absent days; the longest run is the 5 absent
	// days (counted by construction above).
	if missing, longest := s.Gaps(); missing != len(codes)+5 || longest != 5 {
		t.Errorf("Gaps() = %d, %d; want %d, 5", missing, longest, len(codes)+5)
	}
}

func TestReadLongGapWarning(t *testing.T) {
	t.Parallel()
	days := kestrelBay(kestrelStart, kestrelDays, 0, 1)
	rows := pairRows(days)
	// A mistyped year on the first row: 2019 written as 2009 leaves a
	// decade without values.
	rows[0] = strings.Replace(rows[0], "2019", "2009", 1)
	s, err := ReadCSV(strings.NewReader(csvText("date,tmax,tmin", rows, "\n")), "kestrel.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	typo := calendar.FromYMD(2009, time.March, 1)
	wantGap := int(days[1].date - typo - 1) // the days strictly between the two rows
	if missing, longest := s.Gaps(); missing != wantGap || longest != wantGap {
		t.Errorf("Gaps() = %d, %d; want %d, %d", missing, longest, wantGap, wantGap)
	}
	want := strconv.Itoa(wantGap) + " days without values from 2009-03-02 to 2019-03-01"
	if len(s.Warnings) != 1 || !strings.HasPrefix(s.Warnings[0], want) {
		t.Errorf("warnings %q, want one starting %q", s.Warnings, want)
	}
}

func TestReadBOMAndCRLF(t *testing.T) {
	t.Parallel()
	days := kestrelBay(kestrelStart, kestrelDays, 0, 1)
	plain := csvText("date,tmax,tmin", pairRows(days), "\n")
	rows := pairRows(days)
	for i := range rows {
		rows[i] = " " + strings.ReplaceAll(rows[i], ",", " , ") + " "
	}
	rows[10] += "\r\n   " // a blank line of spaces
	rows[20] += "\r\n,,"  // a line of empty fields
	fancy := "\uFEFF" + csvText(` Date , "TMAX",TMIN `, rows, "\r\n") + "\r\n"

	for _, text := range []string{plain, fancy} {
		s, err := ReadCSV(strings.NewReader(text), "kestrel.csv", ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		checkKestrel(t, s, days)
		sum := sha256.Sum256([]byte(text)) // reference: crypto/sha256 on the same bytes
		if s.SHA256 != hex.EncodeToString(sum[:]) {
			t.Errorf("SHA256 = %s, want %x", s.SHA256, sum)
		}
	}
}

func TestReadFahrenheit(t *testing.T) {
	t.Parallel()
	// A cool-summer °F record whose values all stay below 60, so no single
	// value is implausible for °C: only the warmest month mean (about 55)
	// gives it away.
	cool := kestrelBay(kestrelStart, kestrelDays, 40, 0.6)
	for _, d := range cool {
		if d.hi > plausibleC {
			t.Fatalf("test data: %v max %v exceeds the °C limit", d.date, d.hi)
		}
	}
	text := csvText("date,tmax,tmin", pairRows(cool), "\n")
	s, err := ReadCSV(strings.NewReader(text), "kestrel.csv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Units != Celsius || len(s.Warnings) != 1 || !strings.Contains(s.Warnings[0], "--units F") || !strings.Contains(s.Warnings[0], "°F") {
		t.Errorf("undeclared: Units %q, warnings %q; want C and one °F warning", s.Units, s.Warnings)
	}
	s, err = ReadCSV(strings.NewReader(text), "kestrel.csv", ReadOptions{Units: Fahrenheit})
	if err != nil {
		t.Fatal(err)
	}
	if s.Units != Fahrenheit || len(s.Warnings) != 0 {
		t.Errorf("declared °F: Units %q, warnings %q", s.Units, s.Warnings)
	}

	// A warm °F record (summer days near 80): undeclared, it fails with the
	// hint on every hot day; declared, it reads.
	warm := kestrelBay(kestrelStart, kestrelDays, 32, 1.8) // °C → °F, common practice
	text = csvText("date,tmax,tmin", pairRows(warm), "\n")
	_, err = ReadCSV(strings.NewReader(text), "kestrel.csv", ReadOptions{})
	var list ErrorList
	if !errors.As(err, &list) || len(list) == 0 {
		t.Fatalf("undeclared warm °F record: error %v, want an ErrorList", err)
	}
	for _, e := range list {
		if e.MoreRows == 0 && !strings.HasSuffix(e.Msg, "if the file is in °F, pass --units F") {
			t.Fatalf("error without the °F hint: %v", e)
		}
	}
	s, err = ReadCSV(strings.NewReader(text), "kestrel.csv", ReadOptions{Units: Fahrenheit})
	if err != nil {
		t.Fatal(err)
	}
	if s.Units != Fahrenheit || len(s.Temps) != kestrelDays {
		t.Errorf("declared warm °F: Units %q, %d days", s.Units, len(s.Temps))
	}
}

func TestReadFile(t *testing.T) {
	t.Parallel()
	days := kestrelBay(kestrelStart, kestrelDays, 0, 1)
	data := []byte(csvText("date,tavg", meanRows(days), "\n"))
	path := filepath.Join(t.TempDir(), "kestrel.csv")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	s, err := ReadFile(path, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256(data) // reference: crypto/sha256 on the file's bytes
	if s.Name != path || s.SHA256 != hex.EncodeToString(sum[:]) || len(s.Temps) != kestrelDays {
		t.Errorf("Name %q, SHA256 %s, %d days; want %q, %x, %d", s.Name, s.SHA256, len(s.Temps), path, sum, kestrelDays)
	}

	if _, err := ReadFile(filepath.Join(t.TempDir(), "absent.csv"), ReadOptions{}); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("absent file: error %v, want fs.ErrNotExist", err)
	}

	bad := filepath.Join("testdata", "read", "no_temperature.csv")
	_, err = ReadFile(bad, ReadOptions{})
	if err == nil || !strings.HasPrefix(err.Error(), bad+":1: no temperature columns") || !errors.Is(err, ErrBadInput) {
		t.Errorf("ReadFile(%s): error %v", bad, err)
	}
}

// errorCase is a file with exactly one problem. Line and column positions
// are counted by hand from the text.
type errorCase struct {
	name   string
	text   string
	opt    ReadOptions
	prefix string // the exact "file:line:column: " start of the message
	field  string
	msg    string // a part of the message
}

var errorCases = []errorCase{
	{"bad date", "date,tavg\n2020-01-01,1\n2020/01/02,2\n", ReadOptions{},
		"k.csv:3:1: ", "date", `not a date of the form YYYY-MM-DD: "2020/01/02"`},
	{"impossible date", "date,tavg\n2023-02-30,1\n", ReadOptions{},
		"k.csv:2:1: ", "date", `"2023-02-30"`},
	{"missing date", "date,tavg\n2020-01-01,1\n ,2\n", ReadOptions{},
		"k.csv:3:2: ", "date", "missing date"},
	{"bad number", "date,tavg\n2020-01-01,1\n2020-01-02, abc\n", ReadOptions{},
		"k.csv:3:13: ", "tavg", `not a number: "abc"`},
	{"decimal comma", "DATE,TAVG\n2020-01-02,\"1,5\"\n", ReadOptions{},
		"k.csv:2:12: ", "TAVG", `not a number: "1,5"`},
	{"hex number", "date,tavg\n2020-01-02,0x1p3\n", ReadOptions{},
		"k.csv:2:12: ", "tavg", `not a number: "0x1p3"`},
	{"infinity", "date,tavg\n2020-01-02,Inf\n", ReadOptions{},
		"k.csv:2:12: ", "tavg", `not a finite number: "Inf"`},
	{"overflow", "date,tmax,tmin\n2020-01-02,1e400,1\n", ReadOptions{},
		"k.csv:2:12: ", "tmax", `not a finite number: "1e400"`},
	{"duplicate date", "date,tavg\n2020-01-01,1\n2020-01-02,2\n2020-01-03,3\n2020-01-02,4\n", ReadOptions{},
		"k.csv:5:1: ", "date", `duplicate date "2020-01-02", first on line 3`},
	{"out of order", "date,tavg\n2020-01-01,1\n2020-01-05,2\n2020-01-03,3\n", ReadOptions{},
		"k.csv:4:1: ", "date", `date "2020-01-03" is out of order: it follows 2020-01-05 on line 3`},
	{"min above max", "date,tmax,tmin\n2020-01-01,5.0,7.5\n", ReadOptions{},
		"k.csv:2:16: ", "tmin", `minimum "7.5" is above the maximum "5.0" (column tmax)`},
	{"implausible °C with hint", "date,tavg\n2020-01-01,75.2\n", ReadOptions{},
		"k.csv:2:12: ", "tavg", `implausible temperature "75.2": beyond ±60 °C; if the file is in °F, pass --units F`},
	{"implausible cold °C with hint", "date,tmax,tmin\n2020-01-01,-20,-61\n", ReadOptions{},
		"k.csv:2:16: ", "tmin", `implausible temperature "-61": beyond ±60 °C; if the file is in °F, pass --units F`},
	{"implausible for both", "date,tavg\n2020-01-01,150\n", ReadOptions{},
		"k.csv:2:12: ", "tavg", `implausible temperature "150": beyond ±60 °C`},
	{"implausible declared °C", "date,tavg\n2020-01-01,75\n", ReadOptions{Units: Celsius},
		"k.csv:2:12: ", "tavg", `implausible temperature "75": beyond ±60 °C`},
	{"implausible declared °F", "date,tavg\n2020-01-01,141\n", ReadOptions{Units: Fahrenheit},
		"k.csv:2:12: ", "tavg", `implausible temperature "141": beyond −76 to 140 °F (±60 °C)`},
	{"field count", "date,tavg\n2020-01-01,1\n2020-01-02,2,3\n", ReadOptions{},
		"k.csv:3:1: ", "", "wrong number of fields: 3, the header has 2"},
	{"bare quote", "date,tavg\n2020-01-01,1\n2020-01-02,2\"5\n", ReadOptions{},
		"k.csv:3:13: ", "", `csv syntax: bare " in non-quoted-field`},
	// encoding/csv places an unterminated quote at the end of the input.
	{"unterminated quote", "date,tavg\n2020-01-01,\"1\n", ReadOptions{},
		"k.csv:2:15: ", "", `csv syntax: extraneous or missing " in quoted-field`},
	{"quote spanning lines", "date,tavg\n2020-01-01,\"1\n2\"x\n", ReadOptions{},
		"k.csv:3:2: ", "", `csv syntax: extraneous or missing " in quoted-field (in the record that starts on line 2)`},
	{"empty file", "", ReadOptions{},
		"k.csv: ", "", "empty file"},
	{"blank lines only", "\uFEFF\n\r\n\n", ReadOptions{},
		"k.csv: ", "", "empty file"},
	{"header only", "date,tavg\r\n", ReadOptions{},
		"k.csv: ", "", "no data rows"},
	{"too short", "date,tavg\n2020-01-01,1\n2020-01-02,NA\n2020-01-03,3\n", ReadOptions{},
		"k.csv: ", "", "only 2 days have a value: at least two full years are needed (730 days)"},
	{"no date column", "when,tavg\n2020-01-01,1\n", ReadOptions{},
		"k.csv:1: ", "", `no date column (accepted names: date, day); columns found: "when", "tavg"`},
	{"header after blank lines", "\n\nwhen,tavg\n2020-01-01,1\n", ReadOptions{},
		"k.csv:3: ", "", "no date column"},
	{"no temperature columns", "date,tmax,dewpoint\n2020-01-01,1,0\n", ReadOptions{},
		"k.csv:1: ", "", `no temperature columns: need a daily mean (tavg, tmean, temp, temp_mean, mean, tas) or a max/min pair (tmax/tmin, temp_max/temp_min, max/min, tx/tn, maximum/minimum); columns found: "date", "tmax", "dewpoint"`},
	{"absent mean column", "date,tmax,tmin\n2020-01-01,1,0\n", ReadOptions{MeanColumn: "tavg"},
		"k.csv:1: ", "", `mean column "tavg" not found; columns found: "date", "tmax", "tmin"`},
	{"mean column is the date", "date,tmax,tmin\n2020-01-01,1,0\n", ReadOptions{MeanColumn: "DATE"},
		"k.csv:1: ", "", `mean column "DATE" is the date column`},
	{"long field shortened", "date,tavg\n2020-01-01," + strings.Repeat("x", 1000) + "\n", ReadOptions{},
		"k.csv:2:12: ", "tavg", `not a number: "` + strings.Repeat("x", maxQuoted) + `"…`},
}

func TestReadErrors(t *testing.T) {
	t.Parallel()
	for _, c := range errorCases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			s, err := ReadCSV(strings.NewReader(c.text), "k.csv", c.opt)
			if err == nil {
				t.Fatalf("accepted, %d days", len(s.Temps))
			}
			var list ErrorList
			if !errors.As(err, &list) || len(list) != 1 {
				t.Fatalf("error %v (%T), want an ErrorList of one", err, err)
			}
			if !errors.Is(err, ErrBadInput) {
				t.Errorf("error does not wrap ErrBadInput")
			}
			e := list[0]
			msg := e.Error()
			if !strings.HasPrefix(msg, c.prefix) || strings.Count(msg[:len(c.prefix)], ":") != strings.Count(c.prefix, ":") {
				t.Errorf("error %q, want prefix %q", msg, c.prefix)
			}
			if e.Field != c.field {
				t.Errorf("Field = %q, want %q", e.Field, c.field)
			}
			if !strings.Contains(e.Msg, c.msg) {
				t.Errorf("Msg %q does not contain %q", e.Msg, c.msg)
			}
		})
	}
}

func TestReadErrorListSummary(t *testing.T) {
	t.Parallel()
	rows := []string{"2020-01-01,1"}
	const bad = 13
	for i := range bad {
		rows = append(rows, calendar.FromYMD(2020, time.January, 2+i).String()+",x"+strconv.Itoa(i))
	}
	_, err := ReadCSV(strings.NewReader(csvText("date,tavg", rows, "\n")), "k.csv", ReadOptions{})
	var list ErrorList
	if !errors.As(err, &list) || len(list) != bad {
		t.Fatalf("error %v, want %d errors", err, bad)
	}
	for i, e := range list {
		if e.Line != i+3 || e.Column != 12 {
			t.Errorf("error %d at %d:%d, want %d:12", i, e.Line, e.Column, i+3)
		}
	}
	lines := strings.Split(err.Error(), "\n")
	if len(lines) != MaxShown+1 || lines[MaxShown] != "(and 3 more errors)" {
		t.Errorf("summary:\n%s", err)
	}
	if !strings.HasPrefix(lines[MaxShown-1], "k.csv:12:12: field tavg: ") {
		t.Errorf("tenth line %q", lines[MaxShown-1])
	}
}

func TestReadErrorsInRowOrder(t *testing.T) {
	t.Parallel()
	// Three problems on one row, reported in column order.
	text := "date,tmax,tmin\n2020-01-01,1,0\nbad,x,y\n"
	_, err := ReadCSV(strings.NewReader(text), "k.csv", ReadOptions{})
	var list ErrorList
	if !errors.As(err, &list) || len(list) != 3 {
		t.Fatalf("error %v, want 3 errors", err)
	}
	for i, want := range []struct {
		col   int
		field string
	}{{1, "date"}, {5, "tmax"}, {7, "tmin"}} {
		if list[i].Line != 3 || list[i].Column != want.col || list[i].Field != want.field {
			t.Errorf("error %d: %v, want line 3 column %d field %s", i, list[i], want.col, want.field)
		}
	}
}

func TestReadOptionsUnitsChecked(t *testing.T) {
	t.Parallel()
	_, err := ReadCSV(strings.NewReader("date,tavg\n"), "k.csv", ReadOptions{Units: "K"})
	if err == nil || !strings.HasPrefix(err.Error(), "calibrate: ") {
		t.Errorf("Units K: error %v", err)
	}
}

// failingReader returns some data, then an error.
type failingReader struct {
	data string
	err  error
}

func (r *failingReader) Read(p []byte) (int, error) {
	if r.data == "" {
		return 0, r.err
	}
	n := copy(p, r.data)
	r.data = r.data[n:]
	return n, nil
}

func TestReadReaderFailure(t *testing.T) {
	t.Parallel()
	cause := errors.New("disk on fire")
	r := &failingReader{data: "date,tavg\n2020-01-01,1\n", err: cause}
	_, err := ReadCSV(r, "k.csv", ReadOptions{})
	if !errors.Is(err, cause) || errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), "k.csv") {
		t.Errorf("error %v, want the reader's error naming the file", err)
	}
	var _ io.Reader = r
}

func BenchmarkReadCSV(b *testing.B) {
	const rows = 25000 // about 68 years of daily data
	text := csvText("date,tmax,tmin", pairRows(kestrelBay(calendar.FromYMD(1955, time.January, 1), rows, 0, 1)), "\n")
	b.SetBytes(int64(len(text)))
	for b.Loop() {
		if _, err := ReadCSV(strings.NewReader(text), "k.csv", ReadOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestUnitsLookWrong checks the unit-sanity warnings on a real record: the
// NOAA Seattle daily series (testdata/noaa, °C) read as declared °F is
// flagged as probably °C, the same series converted to °F and read without
// declared units is refused with the fix named, a cool °F record declared
// as °C is flagged as probably °F, and each read in its own units gives no
// warning.
func TestUnitsLookWrong(t *testing.T) {
	t.Parallel()
	raw, err := os.ReadFile("../testdata/noaa/seattle.csv")
	if err != nil {
		t.Fatal(err)
	}
	warned := func(s *Series, part string) bool {
		return slices.ContainsFunc(s.Warnings, func(w string) bool { return strings.Contains(w, part) })
	}
	read := func(text string, u Units) *Series {
		s, err := ReadCSV(strings.NewReader(text), "seattle.csv", ReadOptions{Units: u})
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	if s := read(string(raw), ""); warned(s, "look like °") {
		t.Errorf("°C read as °C: %q", s.Warnings)
	}
	if s := read(string(raw), Fahrenheit); !warned(s, "look like °C") || !warned(s, "drop --units F") {
		t.Errorf("°C read as °F: %q", s.Warnings)
	}
	var f strings.Builder
	for i, line := range strings.Split(strings.TrimSpace(string(raw)), "\n") {
		if i == 0 {
			f.WriteString(line + "\n")
			continue
		}
		fields := strings.Split(line, ",")
		for k := 1; k < len(fields); k++ {
			if v, err := strconv.ParseFloat(fields[k], 64); err == nil {
				fields[k] = strconv.FormatFloat(v*9/5+32, 'f', 1, 64)
			}
		}
		f.WriteString(strings.Join(fields, ",") + "\n")
	}
	// Seattle's summer maxima pass 60 in °F, so read as °C they are errors
	// that name the fix.
	if _, err := ReadCSV(strings.NewReader(f.String()), "seattle.csv", ReadOptions{}); err == nil ||
		!strings.Contains(err.Error(), "if the file is in °F, pass --units F") {
		t.Errorf("°F read without units: %v", err)
	}
	if s := read(f.String(), Fahrenheit); warned(s, "look like °") {
		t.Errorf("°F read as °F: %q", s.Warnings)
	}
	// A cool station in °F (2 + 8·cos °C: 21.6 to 50.4 °F, all inside the
	// ±60 range) declared as °C: its warmest month, 49.5, is hotter than
	// any station's, so it is still flagged.
	var cool strings.Builder
	cool.WriteString("date,tavg\n")
	for d := calendar.FromYMD(2010, time.January, 1); d < calendar.FromYMD(2013, time.January, 1); d++ {
		c := 2 + 8*math.Cos(2*math.Pi*(d.ModelTime()-200)/calendar.DaysPerYear)
		fmt.Fprintf(&cool, "%s,%.1f\n", d, c*9/5+32)
	}
	if s := read(cool.String(), Celsius); !warned(s, "look like °F") || !warned(s, "(--units C)") {
		t.Errorf("a cool °F record declared as °C: %q", s.Warnings)
	}
}

// TestReadMonthGapWarned: a gap of more than a month (here 40 days) is
// named, since the seasons it falls in drop out of the record's own seasons;
// a gap of a month is not.
func TestReadMonthGapWarned(t *testing.T) {
	for _, c := range []struct {
		gap  int
		want bool
	}{{40, true}, {31, false}} {
		var b strings.Builder
		b.WriteString("date,tavg\n")
		d := calendar.FromYMD(2018, time.January, 1)
		for i := range 3 * 365 {
			if i >= 400 && i < 400+c.gap {
				continue
			}
			fmt.Fprintf(&b, "%s,%.1f\n", d+calendar.Date(i), 10+float64(i%7))
		}
		s, err := ReadCSV(strings.NewReader(b.String()), "g.csv", ReadOptions{Units: Celsius})
		if err != nil {
			t.Fatal(err)
		}
		got := slices.ContainsFunc(s.Warnings, func(w string) bool {
			return strings.HasPrefix(w, fmt.Sprintf("%d days without values from", c.gap))
		})
		if got != c.want {
			t.Errorf("%d-day gap: warnings %q", c.gap, s.Warnings)
		}
	}
}

// TestReadSemicolonFile: a file separated by semicolons is read as one
// column; the error says so rather than only that no date column was found.
func TestReadSemicolonFile(t *testing.T) {
	t.Parallel()
	_, err := ReadCSV(strings.NewReader("date;tavg\n2020-01-01;3.5\n"), "semi.csv", ReadOptions{})
	if err == nil || !strings.Contains(err.Error(), "semi.csv:1: no date column") ||
		!strings.Contains(err.Error(), "reads like values separated by semicolons") {
		t.Errorf("error %v", err)
	}
}
