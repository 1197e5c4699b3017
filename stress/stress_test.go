package stress

import (
	"bytes"
	"context"
	"slices"
	"testing"

	"wxstress/calibrate"
	"wxstress/demo"
	"wxstress/model"
	"wxstress/scenarios"
	"wxstress/sim"
)

// The baseline of a stress run is the same, path by path, as a plain run of
// the model with the same configuration, and a uniform +1 °C shift raises
// every year's hottest day by exactly 1 °C (common random numbers).
func TestSimulateKeepsCommonRandomNumbers(t *testing.T) {
	t.Parallel()
	s, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		t.Fatal(err)
	}
	fit, err := calibrate.Fit(s, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := fit.Model
	warm, _ := scenarios.Lookup("warm-1c")
	cfg := sim.Config{Paths: 300, Seed: 4, Bases: sim.BasesFor(model.Celsius)}
	set, err := Simulate(context.Background(), m, cfg, []*scenarios.Scenario{warm}, nil, 50)
	if err != nil {
		t.Fatal(err)
	}
	plain, err := sim.Run(context.Background(), m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	for k, a := range plain.Aggregates {
		if !slices.Equal(a.Values, set.Base.Aggregates[k].Values) {
			t.Fatalf("baseline %s differs from a plain run", a.Index.Info().Name)
		}
	}
	if len(set.Scenarios) != 1 || len(set.Results()) != 1 || set.Fan == nil || set.Fan.Paths != 50 {
		t.Fatalf("set shape: %d scenarios, fan %v", len(set.Scenarios), set.Fan != nil)
	}
	hot := set.Scenarios[0].Result.Aggregates[sim.Hottest].Values
	for i, v := range set.Base.Aggregates[sim.Hottest].Values {
		if d := hot[i] - v; d < 1-1e-9 || d > 1+1e-9 {
			t.Fatalf("path %d: hottest day moved by %v under +1 °C", i, d)
		}
	}
	if c := set.Scenarios[0].Changes[sim.Hottest]; c.MeanSE > 1e-9 {
		t.Errorf("paired s.e. of an exact shift %v, want 0", c.MeanSE)
	}
}
