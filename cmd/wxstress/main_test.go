package main

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"html"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"unicode/utf8"

	"wxstress/internal/numfmt"
	"wxstress/model"
)

// call runs the tool in-process and returns its exit code, stdout and stderr.
func call(t *testing.T, ctx context.Context, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(ctx, args, &out, &errb)
	return code, out.String(), errb.String()
}

var (
	demoModelOnce sync.Once
	demoModelPath string
	demoModelDir  string // removed by TestMain
	demoStdout    string // what the demo printed
)

// TestMain removes the shared demo model's directory after the tests.
func TestMain(m *testing.M) {
	code := m.Run()
	if demoModelDir != "" {
		os.RemoveAll(demoModelDir)
	}
	os.Exit(code)
}

// demoModel fits the embedded demo station once and returns the model path.
func demoModel(t *testing.T) string {
	t.Helper()
	demoModelOnce.Do(func() {
		dir, err := os.MkdirTemp("", "wxstress-test")
		if err != nil {
			t.Fatal(err)
		}
		demoModelDir = dir
		demoModelPath = filepath.Join(dir, "demo", "model.json")
		code, stdout, stderr := call(t, context.Background(), "demo", "--paths", "200", "--dir", filepath.Join(dir, "demo"))
		if code != 0 {
			t.Fatalf("demo failed (%d): %s", code, stderr)
		}
		demoStdout = stdout
	})
	return demoModelPath
}

func TestExitCodes(t *testing.T) {
	t.Parallel()
	cases := []struct {
		args []string
		code int
		msg  string
	}{
		{nil, exitUsage, "Usage"},
		{[]string{"frobnicate"}, exitUsage, `unknown command "frobnicate"`},
		{[]string{"help"}, exitOK, ""},
		{[]string{"help", "simulate"}, exitOK, ""},
		{[]string{"simulate", "-h"}, exitOK, ""},
		{[]string{"version"}, exitOK, ""},
		{[]string{"fit"}, exitUsage, "--temps is required"},
		{[]string{"fit", "--temps", "x.csv", "--ar", "9"}, exitUsage, "want auto or 1..5"},
		{[]string{"fit", "--temps", "x.csv", "--shocks", "cauchy"}, exitUsage, "normal, t, skew-t"},
		{[]string{"fit", "--temps", "/nonexistent/x.csv"}, exitFailure, "no such file"},
		{[]string{"fit", "--bogus"}, exitUsage, "unknown flag"},
		{[]string{"simulate", "--model", "m.json", "--paths", "0"}, exitUsage, "--paths must be a number from 10"},
		{[]string{"simulate", "--model", "m.json", "--paths", "1"}, exitUsage, "--paths must be a number from 10"},
		{[]string{"simulate", "--model", "m.json", "--period", "winter"}, exitUsage, "MM-DD:MM-DD"},
		{[]string{"simulate", "--model", "m.json", "--period", "02-30:03-01"}, exitUsage, "malformed window"},
		{[]string{"simulate", "--model", "m.json", "--exceed", "frost:3"}, exitUsage, "unknown index"},
		{[]string{"fit-demand", "--temps", "../../demo/kestrel_bay_daily.csv", "--demand", "../../demo/lanternfield_demand.csv",
			"--load-unit", "GJ/day", "--load-column", "gas"}, exitFailure, `load column "gas" not found; columns found:`},
		{[]string{"fit-demand", "--temps", "t.csv", "--demand", "d.csv", "--unit", "GJ/day"}, exitUsage, "unknown flag: --unit"},
		{[]string{"simulate", "--model", "m.json", "--exceed", "hdd:heating:NaN"}, exitUsage, "not a finite number"},
		{[]string{"simulate", "--model", "m.json", "--exceed", "hdd:Inf"}, exitUsage, "not a finite number"},
		{[]string{"simulate", "--model", "m.json", "--exceed", "peak-date:heating:40"}, exitUsage, "the day of the peak is a date"},
		{[]string{"simulate", "--model", "m.json", "--exceed", "energy:heating:1e7"}, exitUsage, "demand energy needs --demand"},
		{[]string{"simulate", "--model", "m.json", "--demand", "d.json", "--exceed", "over-capacity:3"}, exitUsage, "needs --capacity"},
		{[]string{"simulate", "--model", "m.json", "--exceed", "cold-snap:heating:-12"}, exitUsage, "need --design"},
		{[]string{"simulate", "--model", "m.json", "--exceed", "hdd:jan:500"}, exitUsage,
			`period "jan" is not simulated; the run's periods are year, heating, cooling`},
		{[]string{"simulate", "--model", "m.json", "--period", "jan", "--exceed", "hdd:feb:500"}, exitUsage, "the run's periods are jan"},
		{[]string{"simulate", "--model", "m.json", "--format", "xml"}, exitUsage, "table, csv or json"},
		{[]string{"simulate", "--model", "m.json", "--hdd-base", "1e9"}, exitUsage, "want a temperature from −100 to 200"},
		{[]string{"simulate", "--model", "m.json", "--year", "0"}, exitUsage, "--year 0: want a year"},
		{[]string{"simulate", "--model", "m.json", "--loading", "0.3"}, exitUsage, "--loading goes with --hedge"},
		{[]string{"simulate", "--model", "m.json", "--title", "X"}, exitUsage, "--title goes with --report"},
		{[]string{"simulate", "--model", "m.json", "--detail", "--format", "json"}, exitUsage, "--detail is for --format table"},
		{[]string{"simulate", "--model", "m.json", "--observed", "o.csv", "--start", "climate"}, exitUsage, "--start climate contradicts it"},
		{[]string{"simulate", "--model", "m.json", "--snap-days", "5"}, exitUsage, "--snap-days goes with --design"},
		// The same problem, the same exit and message in every command.
		{[]string{"simulate", "--model", "m.json", "--demand", "d.json", "--capacity", "NaN"}, exitUsage, "simulate: --capacity NaN: needs --demand"},
		{[]string{"backtest", "--temps", "t.csv", "--period", "year", "--period", "year"}, exitUsage, "backtest: --period \"year\" is the same days as \"year\""},
		{[]string{"backtest", "--temps", "t.csv", "--period", "jan", "--period", "JAN"}, exitUsage, "backtest: --period \"JAN\" is the same days as \"jan\""},
		{[]string{"backtest", "--temps", "t.csv", "--hdd-base", "1000"}, exitUsage, "backtest: --hdd-base 1000: want a temperature from −100 to 200"},
		{[]string{"backtest", "--temps", "t.csv", "--period", "02-29:02-29"}, exitUsage, "backtest: --period: period \"02-29:02-29\" has no days in 2001"},
		// 1 − 1/T is 1 in floating point from about 10¹⁶: it once panicked.
		{[]string{"simulate", "--model", "m.json", "--return-periods", "1e17"}, exitUsage, "at most 1,000,000"},
		{[]string{"simulate", "--model", "m.json", "--design", "1-in-1e17"}, exitUsage, "at most 1,000,000"},
		{[]string{"simulate", "--model", "m.json", "--capacity-target", "peak:1-in-1e17"}, exitUsage, "at most 1,000,000"},
		// A solve keeps each path's 40 highest days: days:400 "achieved" 40.
		{[]string{"simulate", "--model", "m.json", "--capacity-target", "days:400"}, exitUsage, "days:x (0 ≤ x ≤ 10)"},
		{[]string{"simulate", "--model", "m.json", "--uncertainty-mode", "mix"}, exitUsage, "--uncertainty-mode goes with --uncertainty"},
	}
	for _, c := range cases {
		code, stdout, stderr := call(t, context.Background(), c.args...)
		if code != c.code {
			t.Errorf("%v: exit %d, want %d (stderr %q)", c.args, code, c.code, stderr)
		}
		if !strings.Contains(stdout+stderr, c.msg) {
			t.Errorf("%v: output lacks %q: %q", c.args, c.msg, stderr)
		}
		// A usage error of a command points to that command's help page.
		if len(c.args) > 1 && c.code == exitUsage && strings.HasPrefix(c.msg, c.args[0]+": ") &&
			!strings.Contains(stderr, "(run 'wxstress help "+c.args[0]+"' for usage)") {
			t.Errorf("%v: the help pointer is not the command's: %q", c.args, stderr)
		}
	}
}

// TestObservedEndingEarlyIsData: an observed record that ends before the
// model's data end lacks days a season under way needs: bad data (exit 1)
// naming the file, like a day missing inside the season (the usage errors
// of inputs that do not go together are TestMismatchedInputsAreUsage's).
func TestObservedEndingEarlyIsData(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	src, err := os.ReadFile("../../demo/kestrel_bay_daily.csv")
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(src), "\n")
	short := filepath.Join(t.TempDir(), "short.csv")
	os.WriteFile(short, []byte(strings.Join(lines[:20000], "")), 0o644)
	code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--observed", short,
		"--start", "conditional", "--period", "heating", "--paths", "100")
	if code != exitFailure || !strings.Contains(stderr, "wxstress: "+short+": the observed record ends on 2009-10-02, before the model's data end") ||
		strings.Contains(stderr, "bad job") {
		t.Errorf("exit %d, stderr %q: want exit 1 naming the file", code, stderr)
	}
}

func TestFitReportsPositionedErrors(t *testing.T) {
	t.Parallel()
	p := filepath.Join(t.TempDir(), "bad.csv")
	os.WriteFile(p, []byte("date,tavg\n2020-01-01,3.5\n2020-01-02,warm\n"), 0o644)
	code, _, stderr := call(t, context.Background(), "fit", "--temps", p)
	if code != exitFailure || !strings.Contains(stderr, p+":3:12") {
		t.Errorf("exit %d, stderr %q: want exit 1 and the position %s:3:12", code, stderr, p)
	}
}

func TestModelFileErrorsNameTheKey(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile(demoModel(t))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, c := range []struct {
		edit func(m map[string]any)
		key  string
	}{
		{func(m map[string]any) { delete(m["volatility"].(map[string]any), "monthly") }, "volatility.monthly"},
		{func(m map[string]any) { m["schema_version"] = 99 }, "schema_version"},
		{func(m map[string]any) { m["volatility"].(map[string]any)["monthly"].([]any)[3] = -1.0 }, "volatility.monthly[3]"},
		{func(m map[string]any) { m["shocks"].(map[string]any)["df"] = 1.5 }, "shocks.df"},
		{func(m map[string]any) { m["ar"].(map[string]any)["phi"] = []any{1.02} }, "ar.phi"},
	} {
		var m map[string]any
		json.Unmarshal(b, &m)
		c.edit(m)
		p := filepath.Join(dir, strings.ReplaceAll(c.key, "[", "_")+".json")
		nb, _ := json.Marshal(m)
		os.WriteFile(p, nb, 0o644)
		code, _, stderr := call(t, context.Background(), "simulate", "--model", p, "--paths", "10")
		if code != exitFailure || !strings.Contains(stderr, "key "+c.key) {
			t.Errorf("%s: exit %d, stderr %q", c.key, code, stderr)
		}
	}
}

func TestSimulateJSONIsIdenticalForAnyWorkerCount(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	var first string
	for _, w := range []string{"1", "2", "7"} {
		code, out, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "3000", "--seed", "5",
			"--workers", w, "--format", "json")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		if first == "" {
			first = out
		} else if out != first {
			t.Fatalf("--workers %s changed the JSON output", w)
		}
	}
	var doc struct {
		Manifest map[string]any
		Indices  []struct {
			Name, Period, Unit string
			Quantiles          map[string]float64
			ReturnLevels       map[string]float64 `json:"return_levels"`
			ES95               *float64
		}
	}
	if err := json.Unmarshal([]byte(first), &doc); err != nil {
		t.Fatal(err)
	}
	if _, ok := doc.Manifest["workers"]; ok {
		t.Error("manifest records the worker count")
	}
	if len(doc.Indices) == 0 || doc.Indices[0].Name != "HDD" || doc.Indices[0].Period != "year" ||
		len(doc.Indices[0].Quantiles) != 9 || doc.Indices[0].ReturnLevels["20"] == 0 || doc.Indices[0].ES95 == nil {
		t.Errorf("unexpected JSON shape: %+v", doc.Indices[0])
	}
	if _, ok := doc.Indices[0].Quantiles["0.05"]; !ok {
		t.Error(`quantile keys are not like "0.05"`)
	}
}

func TestSimulateOutDirAndInterrupt(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	dir := filepath.Join(t.TempDir(), "res")
	code, stdout, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "500", "--out", dir, "--per-path",
		"--exceed", "hdd:heating:2500")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.Contains(stdout, "P(HDD, heating > 2,500 °C·day)") {
		t.Errorf("exceedance not shown:\n%s", stdout)
	}
	paths, _ := os.ReadFile(filepath.Join(dir, "paths.csv"))
	if lines := strings.Count(string(paths), "\n"); lines != 501 {
		t.Errorf("paths.csv has %d lines, want a header and 500 paths", lines)
	}
	for _, f := range []string{"tails.json", "tails.csv"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Error(err)
		}
	}

	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	dir2 := filepath.Join(t.TempDir(), "never")
	code, _, _ = call(t, ctx, "simulate", "--model", m, "--paths", "100000", "--out", dir2)
	if code != exitInterrupted {
		t.Errorf("interrupted run exit %d, want %d", code, exitInterrupted)
	}
	if _, err := os.Stat(dir2); err == nil {
		t.Error("interrupted run left output behind")
	}
}

func TestSimulateScenarios(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	code, out, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "400", "--format", "json",
		"--scenario", "warm-1c", "--scenario", "../../scenarios/cold_spell.toml")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	type row struct {
		Name, Period string
		Mean         float64
		Change       *struct{ Mean, MeanSE float64 } `json:"change_vs_baseline"`
	}
	var doc struct {
		Indices   []row
		Scenarios []struct {
			Name    string
			Indices []row
		}
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Scenarios) != 2 || doc.Scenarios[0].Name != "warm-1c" || doc.Scenarios[1].Name != "harbour-freeze" {
		t.Fatalf("scenarios %+v", doc.Scenarios)
	}
	base := doc.Indices[0]
	warm, cold := doc.Scenarios[0].Indices[0], doc.Scenarios[1].Indices[0]
	if base.Name != "HDD" || len(doc.Scenarios[0].Indices) != len(doc.Indices) {
		t.Fatalf("scenario rows do not match the baseline's")
	}
	if !(warm.Mean < base.Mean && cold.Mean > base.Mean) || warm.Change == nil || warm.Change.Mean >= 0 {
		t.Errorf("annual HDD baseline %.1f, warm %.1f, cold spell %.1f", base.Mean, warm.Mean, cold.Mean)
	}
}

func TestSimulateScenarioErrors(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	bad := filepath.Join(t.TempDir(), "bad.toml")
	os.WriteFile(bad, []byte("name = \"x\"\n[shift]\nuniform = 1\nmonthy = [1]\n"), 0o644)
	code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "10", "--scenario", bad)
	if code == 0 || !strings.Contains(stderr, bad+":4: key shift.monthy: unknown key") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
	// An unknown name is a usage error (exit 2), a bad file a data error.
	code, _, stderr = call(t, context.Background(), "simulate", "--model", m, "--paths", "10", "--scenario", "warm-9c")
	if code != 2 || !strings.Contains(stderr, "warm-1c") {
		t.Errorf("unknown scenario: exit %d, stderr %q", code, stderr)
	}
	code, out, _ := call(t, context.Background(), "scenarios")
	if code != 0 || !strings.Contains(out, "cold-spell-10d") {
		t.Errorf("scenarios listing: exit %d\n%s", code, out)
	}
}

func TestDemoRefusesToOverwrite(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the whole demo twice")
	}
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	code, _, stderr := call(t, context.Background(), "demo", "--paths", "50", "--dir", dir)
	if code != exitFailure || !strings.Contains(stderr, "--force") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
	for _, f := range []string{"model.json", "demand.json", "tails.json", "tails.csv", "paths.csv"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Errorf("demo output missing: %v", err)
		}
	}
}

func TestFitDemandWithModelNormalizes(t *testing.T) {
	t.Parallel()
	code, out, stderr := call(t, context.Background(), "fit-demand", "--temps", "../../demo/kestrel_bay_daily.csv",
		"--demand", "../../demo/lanternfield_demand.csv", "--load-unit", "GJ/day", "--model", demoModel(t))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, y := range []string{"│ 2021 │", "│ 2025 │", "weather-normalized"} {
		if !strings.Contains(out, y) {
			t.Errorf("output lacks %q", y)
		}
	}
}

func TestSimulateWithDemand(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	dem := filepath.Join(dir, "demand.json")
	if code, _, stderr := call(t, context.Background(), "fit-demand", "--temps", "../../demo/kestrel_bay_daily.csv",
		"--demand", "../../demo/lanternfield_demand.csv", "--load-unit", "GJ/day", "--out", dem); code != 0 {
		t.Fatalf("fit-demand: %s", stderr)
	}
	code, out, stderr := call(t, context.Background(), "simulate", "--model", demoModel(t), "--demand", dem,
		"--capacity", "100000", "--paths", "300", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		Indices []struct {
			Name, Period string
			ReturnLevels map[string]float64 `json:"return_levels"`
		}
		Planning struct {
			PeakDay      []struct{ P50, P90 float64 } `json:"peak_day"`
			LoadDuration []struct{ Rank int }         `json:"load_duration"`
		}
	}
	if err := json.Unmarshal([]byte(out), &doc); err != nil {
		t.Fatal(err)
	}
	found := false
	for _, r := range doc.Indices {
		if strings.Contains(r.Name, "peak") && r.Period == "year" && r.ReturnLevels["20"] > r.ReturnLevels["2"] {
			found = true
		}
	}
	if !found {
		t.Error(`no "peak" row with rising return levels for the year`)
	}
	if len(doc.Planning.PeakDay) != 3 || doc.Planning.PeakDay[0].P90 <= doc.Planning.PeakDay[0].P50 || len(doc.Planning.LoadDuration) != 365 {
		t.Errorf("planning section: %+v", doc.Planning.PeakDay)
	}
	if code, _, _ := call(t, context.Background(), "simulate", "--model", demoModel(t), "--capacity", "5"); code != exitUsage {
		t.Errorf("--capacity without --demand: exit %d", code)
	}
}

// TestSimulateHolidayRules simulates the heating season of 2026 (the year
// after the data end), 1 November 2025 to 31 March 2026, with a holiday list
// of rules and a date. Its holidays are 27 November 2025 (fourth Thursday
// of November; US Thanksgiving 2025, common practice), 25 December 2025
// (the listed 2021 date's month and day) and 1 January 2026: three days, so
// every path's energy, and so its mean, moves by three holiday terms.
func TestSimulateHolidayRules(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	dem := filepath.Join(dir, "demand.json")
	if code, _, stderr := call(t, context.Background(), "fit-demand", "--temps", "../../demo/kestrel_bay_daily.csv",
		"--demand", "../../demo/lanternfield_demand.csv", "--load-unit", "GJ/day", "--out", dem); code != 0 {
		t.Fatalf("fit-demand: %s", stderr)
	}
	d, err := model.ReadDemand(dem)
	if err != nil {
		t.Fatal(err)
	}
	hol := filepath.Join(dir, "holidays.txt")
	os.WriteFile(hol, []byte("4 Thu Nov\nfixed 01-01\n2021-12-25\nlast Mon May\n"), 0o644)
	energy := func(extra ...string) float64 {
		t.Helper()
		args := append([]string{"simulate", "--model", demoModel(t), "--demand", dem, "--period", "heating",
			"--paths", "200", "--format", "json"}, extra...)
		code, out, stderr := call(t, context.Background(), args...)
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		var doc struct {
			Indices []struct {
				Name, Period string
				Mean         float64
			}
		}
		if err := json.Unmarshal([]byte(out), &doc); err != nil {
			t.Fatal(err)
		}
		for _, r := range doc.Indices {
			if r.Name == "demand energy" && r.Period == "heating" {
				return r.Mean
			}
		}
		t.Fatal("no demand energy row")
		return 0
	}
	const tol = 1e-6 // GJ; the means are near 10⁷ GJ
	with, without := energy("--holidays", hol), energy()
	if want := 3 * d.Holiday; math.Abs(with-without-want) > tol {
		t.Errorf("holidays move the mean heating energy by %v, want 3 × %v = %v", with-without, d.Holiday, want)
	}
}

func TestFreeDirNeverReusesAnExistingOne(t *testing.T) {
	t.Parallel()
	base := filepath.Join(t.TempDir(), "wxstress-demo")
	if got := freeDir(base); got != base {
		t.Errorf("freeDir = %s, want %s", got, base)
	}
	os.Mkdir(base, 0o755)
	os.Mkdir(base+"-2", 0o755)
	if got := freeDir(base); got != base+"-3" {
		t.Errorf("freeDir = %s, want %s-3", got, base)
	}
}

// What scripts rely on: demo writes the report as one .html file with at
// least ten inline SVG plots, no external src or href, and the cautions.
func TestDemoWritesTheReport(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile(filepath.Join(filepath.Dir(demoModel(t)), "report.html"))
	if err != nil {
		t.Fatal(err)
	}
	html := string(b)
	if n := strings.Count(html, "<svg"); n < 10 {
		t.Errorf("%d inline SVG plots, want at least 10", n)
	}
	for _, bad := range []string{`src="http`, `href="http`, `src='http`, `href='http`, "<script"} {
		if strings.Contains(html, bad) {
			t.Errorf("report contains %q", bad)
		}
	}
	if !strings.Contains(html, "not forecasts") || !strings.Contains(html, "licensed professional judgement") {
		t.Error("report lacks the cautions")
	}
	// The report opens with the terminal's summary: the same key-figure rows.
	i := strings.Index(html, `id="summary"`)
	if i < 0 || i > strings.Index(html, `class="intro"`) {
		t.Fatal("the report does not open with the summary")
	}
	found := false
	for _, l := range strings.Split(demoStdout, "\n") {
		if !strings.HasPrefix(l, "│ HDD, heating ") {
			continue
		}
		found = true
		cells := strings.Split(l, "│")
		row := "<th scope=\"row\">HDD, heating</th>"
		for _, c := range cells[2:7] {
			row += `<td class="n">` + strings.TrimSpace(c) + "</td>"
		}
		if !strings.Contains(html, row) {
			t.Errorf("the report's summary lacks the terminal's row %q", row)
		}
	}
	if !found {
		t.Errorf("no HDD, heating row in the demo's summary:\n%s", demoStdout)
	}
}

// TestSimulateReportTitle checks --title and the default title, which
// names the target year and the station rather than the model file.
func TestSimulateReportTitle(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	for _, c := range []struct {
		args []string
		want string
	}{
		{nil, "<title>Synthetic years of 2026: Kestrel Bay Airfield (invented demonstration data)</title>"},
		{[]string{"--title", "Winter book <2026>"}, "<title>Winter book &lt;2026&gt;</title>"},
	} {
		p := filepath.Join(dir, fmt.Sprintf("r%d.html", len(c.args)))
		args := append([]string{"simulate", "--model", demoModel(t), "--paths", "100", "--report", p}, c.args...)
		if code, _, stderr := call(t, context.Background(), args...); code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(b), c.want) {
			t.Errorf("%v: the report lacks %q", c.args, c.want)
		}
	}
}

func TestFitWritesAReport(t *testing.T) {
	t.Parallel()
	p := filepath.Join(t.TempDir(), "fit.html")
	code, _, stderr := call(t, context.Background(), "fit", "--temps", "../../testdata/noaa/seattle.csv", "--report", p)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(p)
	if err != nil || !strings.Contains(string(b), "<svg") || strings.Contains(string(b), "Scenarios</h2>") {
		t.Errorf("fit report: %v, %d bytes", err, len(b))
	}
}

// TestSimulateSummaryAndDetail checks that simulate prints the one-page
// summary by default (key figures, one Monte Carlo line, the caution) and
// the full per-period tables with --detail.
func TestSimulateSummaryAndDetail(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	args := []string{"simulate", "--model", m, "--paths", "400"}
	code, short, stderr := call(t, context.Background(), append(args, "--out", filepath.Join(t.TempDir(), "a"))...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	code, long, stderr := call(t, context.Background(), append(args, "--detail", "--out", filepath.Join(t.TempDir(), "b"))...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"Key figures", "HDD, heating", "1-in-20", "not forecasts", "--detail"} {
		if !strings.Contains(short, want) {
			t.Errorf("summary lacks %q:\n%s", want, short)
		}
	}
	if n := strings.Count(short, "Monte Carlo error"); n > 1 {
		t.Errorf("summary lists %d Monte Carlo warnings, want them condensed into one line", n)
	}
	if strings.Contains(short, "VaR 99%") || !strings.Contains(long, "VaR 99%") {
		t.Errorf("full tables should appear only with --detail")
	}
	if lines := strings.Count(short, "\n"); lines > 50 || lines >= strings.Count(long, "\n") {
		t.Errorf("summary has %d lines, detail %d: the summary should fit a screen", lines, strings.Count(long, "\n"))
	}
}

// TestDemoSummary checks the demo's one-page summary: it fits a screen (at
// most 60 lines within 100 columns), has no exponent notation, and its
// headline numbers are the JSON's (demand energy in TJ, the JSON's GJ over
// 1 000), formatted to their Monte Carlo error.
func TestDemoSummary(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	out := demoStdout
	lines := strings.Split(strings.TrimRight(out, "\n"), "\n")
	if len(lines) > 60 {
		t.Errorf("the summary has %d lines, want at most 60", len(lines))
	}
	for i, l := range lines {
		limit := 100
		if n := utf8.RuneCountInString(l); n > limit {
			t.Errorf("line %d has %d columns (limit %d): %q", i+1, n, limit, l)
		}
	}
	if m := regexp.MustCompile(`\d[eE][-+]?\d`).FindString(out); m != "" {
		t.Errorf("exponent notation %q in the summary:\n%s", m, out)
	}
	var tails struct {
		Indices []struct {
			Key, Period  string
			ReturnLevels map[string]float64 `json:"return_levels"`
			ES95         float64            `json:"es95"`
			MCSE         struct {
				Quantiles    map[string]float64 `json:"quantiles"`
				ReturnLevels map[string]float64 `json:"return_levels"`
				ES95         float64            `json:"es95"`
			} `json:"monte_carlo_se"`
		}
	}
	b, err := os.ReadFile(filepath.Join(dir, "tails.json"))
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, &tails); err != nil {
		t.Fatal(err)
	}
	checked := 0
	for _, x := range tails.Indices {
		label := map[string]string{"hdd": "HDD", "energy": "demand energy"}[x.Key]
		if label == "" || x.Period != "heating" {
			continue
		}
		unit, f := map[string]string{"hdd": "°C·day", "energy": "TJ"}[x.Key], map[string]float64{"hdd": 1, "energy": 1000}[x.Key]
		// The row's precision is its largest Monte Carlo error (render.rowSE).
		se := max(x.MCSE.Quantiles["0.50"], x.MCSE.ReturnLevels["20"], x.MCSE.ReturnLevels["50"], x.MCSE.ES95)
		want := []string{numfmt.Value(x.ReturnLevels["20"]/f, se/f), numfmt.Value(x.ReturnLevels["50"]/f, se/f),
			numfmt.Value(x.ES95/f, se/f)}
		for _, l := range lines {
			if strings.HasPrefix(l, "│ "+label+", heating ") {
				checked++
				cells := strings.Split(l, "│")
				if got := strings.TrimSpace(cells[2]); got != unit {
					t.Errorf("%s, heating: unit %q, want %q", label, got, unit)
				}
				if got := []string{strings.TrimSpace(cells[4]), strings.TrimSpace(cells[5]), strings.TrimSpace(cells[6])}; !slices.Equal(got, want) {
					t.Errorf("%s, heating: 1-in-20, 1-in-50, ES 95%% %q in the summary, %q from tails.json", label, got, want)
				}
			}
		}
	}
	if checked != 2 {
		t.Errorf("found %d of the 2 headline rows (HDD and demand energy, heating) in:\n%s", checked, out)
	}
	// The demo's capacity (--capacity 120000) and its days over it in the
	// planning period, at the JSON's mean.
	var over struct {
		Indices []struct {
			Key, Period string
			Mean        float64
			MeanSE      float64 `json:"mean_se"`
		}
	}
	if err := json.Unmarshal(b, &over); err != nil {
		t.Fatal(err)
	}
	for _, x := range over.Indices {
		if x.Key == "over-capacity" && x.Period == "heating" {
			want := "Days over the 120,000 GJ/day capacity, heating, per simulated season: mean " + numfmt.Value(x.Mean, x.MeanSE) + ", "
			if !strings.Contains(out, want) {
				t.Errorf("no line %q in the summary:\n%s", want, out)
			}
		}
	}
}

// TestDetailDayOfPeakIsADate checks that --detail gives the day of the peak
// as dates (median and month shares), never as a column of VaR, ES or
// return levels, and leaves it out of the scenario comparison.
func TestDetailDayOfPeakIsADate(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	code, out, stderr := call(t, context.Background(), "simulate", "--model", filepath.Join(dir, "model.json"),
		"--demand", filepath.Join(dir, "demand.json"), "--paths", "300", "--detail", "--scenario", "warm-1c")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if strings.Contains(out, "day of the peak (") {
		t.Errorf("the day of the peak is still tabled as a level:\n%s", out)
	}
	// The heating season has a median date; the calendar year's peaks fall
	// at both its ends (two winters), the cooling season's in May and
	// September, so they have none.
	if n := strings.Count(out, "Day of the peak: median "); n != 1 {
		t.Errorf("%d date lines with a median, want 1 (heating):\n%s", n, out)
	}
	if n := strings.Count(out, "Day of the peak: in separate parts of the period (no single median)"); n != 2 {
		t.Errorf("%d lines without a median, want 2 (year, cooling):\n%s", n, out)
	}
}

// TestFitWarningsShownEverywhere fits a °C record declared as °F, which
// draws a unit warning, and checks that each warning the fit summary lists
// is also on stderr and in the report's warnings row.
func TestFitWarningsShownEverywhere(t *testing.T) {
	t.Parallel()
	p := filepath.Join(t.TempDir(), "fit.html")
	code, stdout, stderr := call(t, context.Background(), "fit", "--temps", "../../testdata/noaa/seattle.csv",
		"--units", "F", "--slow", "none", "--report", p)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	_, section, ok := strings.Cut(stdout, "\nWarnings\n")
	if !ok {
		t.Fatalf("no Warnings section in the fit summary:\n%s", stdout)
	}
	section, _, _ = strings.Cut(section, "\n\n")
	var warns []string
	for _, l := range strings.Split(section, "\n") {
		if w, ok := strings.CutPrefix(l, "  - "); ok {
			warns = append(warns, w)
		} else if len(warns) > 0 {
			warns[len(warns)-1] += " " + strings.TrimSpace(l)
		}
	}
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	page := html.UnescapeString(string(b))
	flat := strings.Join(strings.Fields(stderr), " ")
	for _, want := range []string{"they look like °C", "365 days lies above the model's band"} {
		if !slices.ContainsFunc(warns, func(w string) bool { return strings.Contains(w, want) }) {
			t.Errorf("no warning with %q among %q", want, warns)
		}
	}
	for _, w := range warns {
		if !strings.Contains(flat, w) {
			t.Errorf("warning %q printed in the summary but not on stderr:\n%s", w, stderr)
		}
		if !strings.Contains(page, w) {
			t.Errorf("warning %q printed in the summary but not in the report's warnings row", w)
		}
	}
}

// TestMessagesHaveNoPackagePrefixes runs mistakes whose errors come from
// the library packages and checks that what a person reads names no
// package ("sim: ", "stress: ", …), and cleanMessage on a chain of them.
func TestMessagesHaveNoPackagePrefixes(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	// A °F model beside the demo's °C demand model: the library's own
	// error (package model) reaches the person.
	f := filepath.Join(t.TempDir(), "f.json")
	if code, _, stderr := call(t, context.Background(), "fit", "--temps", "../../testdata/noaa/seattle.csv", "--units", "F",
		"--out", f); code != exitOK {
		t.Fatalf("fit: exit %d: %s", code, stderr)
	}
	for _, args := range [][]string{
		{"simulate", "--model", f, "--demand", filepath.Join(filepath.Dir(m), "demand.json"), "--paths", "10"},
		{"simulate", "--model", m, "--period", "13-01:02-01"},
		{"simulate", "--model", m, "--exceed", "nope:1"},
		{"simulate", "--model", m, "--demand", m, "--capacity-target", "peak:1-in-0.5"},
		{"fit", "--temps", "../../testdata/noaa/seattle.csv", "--units", "K"},
	} {
		code, _, stderr := call(t, context.Background(), args...)
		if code == exitOK {
			t.Errorf("%v: exit 0", args)
		}
		for p := range internalPackages {
			if regexp.MustCompile(`\b` + p + `: `).MatchString(stderr) { // not "wxstress: "'s tail
				t.Errorf("%v: the message names the package %q: %s", args, p, stderr)
			}
		}
	}
	if got := cleanMessage("stress: sim: scenario x: event 1: sim: bad window"); got != "scenario x: event 1: bad window" {
		t.Errorf("cleanMessage = %q", got)
	}
}

// TestCSVHasPlanningFigures: the CSV carries the design figures and the
// solved capacities with their standard errors, as the JSON does, and a
// manifest without Go formatting.
func TestCSVHasPlanningFigures(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	code, out, stderr := call(t, context.Background(), "simulate", "--model", filepath.Join(dir, "model.json"),
		"--demand", filepath.Join(dir, "demand.json"), "--paths", "300", "--period", "heating", "--design", "1-in-20",
		"--capacity-target", "days:1", "--format", "csv", "--seed", "9007199254740993")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"\n# seed: 9007199254740993\n", "\n# paths: 300\n", "\nbaseline,design,heating,°C,low,design-day:1-in-20,", "\nbaseline,design,heating,°C,low,design-day:1-in-20:se,",
		"\nbaseline,design,heating,GJ/day,high,demand:1-in-20,", "\nbaseline,capacity,heating,GJ/day,high,days:1,",
		"\nbaseline,capacity,heating,GJ/day,high,days:1:se,", "\n# scenarios: none\n", "\n# periods: heating\n"} {
		if !strings.Contains(out, want) {
			t.Errorf("the CSV lacks %q", strings.TrimSpace(want))
		}
	}
	// Every line before the header is a manifest comment: none wrapped
	// onto a line of its own.
	head, _, _ := strings.Cut(out, "scenario,index,period,unit,adverse,statistic,value\n")
	for _, l := range strings.Split(strings.TrimSuffix(head, "\n"), "\n") {
		if !strings.HasPrefix(l, "# ") {
			t.Errorf("a manifest line without its '# ': %q", l)
		}
	}
	if !strings.Contains(head, "# period_dates: heating ") {
		t.Error("the CSV manifest lacks the period dates")
	}
	if strings.Contains(out, "<nil>") || strings.Contains(out, "[heating]") {
		t.Errorf("Go formatting in the CSV manifest:\n%s", out[:min(len(out), 1500)])
	}
}

// TestHedgeNeedingDemandIsUsage: a hedge file that reads demand, run
// without --demand, is a usage error (exit 2) naming the flag.
func TestHedgeNeedingDemandIsUsage(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	code, _, stderr := call(t, context.Background(), "simulate", "--model", filepath.Join(dir, "model.json"),
		"--hedge", "../../hedge/example.toml", "--paths", "50")
	if code != exitUsage || !strings.Contains(stderr, "needs --demand") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
}

// TestCSVCarriesTheJSONNumbers runs one job as JSON and as CSV and checks
// that the CSV has the JSON's numbers, as the README says: the tail numbers
// with their Monte Carlo errors, exceedances with theirs (as probabilities),
// the parameter bands, the hedge evaluation and the capacity's achieved
// value in its own unit; and that the day of the peak, a date, has no VaR,
// ES or return level in either.
func TestCSVCarriesTheJSONNumbers(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	args := []string{"simulate", "--model", filepath.Join(dir, "model.json"), "--demand", filepath.Join(dir, "demand.json"),
		"--paths", "300", "--period", "heating", "--hedge", "../../hedge/example.toml", "--exceed", "hdd:heating:2300",
		"--capacity-target", "days:1", "--uncertainty", "20", "--history", "../../demo/kestrel_bay_daily.csv",
		"--scenario", "warm-1c"}
	code, js, stderr := call(t, context.Background(), append(args, "--format", "json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	code, cs, stderr := call(t, context.Background(), append(args, "--format", "csv")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	type key struct{ index, period, stat string }
	csvVal, csvUnit := map[key]float64{}, map[key]string{}
	for _, line := range strings.Split(cs, "\n") {
		f := strings.Split(line, ",")
		if len(f) != 7 || f[0] != "baseline" {
			continue
		}
		var v float64
		if _, err := fmt.Sscan(f[6], &v); err != nil {
			continue
		}
		k := key{f[1], f[2], f[5]}
		csvVal[k], csvUnit[k] = v, f[3]
	}
	for _, line := range strings.Split(cs, "\n") {
		if f := strings.Split(line, ","); len(f) == 7 && f[6] != "value" && strings.ContainsAny(f[6], "eE") {
			t.Errorf("a value with an exponent: %s", line)
		}
	}
	same := func(what string, k key, want float64) {
		t.Helper()
		got, ok := csvVal[k]
		if !ok {
			t.Errorf("%s: the CSV has no %v", what, k)
		} else if math.Abs(got-want) > 1e-12*math.Max(1, math.Abs(want)) {
			t.Errorf("%s: CSV %v, JSON %v", what, got, want)
		}
	}
	var j struct {
		Indices []struct {
			Key, Period, Adverse string
			Mean                 float64
			VaR95                *float64           `json:"var95"`
			ReturnLevels         map[string]float64 `json:"return_levels"`
			MonteCarloSE         *struct {
				VaR95 *float64 `json:"var95"`
			} `json:"monte_carlo_se"`
			Exceedance []struct{ Threshold, Probability, SE float64 }
			Band       *struct {
				RL20 struct{ Lo, Hi float64 } `json:"return_level_20"`
			}
		}
		Hedge struct {
			Loading   float64
			Hedged    struct{ ES99 float64 }
			Contracts []struct {
				Name, Period string
				Mean         float64  `json:"mean_payout"`
				MeanSE       float64  `json:"mean_payout_se"`
				Reduction    *float64 `json:"min_variance_reduction"`
			}
		}
	}
	if err := json.Unmarshal([]byte(js), &j); err != nil {
		t.Fatal(err)
	}
	bands := 0
	for _, r := range j.Indices {
		k := func(stat string) key { return key{r.Key, r.Period, stat} }
		same("mean", k("mean"), r.Mean)
		if r.Key == "peak-date" {
			if r.VaR95 != nil || r.ReturnLevels != nil || r.Adverse != "none" || r.Band != nil {
				t.Errorf("the day of the peak has an adverse side in the JSON: %+v", r)
			}
			if _, ok := csvVal[k("var95")]; ok {
				t.Error("the day of the peak has a VaR in the CSV")
			}
			continue
		}
		same("VaR 95%", k("var95"), *r.VaR95)
		if r.MonteCarloSE != nil && r.MonteCarloSE.VaR95 != nil {
			same("VaR 95% s.e.", k("var95:se"), *r.MonteCarloSE.VaR95)
		}
		for _, e := range r.Exceedance {
			ek := k("exceed:" + strconv.FormatFloat(e.Threshold, 'f', -1, 64))
			same("exceedance", ek, e.Probability)
			same("exceedance s.e.", k("exceed:"+strconv.FormatFloat(e.Threshold, 'f', -1, 64)+":se"), e.SE)
			if csvUnit[ek] != "probability" {
				t.Errorf("exceedance unit %q", csvUnit[ek])
			}
		}
		if r.Band != nil {
			bands++
			same("band", k("rl20:band_lo"), r.Band.RL20.Lo)
			same("band", k("rl20:band_hi"), r.Band.RL20.Hi)
		}
	}
	if bands == 0 {
		t.Error("no parameter bands in the JSON to compare")
	}
	if len(j.Hedge.Contracts) == 0 {
		t.Fatal("no hedge in the JSON")
	}
	for _, c := range j.Hedge.Contracts {
		same("mean payout", key{"hedge", c.Period, "contract:" + c.Name + ":mean_payout"}, c.Mean)
		same("mean payout s.e.", key{"hedge", c.Period, "contract:" + c.Name + ":mean_payout:se"}, c.MeanSE)
		if c.Reduction != nil {
			same("minimum-variance reduction", key{"hedge", c.Period, "contract:" + c.Name + ":min_variance_reduction"}, *c.Reduction)
		}
	}
	// The net cost is the exposure's period's (the example's heating).
	same("hedged ES 99%", key{"hedge", "heating", "net_cost:hedged:es99"}, j.Hedge.Hedged.ES99)
	same("loading", key{"hedge", "", "loading"}, j.Hedge.Loading)
	if u := csvUnit[key{"capacity", "heating", "days:1:achieved"}]; u != "days a year" {
		t.Errorf("capacity achieved unit %q", u)
	}
	// Nor in a scenario's rows: its change of the date's median, no VaR.
	for _, line := range strings.Split(cs, "\n") {
		if strings.HasPrefix(line, "warm-1c,peak-date,") && (strings.Contains(line, ",change_var") ||
			strings.Contains(line, ",change_es95,") || strings.Contains(line, ",var95,")) {
			t.Errorf("a scenario's day of the peak has an adverse side in the CSV: %s", line)
		}
	}
	var sj struct {
		Scenarios []struct {
			Indices []struct {
				Key    string
				Change map[string]any `json:"change_vs_baseline"`
			}
		}
	}
	if err := json.Unmarshal([]byte(js), &sj); err != nil || len(sj.Scenarios) != 1 {
		t.Fatalf("scenarios in the JSON: %v", err)
	}
	for _, r := range sj.Scenarios[0].Indices {
		if _, ok := r.Change["var95"]; r.Key == "peak-date" && ok {
			t.Errorf("a scenario's day of the peak has a VaR change in the JSON: %v", r.Change)
		}
	}
}

// TestHedgeUnitsMismatch: a hedge file whose units key names other degrees
// than the model's is a usage error naming both, not a run whose strikes
// are read in the wrong degrees.
func TestHedgeUnitsMismatch(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	src, err := os.ReadFile("../../hedge/example.toml")
	if err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(t.TempDir(), "hedge_f.toml")
	os.WriteFile(p, []byte(strings.Replace(string(src), `units = "C"`, `units = "F"`, 1)), 0o644)
	code, _, stderr := call(t, context.Background(), "simulate", "--model", filepath.Join(dir, "model.json"),
		"--demand", filepath.Join(dir, "demand.json"), "--hedge", p, "--paths", "50")
	if code != exitUsage || !strings.Contains(stderr, "is in °F (its units key) but the model in °C") {
		t.Errorf("exit %d, stderr %q", code, stderr)
	}
}

// TestMismatchedInputsAreUsage: choices that do not go together, found only
// once the model and records are read, exit 2 with the flag to change:
// a season under way with demand but no loads, a conditional start of a
// period that began before the data end, a trend scenario on a model
// without a trend.
func TestMismatchedInputsAreUsage(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	m, d := filepath.Join(dir, "model.json"), filepath.Join(dir, "demand.json")
	flat := filepath.Join(t.TempDir(), "flat.json")
	if code, _, stderr := call(t, context.Background(), "fit", "--temps", "../../testdata/noaa/new_york.csv", "--trend", "none",
		"--out", flat); code != 0 {
		t.Fatalf("fit: %s", stderr)
	}
	for _, c := range []struct {
		args []string
		msg  string
	}{
		{[]string{"--model", m, "--demand", d, "--observed", "../../demo/kestrel_bay_daily.csv"}, "(--observed-load)"},
		{[]string{"--model", m, "--start", "conditional", "--year", "2025", "--period", "heating"},
			"a conditional start needs periods after the data end"},
		{[]string{"--model", flat, "--scenario", "trend-2050"}, "scenario trend-2050 does not suit this model"},
	} {
		code, _, stderr := call(t, context.Background(), append(append([]string{"simulate"}, c.args...), "--paths", "50")...)
		if code != exitUsage || !strings.Contains(stderr, c.msg) {
			t.Errorf("%v: exit %d, stderr %q", c.args, code, stderr)
		}
	}
	// Listing the built-ins against that model describes the others and
	// marks trend-2050 (it used to stop at trend-2050 with a usage error);
	// naming it is still a usage error, after the description.
	code, out, stderr := call(t, context.Background(), "scenarios", "--model", flat)
	if code != 0 || !strings.Contains(out, "trend-2050 — ") || !strings.Contains(out, "• not for this model: the model has no trend") ||
		!strings.Contains(out, "cold-spell-10d — ") {
		t.Errorf("scenarios --model (no trend): exit %d\n%s%s", code, out, stderr)
	}
	code, out, stderr = call(t, context.Background(), "scenarios", "--model", flat, "trend-2050", "warm-1c")
	if code != exitUsage || !strings.Contains(out, "warm-1c — ") || !strings.Contains(stderr, "does not suit this model") {
		t.Errorf("scenarios --model (no trend) trend-2050 warm-1c: exit %d\n%s%s", code, out, stderr)
	}
}

// TestSeasonUnderWayWithHolidays: a season under way with demand, its loads
// and a holiday list, started explicitly from the data end, runs (the
// holidays were computed over a span that did not yet know the season
// under way, and the run was refused as a conditional start of a season
// already begun).
func TestSeasonUnderWayWithHolidays(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	hol := filepath.Join(t.TempDir(), "holidays.txt")
	os.WriteFile(hol, []byte("2026-01-01\n2026-03-14\n"), 0o644)
	code, _, stderr := call(t, context.Background(), "simulate", "--model", filepath.Join(dir, "model.json"),
		"--demand", filepath.Join(dir, "demand.json"), "--holidays", hol, "--observed", "../../demo/kestrel_bay_daily.csv",
		"--observed-load", "../../demo/lanternfield_demand.csv", "--start", "conditional", "--paths", "100")
	if code != 0 {
		t.Errorf("exit %d: %s", code, stderr)
	}
}

// TestHelpWithin100Columns: every help page keeps within 100 columns (flag
// usages wrapped, long example commands continued with a backslash), and
// no flag shows a Go type name.
func TestHelpWithin100Columns(t *testing.T) {
	t.Parallel()
	for _, c := range []string{"", "simulate", "fit", "fit-demand", "backtest", "scenarios", "demo"} {
		args := []string{"help"}
		if c != "" {
			args = append(args, c)
		}
		code, out, stderr := call(t, context.Background(), args...)
		if code != 0 {
			t.Fatalf("help %s: exit %d, %s", c, code, stderr)
		}
		for _, l := range strings.Split(out, "\n") {
			if n := utf8.RuneCountInString(l); n > 100 {
				t.Errorf("help %s: a line of %d columns: %q", c, n, l)
			}
			for _, typ := range []string{"stringArray", "float64Slice", "stringSlice", " strings "} {
				if strings.Contains(l, typ) {
					t.Errorf("help %s: a Go type name: %q", c, l)
				}
			}
		}
	}
}

// TestCSVHasNoInfinity: a Monte Carlo error that cannot be bounded (10 paths,
// a 1-in-50 design day) is null in the JSON and empty in the CSV, never
// "+Inf" (which a spreadsheet reads as text and a JSON reader refuses).
func TestCSVHasNoInfinity(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	code, out, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "10", "--design", "1-in-50", "--format", "csv")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if strings.Contains(out, "Inf") || strings.Contains(out, "NaN") {
		t.Errorf("CSV with a non-finite number:\n%s", out)
	}
	if !strings.Contains(out, "design-day:1-in-50:se,\n") {
		t.Errorf("the unbounded design-day error is not an empty field")
	}
}

// TestHolidaysAreAnInput: a holiday list changes the demand a run
// simulates, so the manifest names it among the inputs with its SHA-256.
func TestHolidaysAreAnInput(t *testing.T) {
	t.Parallel()
	dir := filepath.Dir(demoModel(t))
	hol := filepath.Join(t.TempDir(), "holidays.txt")
	os.WriteFile(hol, []byte("fixed 01-01\nfixed 12-25\n"), 0o644)
	code, out, stderr := call(t, context.Background(), "simulate", "--model", filepath.Join(dir, "model.json"), "--demand",
		filepath.Join(dir, "demand.json"), "--holidays", hol, "--paths", "50", "--format", "json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var j struct {
		Manifest struct {
			Inputs []struct{ Role, File, SHA256 string }
		}
	}
	if err := json.Unmarshal([]byte(out), &j); err != nil {
		t.Fatal(err)
	}
	sum := sha256.Sum256([]byte("fixed 01-01\nfixed 12-25\n"))
	for _, in := range j.Manifest.Inputs {
		if in.Role == "holidays" && in.File == "holidays.txt" && in.SHA256 == hex.EncodeToString(sum[:]) {
			return
		}
	}
	t.Errorf("manifest inputs %+v lack the holiday list", j.Manifest.Inputs)
}

// TestReturnLevelBeyondThePaths: with 50 paths the listed 1-in-50 and
// 1-in-100 levels lie between the two most extreme simulated years (type 4:
// N(1 − 1/T) ≥ N − 1), and the detailed tables say so; with 200 paths no
// listed T (at most 100) reaches the paths, and nothing is said.
func TestReturnLevelBeyondThePaths(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	for _, c := range []struct {
		paths string
		want  bool
	}{{"50", true}, {"200", false}} {
		code, out, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", c.paths, "--detail")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		if got := strings.Contains(out, "lies, with "+c.paths+" paths, between the two most extreme"); got != c.want {
			t.Errorf("%s paths: note %v, want %v", c.paths, got, c.want)
		}
	}
}
