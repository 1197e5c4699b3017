package backtest

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"
	"time"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/demo"
	"wxstress/model"
	"wxstress/sim"
)

// synthetic draws a record from the tool's own model class: a seasonal
// cycle, a fast AR(1) and a slow AR(1), normal shocks (no trend).
func synthetic(years int, seed uint64) *calibrate.Series {
	r := rand.New(rand.NewPCG(seed, 11))
	start := calendar.FromYMD(1980, time.January, 1)
	end := calendar.FromYMD(1980+years-1, time.December, 31)
	s := &calibrate.Series{Name: "synthetic", Start: start, Units: calibrate.Celsius}
	const phiF, sigma, phiS, sdF = 0.7, 2.5, 0.98, 0.7
	y, f := 0.0, sdF*r.NormFloat64()
	q := sdF * math.Sqrt(1-phiS*phiS)
	for d := start - 200; d <= end; d++ {
		y = phiF*y + sigma*r.NormFloat64()
		f = phiS*f + q*r.NormFloat64()
		if d >= start {
			tt := d.ModelTime()
			s.Temps = append(s.Temps, 10+10*math.Cos(2*math.Pi*(tt-200)/calendar.DaysPerYear)+y+f)
		}
	}
	return s
}

// TestCoverageOnOwnModel backtests 40 calendar years of a record drawn from
// the model class itself: the realised annual HDD must fall inside the
// central 90 % band at a rate compatible with 0.9 (exact binomial test,
// p > 0.01), and the PITs must not reject uniformity.
func TestCoverageOnOwnModel(t *testing.T) {
	if testing.Short() {
		t.Skip("40 refits")
	}
	t.Parallel()
	s := synthetic(46, 5)
	fit := &calibrate.Settings{Harmonics: 1, AROrder: 1, Slow: calibrate.SlowOn, Trend: "none", Shocks: model.FamilyNormal}
	res, err := Run(context.Background(), s, Options{Origins: 40, Periods: []string{"year"}, Paths: 4000, Seed: 3, Fit: fit})
	if err != nil {
		t.Fatal(err)
	}
	var row *Row
	for i := range res.Rows {
		if res.Rows[i].Index == sim.HDD {
			row = &res.Rows[i]
		}
	}
	if row == nil || len(row.Origins) != 40 {
		t.Fatalf("no HDD row with 40 origins: %+v", res.Rows)
	}
	ev := row.Evidence
	t.Logf("90%% coverage %d/%d (p %.3f), 50%% %d/%d, probit sd %.2f, CRPS %.1f vs climatology %.1f; %s",
		ev.Central90.Inside, ev.Cases, ev.Central90.P, ev.Central50.Inside, ev.Cases, ev.ProbitSD, ev.MeanCRPS, ev.MeanRefCRPS, ev.Verdict)
	if ev.Central90.P < 0.01 {
		t.Errorf("90 %% coverage %d of %d rejects the nominal 0.9 (p %.4f)", ev.Central90.Inside, ev.Cases, ev.Central90.P)
	}
	if ev.KS.P < 0.01 {
		t.Errorf("PITs reject uniformity: KS p %.4f", ev.KS.P)
	}
	for _, o := range row.Origins {
		if !(o.P05 <= o.P50 && o.P50 <= o.P95) || o.PIT < 0 || o.PIT > 1 {
			t.Errorf("origin %d: quantiles %v %v %v, PIT %v", o.Year, o.P05, o.P50, o.P95, o.PIT)
		}
	}
}

// TestOriginsDoNotSeeTheirPeriod checks that each origin's model is fitted
// on data ending the day before its period: a refit hook records the last
// day it was given.
func TestOriginsDoNotSeeTheirPeriod(t *testing.T) {
	t.Parallel()
	s := synthetic(9, 2)
	seen := map[calendar.Date]bool{}
	refit := func(tr *calibrate.Series, set *calibrate.Settings) (*model.File, error) {
		r, err := calibrate.Fit(tr, &calibrate.Settings{Harmonics: 1, AROrder: 1, Slow: calibrate.SlowNone, Trend: "none",
			Shocks: model.FamilyNormal, Method: "cls"})
		if err != nil {
			return nil, err
		}
		return r.Model, nil
	}
	var mu = make(chan struct{}, 1)
	res, err := Run(context.Background(), s, Options{Origins: 3, Periods: []string{"year", "jan"}, Paths: 500, Seed: 1,
		Workers: 2, Refit: func(tr *calibrate.Series, set *calibrate.Settings) (*model.File, error) {
			mu <- struct{}{}
			seen[tr.End()] = true
			<-mu
			return refit(tr, set)
		}})
	if err != nil {
		t.Fatal(err)
	}
	// year and jan of the same year start on 1 January: one fit each.
	if len(seen) != 3 {
		t.Errorf("%d distinct fits, want 3 (shared by year and jan): %v", len(seen), seen)
	}
	for d := range seen {
		if _, m, day := (d + 1).YMD(); m != time.January || day != 1 {
			t.Errorf("a fit ends on %s, not the day before 1 January", d)
		}
	}
	for _, r := range res.Rows {
		for _, o := range r.Origins {
			if o.Year < 1985 {
				t.Errorf("origin %d has fewer than %d years of record before it", o.Year, MinTrainYears)
			}
		}
	}
}

// TestDemandOrigins backtests the demo's demand with its fitted demand
// model: every origin the load record covers gets the season's energy and
// peak day, recomputed here from the load CSV's text.
func TestDemandOrigins(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the demo record")
	}
	t.Parallel()
	s, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		t.Fatal(err)
	}
	loads, err := calibrate.ReadDemand(bytes.NewReader(demo.Demand()), demo.DemandFile, calibrate.DemandReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	days, err := calibrate.JoinDemand(loads, s)
	if err != nil {
		t.Fatal(err)
	}
	dfit, err := calibrate.FitDemand(days, &calibrate.DemandSettings{Unit: demo.DemandUnit})
	if err != nil {
		t.Fatal(err)
	}
	// The loads by date, read straight from the CSV text.
	rows, err := csv.NewReader(bytes.NewReader(demo.Demand())).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	load := map[string]float64{}
	for _, r := range rows[1:] {
		v, err := strconv.ParseFloat(r[1], 64)
		if err != nil {
			t.Fatal(err)
		}
		load[r[0]] = v
	}
	res, err := Run(context.Background(), s, Options{Origins: 8, Periods: []string{"year"}, Paths: 1000, Seed: 1,
		Demand: dfit.Model, Loads: loads})
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, row := range res.Rows {
		if row.Index != sim.Energy {
			continue
		}
		found = true
		// The load record covers 2021–2025: five calendar years.
		if len(row.Origins) != 5 {
			t.Errorf("%d energy origins, want 5 (2021–2025)", len(row.Origins))
		}
		for _, o := range row.Origins {
			sum := 0.0
			for d := time.Date(o.Year, 1, 1, 0, 0, 0, 0, time.UTC); d.Year() == o.Year; d = d.AddDate(0, 0, 1) {
				sum += load[d.Format("2006-01-02")]
			}
			if math.Abs(sum-o.Realized) > 1e-6*sum {
				t.Errorf("%d: realised energy %.0f, the CSV sums to %.0f", o.Year, o.Realized, sum)
			}
			if !(o.P05 < o.P95) || o.PIT < 0 || o.PIT > 1 {
				t.Errorf("%d: band %.0f–%.0f, PIT %v", o.Year, o.P05, o.P95, o.PIT)
			}
		}
	}
	if !found {
		t.Fatal("no demand-energy row")
	}
}
