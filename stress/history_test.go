package stress

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
	"time"

	"gonum.org/v1/gonum/stat"

	"wxstress/extremes"

	"wxstress/calibrate"
	"wxstress/demo"
	"wxstress/model"
	"wxstress/sim"
)

// TestHistoricalSeasonsRecomputed recomputes each heating season's HDD of
// the demo record straight from its CSV text (encoding/csv and time.Parse,
// not the project's reader), moved along the fitted trend to the target
// year, and compares with the pipeline's historical seasons.
func TestHistoricalSeasonsRecomputed(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the 71-year demo record")
	}
	t.Parallel()
	series, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), &Job{Temps: series, Fit: &calibrate.Settings{},
		Config:  sim.Config{Paths: 4000, Seed: 1, Periods: []string{"heating", "year"}, Bases: sim.BasesFor(model.Celsius)},
		History: true})
	if err != nil {
		t.Fatal(err)
	}
	h := res.History
	target := res.Set.Config.Year
	slope := res.Model.Trend.SlopePerYear

	rows, err := csv.NewReader(bytes.NewReader(demo.Station())).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	temp := map[string]float64{}
	for _, r := range rows[1:] {
		if r[1] != "" {
			v, err := strconv.ParseFloat(r[1], 64)
			if err != nil {
				t.Fatal(err)
			}
			temp[r[0]] = v
		}
	}
	seasons := h.Seasons["heating"]
	// The record runs 1955-01-01 to 2025-12-31: heating seasons ending in
	// 1956 … 2025 are complete.
	if len(seasons) != 70 || seasons[0].Year != 1956 || seasons[len(seasons)-1].Year != 2025 {
		t.Fatalf("%d heating seasons from %d; want 70 ending 1956..2025", len(seasons), seasons[0].Year)
	}
	for _, se := range seasons {
		hdd, missing := 0.0, 0
		for d := time.Date(se.Year-1, 11, 1, 0, 0, 0, 0, time.UTC); !d.After(time.Date(se.Year, 3, 31, 0, 0, 0, 0, time.UTC)); d = d.AddDate(0, 0, 1) {
			v, ok := temp[d.Format("2006-01-02")]
			if !ok {
				missing++
				continue
			}
			hdd += math.Max(18-(v+slope*float64(target-se.Year)), 0)
		}
		if missing != se.Missing {
			t.Errorf("season %d: %d missing days, recomputed %d", se.Year, se.Missing, missing)
		}
		if missing == 0 && math.Abs(hdd-se.Values[sim.HDD]) > 1e-9 {
			t.Errorf("season %d: HDD %.6f, recomputed from the CSV %.6f", se.Year, se.Values[sim.HDD], hdd)
		}
	}
	found := false
	for _, r := range h.Rows {
		if r.Period == "heating" && r.Index == sim.HDD {
			found = true
			t.Logf("heating HDD: record sd %.1f, model sd %.1f, band %.1f–%.1f (%s); worst %d %.0f p=%.4f",
				r.SD, r.ModelSD, r.SDBand[0], r.SDBand[1], r.SDVerdict, r.Worst[0].Year, r.Worst[0].Value, r.Worst[0].Prob)
			if r.SDVerdict != "inside" {
				t.Errorf("the slow-part model's heating HDD sd %.1f against the record's %.1f: %s", r.ModelSD, r.SD, r.SDVerdict)
			}
			// The record's worst winter should not be a freak of the model:
			// with 70 seasons it is about a 1-in-70 event.
			if p := r.Worst[0].Prob; p < 1.0/1000 {
				t.Errorf("the record's worst winter (%d) has model probability %.5f", r.Worst[0].Year, p)
			}
		}
	}
	if !found {
		t.Fatal("no heating HDD row")
	}
	// The extremes check fits the GEV to the heating seasons' coldest days,
	// recomputed here from the seasons.
	var coldest []float64
	for _, se := range seasons {
		coldest = append(coldest, se.Values[sim.Coldest])
	}
	ref, err := extremes.FitMinima(coldest)
	if err != nil {
		t.Fatal(err)
	}
	checked := false
	for _, c := range res.Extremes {
		if c.Index == sim.Coldest && c.Period == "heating" {
			checked = true
			if got, want := c.Levels[0].GEV, ref.ReturnLevel(20); math.Abs(got-want) > 1e-9 {
				t.Errorf("GEV 1-in-20 coldest day %v, refit %v", got, want)
			}
			t.Logf("coldest day 1-in-20: GEV %.2f [%.2f, %.2f], model %.2f", c.Levels[0].GEV, c.Levels[0].Lo, c.Levels[0].Hi, c.Levels[0].Model)
			if c.Levels[0].Outside {
				t.Errorf("the model's 1-in-20 coldest day lies %s the GEV interval", c.Levels[0].OutsideSide)
			}
		}
		if c.Index == sim.Hottest && c.Period == "heating" {
			t.Error("a hottest day of the heating season was checked: winter minima and summer maxima only")
		}
	}
	if !checked {
		t.Error("no GEV check of the heating season's coldest day")
	}
}

// TestHistoryAgainstClimateRun checks that a conditional run (the heating
// season under way, its November and December observed) compares the record's seasons with
// a climate-start run of the same model, paths and seed, not with itself:
// the record's seasons are draws from the climate, and a run conditioned on
// the data end is narrower (the demo's once flagged its heating HDD spread
// "model too narrow" for that reason alone).
func TestHistoryAgainstClimateRun(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the 71-year demo record")
	}
	t.Parallel()
	series, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		t.Fatal(err)
	}
	m, err := calibrate.Fit(series, &calibrate.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	run := func(start string) *Result {
		res, err := Run(context.Background(), &Job{Model: m.Model, Temps: series, Observed: start == sim.StartConditional,
			Config: sim.Config{Paths: 3000, Seed: 5, Year: 2026, Start: start, Periods: []string{"heating", "year"},
				Bases: sim.BasesFor(model.Celsius)},
			History: true})
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	climate, cond := run(sim.StartClimate), run(sim.StartConditional)
	if climate.History.ClimateRun || !cond.History.ClimateRun {
		t.Errorf("ClimateRun: climate start %v, conditional start %v", climate.History.ClimateRun, cond.History.ClimateRun)
	}
	for i, r := range cond.History.Rows {
		c := climate.History.Rows[i]
		if r.ModelSD != c.ModelSD || r.SDBand != c.SDBand {
			t.Errorf("%s %s: the conditional run's comparison uses sd %v band %v, the climate run's %v %v",
				r.Index.Info().Name, r.Period, r.ModelSD, r.SDBand, c.ModelSD, c.SDBand)
		}
	}
	// The run itself is narrower for the season under way (two of its five
	// months are known): that is why it must not be the comparison.
	for _, row := range cond.Set.Rows {
		if row.Index == sim.HDD && row.Period == "heating" {
			for _, c := range climate.Set.Rows {
				if c.Index == sim.HDD && c.Period == "heating" && !(row.Tail.SD < c.Tail.SD) {
					t.Errorf("conditional heating HDD sd %.1f not below the climate run's %.1f", row.Tail.SD, c.Tail.SD)
				}
			}
		}
	}
}

// TestHistoryMeanBand checks the level check against the central limit
// theorem: the mean of n seasons drawn from simulated years with sd s has
// sd s/√n, so its 5–95 % band is about ±1.645·s/√n around the model mean
// (30 seasons from 200 000 standard normal years: ±0.300). A record whose
// seasons average below the band is "model too mild" for a low-adverse
// index (the coldest day) and "model too severe" for a high-adverse one.
func TestHistoryMeanBand(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	sims := make([]float64, 200000)
	for i := range sims {
		sims[i] = r.NormFloat64()
	}
	season := func(mean float64) HistoryRow {
		row := HistoryRow{Values: make([]float64, 30)}
		for i := range row.Values {
			row.Values[i] = mean + r.NormFloat64()
			row.Years = append(row.Years, 1990+i)
		}
		return row
	}
	row := season(0)
	summarizeHistory(&row, sims, true, 1)
	// The band's ends come from 2 000 resampled means: each has a Monte
	// Carlo sd of about √(0.05·0.95/2000)/φ(1.645)·(1/√30) ≈ 0.0086, so
	// 0.035 is four of them.
	half := 1.645 / math.Sqrt(30)
	if math.Abs(row.MeanBand[0]+half) > 0.035 || math.Abs(row.MeanBand[1]-half) > 0.035 {
		t.Errorf("mean band %v, want about ±%.3f", row.MeanBand, half)
	}
	for _, c := range []struct {
		shift float64
		high  bool
		want  string
	}{{-1, false, "model too mild"}, {-1, true, "model too severe"}, {1, true, "model too mild"}, {1, false, "model too severe"}} {
		row := season(c.shift)
		summarizeHistory(&row, sims, c.high, 1)
		if row.MeanVerdict != c.want {
			t.Errorf("record mean %.2f, band %v, high adverse %v: %q, want %q", row.Mean, row.MeanBand, c.high, row.MeanVerdict, c.want)
		}
	}
}

// TestHistoryBandWidening: with few paths the band allows for the model's
// own Monte Carlo error: n = 30 seasons against m = 100 simulated years
// widen the mean's band by √(1 + n/m) = √1.3 over that of n draws alone,
// 1.645·σ/√30, with σ the simulated years' own (population) sd.
func TestHistoryBandWidening(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 9))
	sims := make([]float64, 100)
	for i := range sims {
		sims[i] = r.NormFloat64()
	}
	mu, sd := stat.PopMeanStdDev(sims, nil)
	row := HistoryRow{Values: make([]float64, 30)}
	for i := range row.Values {
		row.Values[i] = mu
		row.Years = append(row.Years, 1990+i)
	}
	summarizeHistory(&row, sims, true, 1)
	want := 1.645 * sd / math.Sqrt(30) * math.Sqrt(1.3)
	got := (row.MeanBand[1] - row.MeanBand[0]) / 2
	// 2 000 resampled means put each end within about 3 % of its place.
	if math.Abs(got/want-1) > 0.06 {
		t.Errorf("half-width %.4f, want %.4f (1.645·σ/√30·√1.3)", got, want)
	}
}

// TestResampledP checks the two-sided resampling p-value on known draws:
// a value at the middle of symmetric draws is 1, one beyond every draw
// 2/(N + 1), one equal to every draw 1.
func TestResampledP(t *testing.T) {
	draws := make([]float64, 999)
	for i := range draws {
		draws[i] = float64(i - 499) // −499 … 499
	}
	for _, c := range []struct {
		v, want float64
	}{{0, 1}, {1000, 2.0 / 1000}, {-1000, 2.0 / 1000}, {449.5, 2 * 51.0 / 1000}} { // 449.5: 50 draws above, plus one
		if got := resampledP(draws, c.v); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("resampledP(%v) = %v, want %v", c.v, got, c.want)
		}
	}
	if got := resampledP([]float64{3, 3, 3}, 3); got != 1 {
		t.Errorf("all draws equal to the value: %v, want 1", got)
	}
}
