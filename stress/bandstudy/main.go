// Command bandstudy measures how often the parameter-uncertainty band of
// wxstress (a parametric bootstrap, package stress) holds the true 1-in-20
// annual HDD of a known model. It draws records from a known model of the
// tool's class, fits each, forms the 90 % band of the 1-in-20 annual HDD from
// bootstrap refits, and counts the bands that contain the true level (the
// known model simulated with many paths). Deterministic for its flags:
//
//	go run ./stress/bandstudy -records 40 -refits 30
//
// Its result is quoted in README.md (parameter uncertainty).
package main

import (
	"context"
	"flag"
	"fmt"
	"log"
	"math"
	"time"

	"gonum.org/v1/gonum/stat/distuv"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

func main() {
	records := flag.Int("records", 40, "synthetic records")
	refits := flag.Int("refits", 30, "bootstrap refits per record")
	years := flag.Int("years", 30, "years per record")
	paths := flag.Int("paths", 10000, "paths per simulation")
	flag.Parse()
	log.SetFlags(0)
	ctx := context.Background()

	truth := knownModel(*years)
	year := truth.Data.LastDate.Year() + 1
	cfg := sim.Config{Paths: 400000, Seed: 99, Year: year, Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)}
	res, err := sim.Run(ctx, truth, cfg)
	if err != nil {
		log.Fatal(err)
	}
	trueRL20 := hddRow(res.Summarize(model.Celsius, nil)).Tail.ReturnLevel(20)
	fmt.Printf("known model: fast AR(1) φ 0.7, σ 2.5 °C; slow part φ 0.98, sd 0.7 °C; %d-year records; true 1-in-20 annual HDD %.1f\n",
		*years, trueRL20)

	inside := 0
	start := time.Now()
	for k := range *records {
		rec, err := sim.Record(truth, truth.Data.FirstDate, truth.Data.LastDate, 7, k)
		if err != nil {
			log.Fatal(err)
		}
		s := &calibrate.Series{Name: fmt.Sprintf("record %d", k+1), Start: truth.Data.FirstDate, Temps: rec, Units: model.Celsius}
		out, err := stress.Run(ctx, &stress.Job{Temps: s,
			Fit:         &calibrate.Settings{Harmonics: 1, AROrder: 1, Slow: calibrate.SlowOn, Trend: "none", Shocks: model.FamilyNormal},
			Config:      sim.Config{Paths: *paths, Seed: uint64(k + 1), Year: year, Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)},
			Uncertainty: &stress.Uncertainty{Refits: *refits}})
		if err != nil {
			log.Fatal(err)
		}
		for i, r := range out.Set.Rows {
			if r.Index == sim.HDD {
				b := out.Bands[i].RL20
				in := b.Lo <= trueRL20 && trueRL20 <= b.Hi
				if in {
					inside++
				}
				fmt.Printf("record %2d: fitted 1-in-20 %.1f, band [%.1f, %.1f], holds the truth: %v\n", k+1, r.Tail.ReturnLevel(20), b.Lo, b.Hi, in)
			}
		}
	}
	n := *records
	lo, hi := binomialRange(n, stress.BandLevel)
	fmt.Printf("\n%d of %d bands hold the true 1-in-20 annual HDD (%.0f %%; nominal %.0f %%, 95 %% binomial range %d–%d) in %s\n",
		inside, n, 100*float64(inside)/float64(n), 100*stress.BandLevel, lo, hi, time.Since(start).Round(time.Second))
}

// knownModel is the model the records are drawn from: a seasonal cycle, no
// trend, a fast AR(1) and a slow AR(1), normal shocks.
func knownModel(years int) *model.File {
	f := &model.File{
		Schema: model.Schema, SchemaVersion: model.SchemaVersion,
		Data: model.Data{FirstDate: calendar.FromYMD(1990, time.January, 1), LastDate: calendar.FromYMD(1990+years-1, time.December, 31),
			Units: "C"},
		Trend:      model.Trend{Kind: "none", Epoch: calendar.Epoch, Intercept: 10},
		Seasonal:   model.Seasonal{PeriodDays: calendar.DaysPerYear, Harmonics: []model.Harmonic{{K: 1, Cos: -10 * math.Cos(2*math.Pi*200/calendar.DaysPerYear), Sin: -10 * math.Sin(2*math.Pi*200/calendar.DaysPerYear)}}},
		AR:         model.AR{Phi: []float64{0.7}, Last: []float64{0}},
		Slow:       &model.Slow{Phi: 0.98, SD: 0.7},
		Volatility: model.Volatility{Kind: "monthly"},
		Shocks:     model.Shocks{Family: model.FamilyNormal},
	}
	for m := range 12 {
		f.Volatility.Monthly[m] = 2.5
	}
	if err := f.Validate("known model"); err != nil {
		log.Fatal(err)
	}
	return f
}

func hddRow(rows []sim.Row) sim.Row {
	for _, r := range rows {
		if r.Index == sim.HDD {
			return r
		}
	}
	log.Fatal("no HDD row")
	return sim.Row{}
}

// binomialRange is the central 95 % range of Binomial(n, p).
func binomialRange(n int, p float64) (int, int) {
	b := distuv.Binomial{N: float64(n), P: p}
	lo, hi := 0, n
	for k := 0; k <= n; k++ {
		if b.CDF(float64(k)) >= 0.025 {
			lo = k
			break
		}
	}
	for k := n; k >= 0; k-- {
		if 1-b.CDF(float64(k-1)) >= 0.025 {
			hi = k
			break
		}
	}
	return lo, hi
}
