package main

import (
	"bytes"
	"context"
	"math"
	"testing"
	"time"

	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/model"
	"wxstress/sim"
)

// TestRecoveryOverDemoRecords fits records drawn from the demo's own
// generator (the published seed and 15 others; trend, two harmonics, skewed-t
// shocks, the slow part, gaps and rounding as published) with the default
// choices a user gets, and compares each fitted model's simulated sd of 2026
// annual HDD (base 18 °C) with the generator's own, computed here by
// simulating the generator (generatorHDD, as TRUTH.md reports it).
//
// It measures how far one 71-year record can be expected to land: at this
// commit the fitted/generator ratio has a mean of 0.992 and an sd of 0.046
// over the 16 records, 15 of them within ±7 %. The published record is the
// widest of the 16 (+8.5 %): its own sd of annual mean anomalies is 0.640 °C,
// also the highest of the 16 (0.45–0.64; across the 16 the two correlate
// at 0.80), and the fit follows it. So the
// estimator is unbiased, and the published record's +8.5 % is its own
// low-frequency spread, not the model's.
func TestRecoveryOverDemoRecords(t *testing.T) {
	if testing.Short() {
		t.Skip("fits 16 records of 71 years")
	}
	t.Parallel()
	_, want := generatorHDD(hddYear, hddYears)
	var ratios []float64
	within7, widest, widestAt := 0, 0.0, -1
	for k := range uint64(16) {
		s := seed + k*7919
		st := simulateTemperature(s)
		ser, err := calibrate.ReadCSV(bytes.NewReader(st.stationCSV()), "record.csv", calibrate.ReadOptions{Units: calibrate.Celsius})
		if err != nil {
			t.Fatal(err)
		}
		res, err := calibrate.Fit(ser, nil)
		if err != nil {
			t.Fatal(err)
		}
		m := res.Model
		r, err := sim.Run(context.Background(), m, sim.Config{Paths: 20000, Seed: 3, Year: hddYear,
			Periods: []string{"year"}, Bases: sim.BasesFor(model.Units(m.Data.Units))})
		if err != nil {
			t.Fatal(err)
		}
		var sd float64
		for _, a := range r.Aggregates {
			if a.Index == sim.HDD {
				_, sd = stat.MeanStdDev(a.Values, nil)
			}
		}
		ratio := sd / want
		ratios = append(ratios, ratio)
		if math.Abs(ratio-1) <= 0.07 {
			within7++
		}
		if math.Abs(ratio-1) > widest {
			widest, widestAt = math.Abs(ratio-1), int(k)
		}
		slow := "none"
		if m.Slow != nil {
			slow = "kept"
		}
		t.Logf("record %2d (seed %#x): slow part %s, annual-mean anomaly sd %.3f °C, annual HDD sd %.1f (%+.1f %%)",
			k, s, slow, annualMeanSD(st), sd, 100*(ratio-1))
		if m.Slow == nil {
			t.Errorf("record %d: auto left out the slow part of a generator with one (s_F 0.6 °C, φ 0.985)", k)
		}
	}
	mean, sd := stat.MeanStdDev(ratios, nil)
	t.Logf("generator annual HDD sd %.1f; fitted/generator over %d records: mean %.3f, sd %.3f; %d within ±7 %%; widest record %d",
		want, len(ratios), mean, sd, within7, widestAt)
	// The mean of 16 ratios has a sampling sd of about 0.046/4 ≈ 0.012.
	if math.Abs(mean-1) > 0.03 {
		t.Errorf("mean fitted/generator annual HDD sd %.3f: more than 3 %% off (a biased estimator)", mean)
	}
	if within7 < 12 {
		t.Errorf("only %d of %d records within ±7 %% of the generator's annual HDD sd", within7, len(ratios))
	}
}

// annualMeanSD returns the sd of the record's annual means of the true
// anomaly F + Y (before rounding), 1955–2025.
func annualMeanSD(st *station) float64 {
	var means []float64
	for y := firstDay.Year(); y <= lastDay.Year(); y++ {
		var sum float64
		n := 0
		for d := calendar.FromYMD(y, time.January, 1); d <= calendar.FromYMD(y, time.December, 31); d++ {
			sum += st.anomaly[st.index(d)]
			n++
		}
		means = append(means, sum/float64(n))
	}
	_, sd := stat.MeanStdDev(means, nil)
	return sd
}
