package model

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"wxstress/calendar"
)

func TestValidateBounds(t *testing.T) {
	t.Parallel()
	cases := []struct {
		edit func(f *File)
		key  string
		msg  string
	}{
		{func(f *File) { f.Volatility.Monthly[2] = 100.5 }, "volatility.monthly[2]", "σ ≤ 100"},
		{func(f *File) { f.Volatility.Monthly[2] = math.Inf(1) }, "volatility.monthly[2]", "σ ≤ 100"},
		{func(f *File) { f.Trend.Intercept = 1e300 }, "trend.intercept", "|intercept| ≤ 500"},
		{func(f *File) { f.Trend.SlopePerYear = -1.5 }, "trend.slope_per_year", "≤ 1 degree a year"},
		{func(f *File) { f.Seasonal.Harmonics[0].Cos = 1e200 }, "seasonal.harmonics[0].cos", "|cos| ≤ 100"},
		{func(f *File) { f.Seasonal.Harmonics[0].Cos, f.Seasonal.Harmonics[0].Sin = 80, 80 }, "seasonal.harmonics[0]", "amplitude"},
		{func(f *File) { f.Seasonal.Harmonics[0].K = 13 }, "seasonal.harmonics[0].k", "1..12"},
		{func(f *File) {
			f.Seasonal.Harmonics = append(f.Seasonal.Harmonics, Harmonic{K: 2, Cos: 1}, Harmonic{K: 1, Sin: 1})
		}, "seasonal.harmonics[2].k", "k = 1 repeats seasonal.harmonics[0]"},
		{func(f *File) { f.AR.Phi = []float64{0.9995} }, "ar.phi", "too persistent"},
		{func(f *File) { f.AR.Phi = []float64{1.2} }, "ar.phi", "not stationary"},
		{func(f *File) { f.AR.Last = []float64{-1e6} }, "ar.last_anomalies[0]", "plausible anomaly"},
		{func(f *File) { f.Shocks.DF = 1e9 }, "shocks.df", "ν ≤ 1000"},
		{func(f *File) { f.Shocks.Skew = 50 }, "shocks.skew", "ξ ≤ 10"},
		{func(f *File) {
			f.Shocks = Shocks{Family: FamilyBootstrap, ByMonth: make([][]float64, 12)}
			for m := range f.Shocks.ByMonth {
				f.Shocks.ByMonth[m] = []float64{-1, 1}
			}
			f.Shocks.ByMonth[4][1] = 1e300
		}, "shocks.by_month[4][1]", "|z| ≤ 200"},
		{func(f *File) {
			f.Scenario = &Scenario{Events: []Event{{Days: 5, Delta: -61, Window: "01-01:01-31", Probability: 1}}}
		},
			"scenario.events[0].delta", "|delta| ≤ 60"},
		// Found by FuzzDecodeModel (testdata/fuzz/FuzzDecodeModel/bdc833075843ec80):
		// an event without a window passed Validate and failed in the simulator.
		{func(f *File) { f.Scenario = &Scenario{Events: []Event{{Days: 1, Probability: 0.1}}} }, "scenario.events[0].window", "MM-DD:MM-DD"},
		{func(f *File) {
			f.Scenario = &Scenario{Events: []Event{{Days: 1, Window: "02-30:03-01", Probability: 1}}}
		}, "scenario.events[0].window", "MM-DD:MM-DD"},
		{func(f *File) { f.Trend.Epoch = calendar.FromYMD(1970, 1, 1) }, "trend.epoch", "want 2000-01-01"},
		{func(f *File) { f.Data.FirstDate = calendar.FromYMD(1, 1, 1) }, "data.first_date", "before 1600"},
		{func(f *File) { f.Data.LastDate = calendar.FromYMD(2400, 1, 1) }, "data.last_date", "after 2299"},
	}
	for _, c := range cases {
		f := valid()
		c.edit(f)
		err := f.Validate("m.json")
		var ke *KeyError
		if !errors.As(err, &ke) || ke.Key != c.key || !strings.Contains(err.Error(), c.msg) {
			t.Errorf("want an error naming %s with %q, got %v", c.key, c.msg, err)
		}
	}
}

// TestValidateAcceptsTheBounds: values on the bounds pass, so the bounds
// are as documented.
func TestValidateAcceptsTheBounds(t *testing.T) {
	t.Parallel()
	f := valid()
	f.Trend.Intercept, f.Trend.SlopePerYear = -MaxLevel, MaxSlopePerYear
	f.Seasonal.Harmonics = []Harmonic{{K: 1, Cos: 60, Sin: -80}, {K: 3, Sin: MaxAmplitude}} // amplitude 100
	f.AR.Phi, f.AR.Last = []float64{MaxRootModulus}, []float64{MaxAnomaly}
	f.Volatility.Monthly[11] = MaxSigma
	f.Shocks.DF, f.Shocks.Skew = MaxDF, MinSkew
	f.Scenario = &Scenario{MonthlyShift: [12]float64{MaxShift}, Events: []Event{{Days: 366, Delta: MaxEventDelta, Window: "01-01:01-31", Probability: 1}}}
	if err := f.Validate("m.json"); err != nil {
		t.Fatal(err)
	}
}

func TestDecodeSchemaMessages(t *testing.T) {
	t.Parallel()
	good, err := json.Marshal(valid())
	if err != nil {
		t.Fatal(err)
	}
	var raw map[string]any
	if err := json.Unmarshal(good, &raw); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		schema any // nil = no key
		want   string
	}{
		{nil, `key schema: missing: not a wxstress model file (one has "schema": "wxstress-model")`},
		{42, `key schema: is 42, want "wxstress-model"`},
		{DemandSchema, `this is a "wxstress-demand" file`},
	} {
		delete(raw, "schema")
		if c.schema != nil {
			raw["schema"] = c.schema
		}
		b, _ := json.Marshal(raw)
		_, err := Decode(b, "m.json")
		if err == nil || !strings.Contains(err.Error(), c.want) || strings.Contains(err.Error(), "%!") {
			t.Errorf("schema %v: error %v, want %q", c.schema, err, c.want)
		}
	}
}

// encoding/json matches keys without regard to case; Decode refuses keys
// that differ from the lower-case names.
func TestDecodeRefusesUpperCaseKeys(t *testing.T) {
	t.Parallel()
	good, err := json.Marshal(valid())
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Decode(good, "m.json"); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ from, to, key string }{
		{`"intercept":`, `"Intercept":`, "trend.Intercept"},
		{`{"k":1`, `{"K":1`, "seasonal.harmonics[0].K"},
	} {
		b := bytes.Replace(good, []byte(c.from), []byte(c.to), 1)
		_, err := Decode(b, "m.json")
		var ke *KeyError
		if !errors.As(err, &ke) || ke.Key != c.key || !strings.Contains(err.Error(), "keys are lower case") {
			t.Errorf("%s: error %v, want key %s", c.to, err, c.key)
		}
	}
}
