package model

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"wxstress/calendar"
)

func validDemand(form string) *Demand {
	d := &Demand{
		Schema: DemandSchema, SchemaVersion: DemandSchemaVersion, Unit: "GJ/day", TemperatureUnits: "C",
		Form: form, Intercept: 38000, Weekday: [7]float64{0, 50, 70, 0, 40, -4000, -6000}, Holiday: -8000,
		Noise: DemandNoise{Phi: 0.45, Sigma: 1500},
		Fit:   DemandFit{CVRMSE: 3.1, NMBE: 0},
		Data:  DemandData{FirstDate: calendar.FromYMD(2021, 1, 1), LastDate: calendar.FromYMD(2025, 12, 31)},
	}
	if DemandForm(form).HasHeating() {
		d.Heating = ChangePoint{Present: true, BalancePoint: 15.5, Slope: 3000, SlopeSE: 6}
	}
	if DemandForm(form).HasCooling() {
		d.Cooling = ChangePoint{Present: true, BalancePoint: 22, Slope: 450, SlopeSE: 60}
		if form == FormHeatingCooling {
			d.Cooling.BalancePoint = 15.5
		}
	}
	return d
}

func TestDemandWriteReadRoundTrip(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	for _, form := range DemandFormNames() {
		p := filepath.Join(dir, form+".json")
		d := validDemand(form)
		if err := d.Write(p); err != nil {
			t.Fatal(err)
		}
		g, err := ReadDemand(p)
		if err != nil {
			t.Fatalf("%s: %v", form, err)
		}
		for _, temp := range []float64{-10, 0, 15.5, 18, 22, 30} {
			for wd := time.Sunday; wd <= time.Saturday; wd++ {
				for _, hol := range []bool{false, true} {
					if a, b := d.Expected(temp, wd, hol), g.Expected(temp, wd, hol); a != b {
						t.Errorf("%s: Expected(%v, %v, %v): %v before, %v after the round trip", form, temp, wd, hol, a, b)
					}
				}
			}
		}
		if g.Warnings == nil {
			t.Errorf("%s: warnings read as nil", form)
		}
	}
}

// TestDemandFileKeys checks the keys scripts rely on (issue 5): form,
// heating.balance_point, heating.slope, cooling.balance_point,
// cooling.slope, fit.cv_rmse and fit.nmbe, with null for an absent side.
func TestDemandFileKeys(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		form             string
		heating, cooling bool
	}{
		{FormHeatingOnly, true, false}, {FormCoolingOnly, false, true}, {FormHeatingCooling, true, true}, {FormHeatingCoolingBand, true, true},
	} {
		b, err := validDemand(c.form).MarshalIndent()
		if err != nil {
			t.Fatal(err)
		}
		var raw map[string]any
		if err := json.Unmarshal(b, &raw); err != nil {
			t.Fatal(err)
		}
		if raw["form"] != c.form || raw["schema"] != DemandSchema || raw["schema_version"] != 1.0 {
			t.Errorf("%s: form %v, schema %v %v", c.form, raw["form"], raw["schema"], raw["schema_version"])
		}
		for side, present := range map[string]bool{"heating": c.heating, "cooling": c.cooling} {
			obj, ok := raw[side].(map[string]any)
			if !ok {
				t.Fatalf("%s: %s is not an object: %v", c.form, side, raw[side])
			}
			for _, k := range []string{"balance_point", "slope", "slope_se"} {
				v, has := obj[k]
				if !has || (v == nil) == present {
					t.Errorf("%s: %s.%s = %v (present %v), want %s", c.form, side, k, v, has, map[bool]string{true: "a number", false: "null"}[present])
				}
			}
		}
		fit := raw["fit"].(map[string]any)
		for _, k := range []string{"cv_rmse", "nmbe"} {
			if _, ok := fit[k].(float64); !ok {
				t.Errorf("%s: fit.%s = %v", c.form, k, fit[k])
			}
		}
		if w, ok := raw["weekday"].([]any); !ok || len(w) != 7 {
			t.Errorf("%s: weekday = %v, want 7 values", c.form, raw["weekday"])
		}
	}
	// heating-and-cooling has one balance point, written on both sides.
	d := validDemand(FormHeatingCooling)
	if d.Heating.BalancePoint != d.Cooling.BalancePoint {
		t.Fatal("test model is wrong")
	}
}

func TestDemandExpected(t *testing.T) {
	t.Parallel()
	d := validDemand(FormHeatingCoolingBand)
	// D = β0 + w(weekday) + βhol·holiday + βH·max(TbH − T, 0) + βC·max(T − TbC, 0), by hand.
	cases := []struct {
		temp float64
		wd   time.Weekday
		hol  bool
		want float64
	}{
		{0, time.Monday, false, 38000 + 3000*15.5},
		{0, time.Sunday, false, 38000 - 6000 + 3000*15.5},
		{18, time.Tuesday, false, 38000 + 50},
		{15.5, time.Saturday, true, 38000 - 4000 - 8000},
		{25, time.Friday, false, 38000 + 40 + 450*3},
		{22, time.Thursday, false, 38000},
	}
	for _, c := range cases {
		if got := d.Expected(c.temp, c.wd, c.hol); math.Abs(got-c.want) > 1e-9 {
			t.Errorf("Expected(%v, %v, %v) = %v, want %v", c.temp, c.wd, c.hol, got, c.want)
		}
	}
	h := validDemand(FormHeatingOnly)
	if got := h.Expected(35, time.Monday, false); got != 38000 {
		t.Errorf("heating-only on a hot day: %v, want the base 38000", got)
	}
	defer func() {
		if r := recover(); r == nil || !strings.HasPrefix(r.(string), "model: ") {
			t.Errorf("weekday 7: recovered %v, want a panic with the package prefix", r)
		}
	}()
	d.Expected(0, time.Weekday(7), false)
}

// Not parallel: testing.AllocsPerRun refuses to run beside parallel tests.
func TestDemandExpectedDoesNotAllocate(t *testing.T) {
	d := validDemand(FormHeatingCoolingBand)
	if n := testing.AllocsPerRun(100, func() { d.Expected(3.5, time.Wednesday, false) }); n != 0 {
		t.Errorf("Expected allocates %v times per call", n)
	}
}

func TestDemandCheckUnits(t *testing.T) {
	t.Parallel()
	d := validDemand(FormHeatingCoolingBand)
	if err := d.CheckUnits("C"); err != nil {
		t.Error(err)
	}
	if err := d.CheckUnits("F"); err == nil || !strings.HasPrefix(err.Error(), "model: ") {
		t.Errorf("°F temperatures with a °C demand model: %v", err)
	}
}

func TestDemandValidateNamesTheKey(t *testing.T) {
	t.Parallel()
	good, err := validDemand(FormHeatingCoolingBand).MarshalIndent()
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		edit func(m map[string]any)
		key  string
	}{
		{func(m map[string]any) { m["schema"] = Schema }, "schema"},
		{func(m map[string]any) { m["schema_version"] = 2 }, "schema_version"},
		{func(m map[string]any) { delete(m, "form") }, "form"},
		{func(m map[string]any) { m["form"] = "6p" }, "form"},
		{func(m map[string]any) { delete(m, "unit") }, "unit"},
		{func(m map[string]any) { m["unit"] = " " }, "unit"},
		{func(m map[string]any) { m["temperature_units"] = "K" }, "temperature_units"},
		{func(m map[string]any) { delete(m["noise"].(map[string]any), "sigma") }, "noise.sigma"},
		{func(m map[string]any) { m["noise"].(map[string]any)["sigma"] = 0 }, "noise.sigma"},
		{func(m map[string]any) { m["noise"].(map[string]any)["phi"] = 1.0 }, "noise.phi"},
		{func(m map[string]any) { delete(m["fit"].(map[string]any), "cv_rmse") }, "fit.cv_rmse"},
		{func(m map[string]any) { delete(m["heating"].(map[string]any), "slope") }, "heating.slope"},
		{func(m map[string]any) { m["heating"].(map[string]any)["slope"] = nil }, "heating.slope"},
		{func(m map[string]any) { m["form"] = FormHeatingOnly }, "cooling.balance_point"},
		{func(m map[string]any) { m["heating"].(map[string]any)["balance_point"] = 25.0 }, "cooling.balance_point"},
		{func(m map[string]any) { m["form"] = FormHeatingCooling }, "cooling.balance_point"},
		{func(m map[string]any) { m["weekday"] = []any{0, 1, 2} }, "weekday"},
		// A base load at or below zero is demand below zero on a mild
		// Monday; absurd sizes would overflow a year's sums.
		{func(m map[string]any) { m["intercept"] = -1e6 }, "intercept"},
		{func(m map[string]any) { m["holiday"] = 6.9e15 }, "holiday"},
		{func(m map[string]any) { m["heating"].(map[string]any)["slope"] = 1e300 }, "heating.slope"},
	}
	for _, c := range cases {
		var m map[string]any
		if err := json.Unmarshal(good, &m); err != nil {
			t.Fatal(err)
		}
		c.edit(m)
		b, _ := json.Marshal(m)
		_, err := DecodeDemand(b, "demand.json")
		if err == nil {
			t.Errorf("%s: accepted", c.key)
			continue
		}
		if !errors.Is(err, ErrInvalid) {
			t.Errorf("%s: %v does not wrap ErrInvalid", c.key, err)
		}
		var ke *KeyError
		if !errors.As(err, &ke) || ke.Key != c.key || ke.File != "demand.json" {
			t.Errorf("error %q, want one naming key %s", err, c.key)
		}
	}
	// Unknown keys are refused (a typing slip would otherwise be ignored).
	var m map[string]any
	json.Unmarshal(good, &m)
	m["intercpt"] = 1.0
	b, _ := json.Marshal(m)
	if _, err := DecodeDemand(b, "demand.json"); err == nil || !strings.Contains(err.Error(), "intercpt") {
		t.Errorf("unknown key: %v", err)
	}
	if _, err := DecodeDemand([]byte("{"), "demand.json"); err == nil || !strings.HasPrefix(err.Error(), "demand.json: not a demand model file") {
		t.Errorf("bad JSON: %v", err)
	}
}

func TestDemandWriteIsAtomic(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	p := filepath.Join(dir, "demand.json")
	if err := os.WriteFile(p, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	d := validDemand(FormHeatingCoolingBand)
	d.Intercept = math.NaN() // JSON cannot hold it: encoding fails
	if err := d.Write(p); err == nil {
		t.Fatal("NaN intercept written")
	}
	if b, _ := os.ReadFile(p); string(b) != "old" {
		t.Errorf("a failed write changed the file: %q", b)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("a failed write left %d files", len(entries))
	}
}
