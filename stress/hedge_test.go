package stress

import (
	"context"
	"math"
	"testing"

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
