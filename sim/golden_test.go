package sim

import (
	"encoding/json"
	"flag"
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/stat"

	"wxstress/calibrate"
)

var update = flag.Bool("update", false, "rewrite testdata/golden_run.json from the current code")

// goldenSummary is a compact fingerprint of a fixed-seed run.
type goldenSummary struct {
	Name      string    `json:"name"`
	Mean      float64   `json:"mean"`
	Quantiles []float64 `json:"quantiles"`
	ES99      float64   `json:"es99"`
}

// TestGoldenRun pins the output of a small fixed-seed run: any change to the
// random streams, the kernel or the tail statistics shows here. Regenerate
// with `go test ./sim -run TestGoldenRun -update` only when a change is meant
// to alter the numbers, and say why in the commit.
func TestGoldenRun(t *testing.T) {
	t.Parallel()
	res := run(t, seasonalModel([]float64{0.72}), Config{Paths: 3000, Seed: 20261201, Year: 2030,
		Periods: []string{"year", "heating", "jan"}})
	var got []goldenSummary
	for _, r := range res.Summarize("C", nil) {
		got = append(got, goldenSummary{r.Period + "/" + r.Info.Key, r.Tail.Mean, r.Tail.Quantiles, r.Tail.ES99})
	}
	const path = "testdata/golden_run.json"
	if *update {
		b, _ := json.MarshalIndent(got, "", " ")
		if err := os.WriteFile(path, append(b, '\n'), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var want []goldenSummary
	if err := json.Unmarshal(b, &want); err != nil {
		t.Fatal(err)
	}
	if len(want) != len(got) {
		t.Fatalf("%d rows, golden has %d", len(got), len(want))
	}
	// Bitwise on amd64; the tolerance allows for fused multiply-adds on
	// other architectures.
	const tol = 1e-9
	for i := range got {
		g, w := got[i], want[i]
		vals := append([]float64{g.Mean, g.ES99}, g.Quantiles...)
		wals := append([]float64{w.Mean, w.ES99}, w.Quantiles...)
		for j := range vals {
			if math.Abs(vals[j]-wals[j]) > tol*math.Max(1, math.Abs(wals[j])) {
				t.Errorf("%s: value %d = %.12g, golden %.12g", g.Name, j, vals[j], wals[j])
			}
		}
	}
}

// TestHistoricalHDDWithinObservedSpread fits the committed NOAA series
// (Seattle and New York, 2012–2015; testdata/noaa) and checks that the
// simulated climatological mean annual HDD agrees with the four observed
// years. Tolerance: if the model is right, the observed four-year mean
// differs from the model's mean by sampling error of about sd/√4 (sd of the
// simulated annual HDD); we allow three of those.
func TestHistoricalHDDWithinObservedSpread(t *testing.T) {
	t.Parallel()
	for _, city := range []string{"seattle", "new_york"} {
		s, err := calibrate.ReadFile("../testdata/noaa/"+city+".csv", calibrate.ReadOptions{Units: calibrate.Celsius})
		if err != nil {
			t.Fatal(err)
		}
		fit, err := calibrate.Fit(s, nil)
		if err != nil {
			t.Fatal(err)
		}
		observed := map[int]float64{}
		for i, v := range s.Temps {
			observed[s.Date(i).Year()] += math.Max(18-v, 0)
		}
		var obs []float64
		for _, v := range observed {
			obs = append(obs, v)
		}
		res := run(t, fit.Model, Config{Paths: 4000, Seed: 1, Year: 2014, Periods: []string{"year"}})
		mean, sd := stat.MeanStdDev(column(t, res, HDD, "year"), nil)
		om := stat.Mean(obs, nil)
		if tol := 3 * sd / math.Sqrt(float64(len(obs))); math.Abs(mean-om) > tol {
			t.Errorf("%s: simulated mean annual HDD %.0f, observed %.0f over %d years (tolerance %.0f)", city, mean, om, len(obs), tol)
		}
		t.Logf("%s: simulated %.0f ± %.0f, observed years %v", city, mean, sd, obs)
	}
}
