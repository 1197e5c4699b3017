package stress

import (
	"context"
	"math"
	"testing"
	"time"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/hedge"
	"wxstress/model"
	"wxstress/sim"
)

// TestHedgeOnThePipelinesPaths evaluates a hedge file through the pipeline
// and recomputes each path's payouts from the simulated HDD (the call's
// definition, tick·max(I − K, 0) capped by the limit): the pipeline must
// hand the hedge the right aggregate, path by path, and add the hedge's
// period to the simulation.
func TestHedgeOnThePipelinesPaths(t *testing.T) {
	t.Parallel()
	src := []byte(`currency = "EUR"
[[contract]]
name = "jan call"
index = "hdd"
period = "jan"
kind = "call"
strike = 500
tick = 100
limit = 20000
`)
	h, err := hedge.Parse(src, "test.toml")
	if err != nil {
		t.Fatal(err)
	}
	s := synthRecord(12, 8)
	res, err := Run(context.Background(), &Job{Temps: s, Fit: &calibrate.Settings{Harmonics: 1, AROrder: 1, Slow: calibrate.SlowNone,
		Trend: "none", Shocks: model.FamilyNormal, Method: "cls"},
		Config: sim.Config{Paths: 3000, Seed: 4, Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)},
		Hedge:  h, History: true})
	if err != nil {
		t.Fatal(err)
	}
	var jan []float64
	for _, a := range res.Set.Base.Aggregates {
		if a.Index == sim.HDD && a.Period.Name == "jan" {
			jan = a.Values
		}
	}
	if jan == nil {
		t.Fatal("the hedge's period was not simulated")
	}
	c := res.Hedge.Contracts[0]
	for i, v := range jan {
		want := math.Min(100*math.Max(v-500, 0), 20000)
		if math.Abs(c.Payoffs[i]-want) > 1e-9 {
			t.Fatalf("path %d: payout %v, HDD %v gives %v", i, c.Payoffs[i], v, want)
		}
	}
	// The burn price uses the record's Januaries (12 of them).
	if c.Seasons != 12 {
		t.Errorf("burn price over %d seasons, want 12", c.Seasons)
	}
}

// TestInSeasonSameObservedPart fits a record truncated mid-January and runs
// the heating season under way twice: once observing the truncated record,
// once the full one. The observed part, and so every path, is the same: the
// days after the model's data end are not used.
func TestInSeasonSameObservedPart(t *testing.T) {
	t.Parallel()
	full := synthRecord(10, 12)
	cut := calendar.FromYMD(2009, time.January, 15)
	trunc := *full
	trunc.Temps = full.Temps[:int(cut-full.Start)+1]
	fit, err := calibrate.Fit(&trunc, &calibrate.Settings{Harmonics: 1, AROrder: 1, Slow: calibrate.SlowNone, Trend: "none",
		Shocks: model.FamilyNormal, Method: "cls"})
	if err != nil {
		t.Fatal(err)
	}
	run := func(s *calibrate.Series) *Result {
		res, err := Run(context.Background(), &Job{Model: fit.Model, Temps: s, Observed: true,
			Config: sim.Config{Paths: 500, Seed: 2, Periods: []string{"heating"}, Bases: sim.BasesFor(model.Celsius)}})
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	a, b := run(&trunc), run(full)
	if a.Set.Config.Year != 2009 {
		t.Errorf("target year %d, want the heating season under way (2009)", a.Set.Config.Year)
	}
	oa, ob := a.Set.Base.InSeason[0], b.Set.Base.InSeason[0]
	if oa.Days != 76 || oa.Days != ob.Days || oa.Values[sim.HDD] != ob.Values[sim.HDD] {
		t.Errorf("observed parts differ: %+v against %+v", oa, ob)
	}
	for k := range a.Set.Base.Aggregates {
		for i, v := range a.Set.Base.Aggregates[k].Values {
			if v != b.Set.Base.Aggregates[k].Values[i] {
				t.Fatalf("aggregate %d path %d: %v against %v", k, i, v, b.Set.Base.Aggregates[k].Values[i])
			}
		}
	}
}
