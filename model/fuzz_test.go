package model_test

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"testing"

	"wxstress/calendar"
	"wxstress/model"
	"wxstress/sim"
)

// fuzzModel is a valid model file whose mutations the fuzzer explores.
func fuzzModel() *model.File {
	f := &model.File{
		Schema: model.Schema, SchemaVersion: model.SchemaVersion,
		Data:       model.Data{FirstDate: calendar.FromYMD(1990, 1, 1), LastDate: calendar.FromYMD(2019, 12, 31), Units: "C"},
		Trend:      model.Trend{Kind: "linear", Epoch: calendar.Epoch, Intercept: 10, SlopePerYear: 0.02},
		Seasonal:   model.Seasonal{PeriodDays: calendar.DaysPerYear, Harmonics: []model.Harmonic{{K: 1, Cos: -10, Sin: -4}, {K: 2, Cos: 0.5}}},
		AR:         model.AR{Phi: []float64{0.7, -0.1}, Last: []float64{1.5, -0.5}},
		Volatility: model.Volatility{Kind: "monthly"},
		Shocks:     model.Shocks{Family: model.FamilySkewT, DF: 8, Skew: 0.9},
		Scenario:   &model.Scenario{Name: "s", Events: []model.Event{{Days: 5, Delta: -8, Window: "12-01:02-28", Probability: 0.5}}},
	}
	for m := range 12 {
		f.Volatility.Monthly[m] = 2 + float64(m)/10
	}
	return f
}

// FuzzDecodeModel decodes arbitrary model JSON. An error must name the
// file and, for content, wrap ErrInvalid; an accepted model must survive a
// write/read round trip and simulate to finite aggregates (the bounds of
// Validate promise it).
func FuzzDecodeModel(f *testing.F) {
	good, err := json.Marshal(fuzzModel())
	if err != nil {
		f.Fatal(err)
	}
	f.Add(good)
	boot := fuzzModel()
	boot.Shocks = model.Shocks{Family: model.FamilyBootstrap, ByMonth: make([][]float64, 12)}
	for m := range boot.Shocks.ByMonth {
		boot.Shocks.ByMonth[m] = []float64{-1.5, 0.2, 1.3}
	}
	boot.Scenario = nil
	b, _ := json.Marshal(boot)
	f.Add(b)
	f.Add([]byte(`{"schema":"wxstress-model","schema_version":1}`))
	f.Add([]byte(`{"schema_version":1}`))
	f.Add([]byte(`{"schema":7}`))
	f.Add([]byte(`[]`))
	f.Add([]byte(strings.Replace(string(good), `"k":2`, `"k":1`, 1)))
	f.Add([]byte(strings.Replace(string(good), `"phi":[0.7,-0.1]`, `"phi":[1.2,-0.1]`, 1)))
	f.Fuzz(func(t *testing.T, data []byte) {
		const name = "fuzz.json"
		m, err := model.Decode(data, name)
		if err != nil {
			if m != nil || !strings.HasPrefix(err.Error(), name+":") {
				t.Fatalf("error %q, model %v", err, m != nil)
			}
			var ke *model.KeyError
			if errors.As(err, &ke) && !errors.Is(err, model.ErrInvalid) {
				t.Fatalf("key error %q does not wrap ErrInvalid", err)
			}
			return
		}
		again, err := json.Marshal(m)
		if err != nil {
			t.Fatalf("accepted model does not encode: %v", err)
		}
		if _, err := model.Decode(again, name); err != nil {
			t.Fatalf("accepted model fails after a round trip: %v", err)
		}
		cfg := sim.Config{Paths: 3, Seed: 1, Workers: 1, Year: 2020, Periods: []string{"year", "jan"},
			Bases: sim.BasesFor(model.Units(m.Data.Units))}
		for _, start := range []string{sim.StartClimate, sim.StartConditional} {
			cfg.Start = start
			res, err := sim.Run(context.Background(), m, cfg)
			if err != nil {
				t.Fatalf("accepted model does not simulate (%s): %v", start, err)
			}
			for _, a := range res.Aggregates {
				for i, v := range a.Values {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						t.Fatalf("%s start: aggregate %v of %v, path %d = %v", start, a.Index, a.Period, i, v)
					}
				}
			}
		}
	})
}
