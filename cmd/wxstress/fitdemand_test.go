package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wxstress/model"
)

// The demo files, read from the repository (the embedded copies are the same bytes).
const (
	demoTemps  = "../../demo/kestrel_bay_daily.csv"
	demoDemand = "../../demo/lanternfield_demand.csv"
)

// callFitDemand runs the subcommand in-process and returns its exit code
// (as main would map the error), stdout and stderr.
func callFitDemand(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	ctx := context.Background()
	err := runFitDemandCmd(ctx, args, &out, &errb)
	code := exitCode(err, ctx, &errb)
	return code, out.String(), errb.String()
}

func TestFitDemandSummary(t *testing.T) {
	t.Parallel()
	out := filepath.Join(t.TempDir(), "demand.json")
	code, stdout, stderr := callFitDemand(t, "--temps", demoTemps, "--demand", demoDemand, "--load-unit", "GJ/day", "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{
		"Change-point form: heating-and-cooling-band",
		"auto: lowest BIC among the forms with positive slopes",
		"heating slope βH, per °C below 15.6 °C",
		"ASHRAE Guideline 14-2014",
		"hourly: ≤ 30 %, ±10 %",
		"monthly: ≤ 15 %, ±5 %",
		"Ljung–Box Q(10) on the residuals",
		"2 demand days have no temperature",
		"conditional on the balance points",
		"Demand model written to " + out,
		"not forecasts",
	} {
		if !strings.Contains(stdout, want) {
			t.Errorf("summary lacks %q", want)
		}
	}
	if !strings.Contains(stderr, "wxstress: warning: 2 demand days have no temperature") {
		t.Errorf("stderr %q lacks the warning", stderr)
	}
	m, err := model.ReadDemand(out)
	if err != nil {
		t.Fatal(err)
	}
	if m.Form != model.FormHeatingCoolingBand || m.Unit != "GJ/day" || m.TemperatureUnits != "C" || m.ToolVersion != version {
		t.Errorf("model file: form %s, unit %s, temperature units %s, tool %s", m.Form, m.Unit, m.TemperatureUnits, m.ToolVersion)
	}
}

func TestFitDemandJSON(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	hol := filepath.Join(dir, "holidays.txt")
	os.WriteFile(hol, []byte("2021-01-01\n2023-06-05\n"), 0o644)
	code, stdout, stderr := callFitDemand(t, "--temps", demoTemps, "--demand", demoDemand, "--load-unit", "GJ/day",
		"--form", "heating-only", "--format", "json", "--holidays", hol)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var raw map[string]any
	if err := json.Unmarshal([]byte(stdout), &raw); err != nil {
		t.Fatal(err)
	}
	heating := raw["heating"].(map[string]any)
	cooling := raw["cooling"].(map[string]any)
	fit := raw["fit"].(map[string]any)
	if raw["form"] != "heating-only" || heating["balance_point"] != 15.5 || cooling["balance_point"] != nil ||
		cooling["slope"] != nil || fit["cv_rmse"] == nil || fit["nmbe"] == nil {
		t.Errorf("JSON keys: form %v, heating %v, cooling %v, fit.cv_rmse %v", raw["form"], heating, cooling, fit["cv_rmse"])
	}
	// 2023-06-05 is an ordinary day in the file; the list makes it a holiday.
	if data := raw["data"].(map[string]any); data["holidays"] != 31.0 || data["holidays_file"] != hol {
		t.Errorf("holidays %v from %v, want 31 (30 in the file and one from the list)", data["holidays"], data["holidays_file"])
	}
	if _, err := model.DecodeDemand([]byte(stdout), "stdout"); err != nil {
		t.Errorf("printed JSON is not a valid model file: %v", err)
	}
}

// TestFitDemandHolidayRules fits with a holiday list of a date and rules:
// the rules are expanded over the record's years (2021..2025) and shown in
// the summary and the model file.
func TestFitDemandHolidayRules(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	hol := filepath.Join(dir, "holidays.csv")
	os.WriteFile(hol, []byte("date,rule,name\n2023-06-05,,Harbour Day\n,first Mon Jun,Harbour Day\n,easter +1,Easter Monday\n"+
		",fixed 05-01,Labour Day\n"), 0o644)
	out := filepath.Join(dir, "demand.json")
	code, stdout, stderr := callFitDemand(t, "--temps", demoTemps, "--demand", demoDemand, "--load-unit", "GJ/day",
		"--form", "heating-and-cooling-band", "--holidays", hol, "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	want := "holidays from " + hol + ": 1 date, 3 rules (first Monday of June, Easter + 1 day, 1 May)"
	if !strings.Contains(strings.Join(strings.Fields(stdout), " "), want) { // the summary wraps at 100 columns
		t.Errorf("summary lacks %q:\n%s", want, stdout)
	}
	m, err := model.ReadDemand(out)
	if err != nil {
		t.Fatal(err)
	}
	// The file marks 30 fixed-date holidays, 1 May among them. The first
	// Mondays of June (2021-06-07, 2022-06-06, 2023-06-05, 2024-06-03,
	// 2025-06-02: common practice, the n-th weekday) and the Easter Mondays
	// (2021-04-05, 2022-04-18, 2023-04-10, 2024-04-01, 2025-04-21: Easter
	// Sunday + 1, Easter from published tables) add 10.
	d := m.Data
	if d.Holidays != 40 || d.HolidayListDates != 1 || strings.Join(d.HolidayRules, "; ") != "first Monday of June; Easter + 1 day; 1 May" {
		t.Errorf("model data: %d holidays, %d listed dates, rules %q; want 40, 1 and three rules", d.Holidays, d.HolidayListDates, d.HolidayRules)
	}
	// A bad rule names its position and the accepted forms.
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("date,rule\n,5 Mon May\n"), 0o644)
	code, _, stderr = callFitDemand(t, "--temps", demoTemps, "--demand", demoDemand, "--load-unit", "GJ/day", "--holidays", bad)
	if want := bad + `:2:2: not a holiday rule: "5 Mon May": a fifth Monday is not in every May: use last Mon May`; code != exitFailure ||
		!strings.Contains(stderr, want) {
		t.Errorf("bad rule: exit %d, stderr %q; want %q", code, stderr, want)
	}
}

func TestFitDemandErrors(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	b, err := os.ReadFile(demoDemand)
	if err != nil {
		t.Fatal(err)
	}
	// One day more than the station record (which ends on 2025-12-31).
	late := filepath.Join(dir, "late.csv")
	os.WriteFile(late, append(b, []byte("2026-01-01,70000,0\n")...), 0o644)
	bad := filepath.Join(dir, "bad.csv")
	os.WriteFile(bad, []byte("date,load\n2021-01-01,70000\n2021-01-02,n/a\n"), 0o644)
	badHol := filepath.Join(dir, "holidays.txt")
	os.WriteFile(badHol, []byte("2021-01-01\nChristmas\n"), 0o644)

	cases := []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"--demand", "d.csv", "--load-unit", "GJ/day"}, exitUsage, "--temps is required"},
		{[]string{"--temps", "t.csv", "--load-unit", "GJ/day"}, exitUsage, "--demand is required"},
		{[]string{"--temps", "t.csv", "--demand", "d.csv"}, exitUsage, "--load-unit is required"},
		{[]string{"--temps", "t.csv", "--demand", "d.csv", "--load-unit", "GJ/day", "--form", "6p"}, exitUsage,
			`--form "6p": want auto, heating-only, cooling-only, heating-and-cooling, heating-and-cooling-band`},
		{[]string{"--temps", "t.csv", "--demand", "d.csv", "--load-unit", "GJ/day", "--format", "xml"}, exitUsage, "want table or json"},
		{[]string{"--temps", "t.csv", "--demand", "d.csv", "--load-unit", "GJ/day", "--units", "K"}, exitUsage, "want C or F"},
		{[]string{"--bogus"}, exitUsage, "unknown flag"},
		{[]string{"--temps", demoTemps, "--demand", "/nonexistent/d.csv", "--load-unit", "GJ/day"}, exitFailure, "no such file"},
		{[]string{"--temps", demoTemps, "--demand", bad, "--load-unit", "GJ/day"}, exitFailure, bad + `:3:12: field load: not a number: "n/a"`},
		{[]string{"--temps", demoTemps, "--demand", late, "--load-unit", "GJ/day"}, exitFailure,
			late + ":1828:1: field date: date 2026-01-01 is not covered by the temperature record " + demoTemps},
		{[]string{"--temps", demoTemps, "--demand", demoDemand, "--load-unit", "GJ/day", "--holidays", badHol}, exitFailure,
			badHol + `:2:1: not a date (YYYY-MM-DD) or a holiday rule: "Christmas": want fixed MM-DD (fixed 12-25)`},
		{[]string{"-h"}, exitOK, "Exit status:"},
	}
	for _, c := range cases {
		code, stdout, stderr := callFitDemand(t, c.args...)
		if code != c.code {
			t.Errorf("%v: exit %d, want %d (stderr %q)", c.args, code, c.code, stderr)
		}
		if !strings.Contains(stdout+stderr, c.msg) {
			t.Errorf("%v: output lacks %q: %q", c.args, c.msg, stderr)
		}
	}
}

// TestFitDemandWithModel: with --model, the weather-normalized history
// stands in the summary before the warnings and the caution, and with
// --format json the output is the model file's JSON alone (the table used
// to follow it and break it).
func TestFitDemandWithModel(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	code, stdout, stderr := callFitDemand(t, "--temps", demoTemps, "--demand", demoDemand, "--load-unit", "GJ/day", "--model", m)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	table, caution := strings.Index(stdout, "Weather-normalized demand by historical year"), strings.Index(stdout, "not forecasts")
	if table < 0 || caution < table {
		t.Errorf("the weather-normalized table (at %d) is not before the caution (at %d)", table, caution)
	}
	code, stdout, stderr = callFitDemand(t, "--temps", demoTemps, "--demand", demoDemand, "--load-unit", "GJ/day", "--model", m,
		"--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if _, err := model.DecodeDemand([]byte(stdout), "stdout"); err != nil {
		t.Errorf("the JSON output is not a model file: %v", err)
	}
}

// TestFitDemandHolidaySources: the summary names where the holidays came
// from, the file's column or the list or both, and claims no column a
// file lacks.
func TestFitDemandHolidaySources(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	src, err := os.ReadFile(demoDemand)
	if err != nil {
		t.Fatal(err)
	}
	var noCol []string // the demo loads without their holiday column
	for _, l := range strings.Split(strings.TrimSpace(string(src)), "\n") {
		f := strings.Split(l, ",")
		noCol = append(noCol, f[0]+","+f[1])
	}
	loads := filepath.Join(dir, "load.csv")
	os.WriteFile(loads, []byte(strings.Join(noCol, "\n")+"\n"), 0o644)
	hol := filepath.Join(dir, "holidays.txt")
	os.WriteFile(hol, []byte("2023-01-01\n"), 0o644)
	for _, c := range []struct {
		demand, want, not string
	}{
		{loads, "(from " + hol + ")", "column"},
		{demoDemand, "(column holiday and " + hol + ")", ""},
	} {
		code, stdout, stderr := callFitDemand(t, "--temps", demoTemps, "--demand", c.demand, "--load-unit", "GJ/day", "--holidays", hol)
		if code != exitOK {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		first, _, _ := strings.Cut(stdout, "loads in")
		if !strings.Contains(stdout, c.want) || c.not != "" && strings.Contains(first, c.not) {
			t.Errorf("%s: summary lacks %q or has %q:\n%s", c.demand, c.want, c.not, first)
		}
	}
}
