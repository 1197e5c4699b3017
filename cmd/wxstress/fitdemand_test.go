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
	code, stdout, stderr := callFitDemand(t, "--temps", demoTemps, "--demand", demoDemand, "--unit", "GJ/day", "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{
		"Change-point form: 5p",
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
	if m.Form != model.Form5P || m.Unit != "GJ/day" || m.TemperatureUnits != "C" || m.ToolVersion != version {
		t.Errorf("model file: form %s, unit %s, temperature units %s, tool %s", m.Form, m.Unit, m.TemperatureUnits, m.ToolVersion)
	}
}

func TestFitDemandJSON(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	hol := filepath.Join(dir, "holidays.txt")
	os.WriteFile(hol, []byte("2021-01-01\n2023-06-05\n"), 0o644)
	code, stdout, stderr := callFitDemand(t, "--temps", demoTemps, "--demand", demoDemand, "--unit", "GJ/day",
		"--form", "3p-heating", "--format", "json", "--holidays", hol)
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
	if raw["form"] != "3p-heating" || heating["balance_point"] != 15.5 || cooling["balance_point"] != nil ||
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
		{[]string{"--demand", "d.csv", "--unit", "GJ/day"}, exitUsage, "--temps is required"},
		{[]string{"--temps", "t.csv", "--unit", "GJ/day"}, exitUsage, "--demand is required"},
		{[]string{"--temps", "t.csv", "--demand", "d.csv"}, exitUsage, "--unit is required"},
		{[]string{"--temps", "t.csv", "--demand", "d.csv", "--unit", "GJ/day", "--form", "6p"}, exitUsage,
			`--form "6p": want auto, 3p-heating, 3p-cooling, 4p, 5p`},
		{[]string{"--temps", "t.csv", "--demand", "d.csv", "--unit", "GJ/day", "--format", "xml"}, exitUsage, "want table or json"},
		{[]string{"--temps", "t.csv", "--demand", "d.csv", "--unit", "GJ/day", "--units", "K"}, exitUsage, "valid choices are C and F"},
		{[]string{"--bogus"}, exitUsage, "unknown flag"},
		{[]string{"--temps", demoTemps, "--demand", "/nonexistent/d.csv", "--unit", "GJ/day"}, exitFailure, "no such file"},
		{[]string{"--temps", demoTemps, "--demand", bad, "--unit", "GJ/day"}, exitFailure, bad + `:3:12: field load: not a number: "n/a"`},
		{[]string{"--temps", demoTemps, "--demand", late, "--unit", "GJ/day"}, exitFailure,
			late + ":1828:1: field date: date 2026-01-01 is not covered by the temperature record " + demoTemps},
		{[]string{"--temps", demoTemps, "--demand", demoDemand, "--unit", "GJ/day", "--holidays", badHol}, exitFailure,
			badHol + `:2:1: not a date of the form YYYY-MM-DD: "Christmas"`},
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
