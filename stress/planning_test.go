package stress

import (
	"bytes"
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"wxstress/calibrate"
	"wxstress/demo"
	"wxstress/model"
	"wxstress/sim"
)

// demoDemandJob is a quick job on the demo data: the temperature model by
// conditional least squares, the demand model fitted to the loads.
func demoDemandJob(t *testing.T, paths int) *Job {
	t.Helper()
	s, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		t.Fatal(err)
	}
	loads, err := calibrate.ReadDemand(bytes.NewReader(demo.Demand()), demo.DemandFile, calibrate.DemandReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return &Job{Temps: s, Fit: &calibrate.Settings{Harmonics: 2, AROrder: 1, Slow: calibrate.SlowNone, Method: "cls",
		Shocks: model.FamilyNormal}, DemandHistory: loads, DemandFit: &calibrate.DemandSettings{Unit: demo.DemandUnit},
		Config: sim.Config{Paths: paths, Seed: 5, Year: 2026, Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)}}
}

// TestCapacityTargets solves the three kinds of target and checks them the
// way a planner would: the peak:1-in-20 capacity is the 1-in-20 peak-day
// demand; re-simulating at the days:1 capacity gives at most one day over
// capacity a year (within Monte Carlo error) and 2 % less capacity more;
// at the any:0.1 capacity one year in ten has a day over.
func TestCapacityTargets(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the demo data and simulates twice")
	}
	t.Parallel()
	job := demoDemandJob(t, 20000)
	for _, s := range []string{"peak:1-in-20", "days:1", "any:0.1"} {
		c, err := ParseCapacityTarget(s)
		if err != nil {
			t.Fatal(err)
		}
		job.CapacityTargets = append(job.CapacityTargets, c)
	}
	job.Design = []float64{20, 50}
	res, err := Run(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	var peak20, peak20SE float64
	for _, r := range res.Set.Rows {
		if r.Index == sim.PeakDemand {
			peak20, peak20SE = r.Tail.ReturnLevel(20), r.Tail.ReturnLevelError(20)
		}
	}
	caps := map[string]CapacityRow{}
	for _, c := range res.Capacities {
		caps[c.Target] = c
		t.Logf("%s: capacity %.0f ± %.0f, achieved %.4f", c.Target, c.Capacity, c.SE, c.Achieved)
	}
	if c := caps["peak:1-in-20"]; c.Capacity != peak20 { // the same number, not only to float32
		t.Errorf("peak:1-in-20 capacity %.2f, the 1-in-20 peak-day demand is %.2f", c.Capacity, peak20)
	}
	// The same quantity carries the same Monte Carlo error in the design
	// table and the capacity table.
	if c := caps["peak:1-in-20"]; c.SE != peak20SE {
		t.Errorf("peak:1-in-20 capacity ± %.2f, the 1-in-20 peak-day demand ± %.2f", c.SE, peak20SE)
	}
	if c := caps["days:1"]; !(c.SE > 0) {
		t.Errorf("days:1 capacity without a batch error: %v", c.SE)
	}
	if c := caps["any:0.1"]; math.Abs(c.Achieved-0.1) > 0.002 {
		t.Errorf("any:0.1 achieves %.4f", c.Achieved)
	}
	// Re-simulate with the days:1 capacity, and with 2 % less.
	days := caps["days:1"].Capacity
	over := func(capacity float64) (float64, float64) {
		cfg := res.Set.Config
		cfg.Capacity, cfg.TopDays, cfg.SnapDays, cfg.Seed = capacity, 0, 0, 77
		r, err := sim.Run(context.Background(), res.Model, cfg)
		if err != nil {
			t.Fatal(err)
		}
		for _, a := range r.Aggregates {
			if a.Index == sim.OverCapacity {
				m, sd := meanSD(a.Values)
				return m, sd / math.Sqrt(float64(len(a.Values)))
			}
		}
		t.Fatal("no days-over-capacity aggregate")
		return 0, 0
	}
	if m, se := over(days); m > 1+3*se {
		t.Errorf("at the days:1 capacity %.0f: %.3f ± %.3f days over a year", days, m, se)
	}
	if m, se := over(0.98 * days); m <= 1+se {
		t.Errorf("at 2 %% less capacity: %.3f ± %.3f days over a year, want more than 1", m, se)
	}
	if len(res.Design) != 2 || math.IsNaN(res.Design[0].Snap) || math.IsNaN(res.Design[0].SnapEnergy) {
		t.Errorf("design rows %+v", res.Design)
	}
}

// TestCapacityShortPeriod solves a days target on a period shorter than
// the 40 days kept per path (December): the kept lists end in −∞ there, and
// the solve must still find the capacity with one day over a year (it used
// to return the highest peak of all, with none over).
func TestCapacityShortPeriod(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the demo data")
	}
	t.Parallel()
	job := demoDemandJob(t, 5000)
	job.Config.Periods = []string{"dec"}
	c, err := ParseCapacityTarget("days:1")
	if err != nil {
		t.Fatal(err)
	}
	job.CapacityTargets = []CapacityTarget{c}
	res, err := Run(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	var peak90 float64
	for _, r := range res.Set.Rows {
		if r.Index == sim.PeakDemand {
			peak90 = r.Tail.Quantiles[slices.Index(sim.TailQuantileProbs(), 0.9)]
		}
	}
	// One day over a year on average lies below the peak that one year in
	// ten exceeds (most years with a day over have one or two).
	got := res.Capacities[0]
	if got.Achieved > 1 || got.Achieved < 0.95 || !(got.Capacity < peak90) {
		t.Errorf("days:1 in December: capacity %.0f achieving %.3f days a year; the December P90 peak is %.0f",
			got.Capacity, got.Achieved, peak90)
	}
}

func meanSD(v []float64) (float64, float64) {
	s, s2 := 0.0, 0.0
	for _, x := range v {
		s += x
		s2 += x * x
	}
	n := float64(len(v))
	m := s / n
	return m, math.Sqrt((s2 - n*m*m) / (n - 1))
}

// TestGrowthScalesDemand: --growth g scales every simulated day's demand by
// (1 + g/100)^years (the same paths, common random numbers), so the energy
// and the peak scale by that factor exactly.
func TestGrowthScalesDemand(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the demo data")
	}
	t.Parallel()
	run := func(g float64) *Result {
		job := demoDemandJob(t, 500)
		job.Config.Year, job.Growth = 2028, g
		res, err := Run(context.Background(), job)
		if err != nil {
			t.Fatal(err)
		}
		return res
	}
	a, b := run(0), run(2)
	f := math.Pow(1.02, 3) // 2025 → 2028
	for k, ag := range a.Set.Base.Aggregates {
		if ag.Index != sim.Energy && ag.Index != sim.PeakDemand {
			continue
		}
		for i, v := range ag.Values {
			if w := b.Set.Base.Aggregates[k].Values[i]; math.Abs(w-f*v) > 1e-9*math.Abs(w) {
				t.Fatalf("%s path %d: %v with growth, %v × %.6f without", ag.Index.Info().Key, i, w, v, f)
			}
		}
	}
}

// TestLoadDurationAgreesWithPeakDay checks that a run of at most
// DetailPaths keeps every path for the load-duration curve, so its busiest
// day has exactly the quantiles of the peak-day demand of the year in the
// tail table (the two came from different path counts before).
func TestLoadDurationAgreesWithPeakDay(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the demo data")
	}
	t.Parallel()
	job := demoDemandJob(t, 3000)
	job.Detail = DetailPaths
	res, err := Run(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	if res.Set.Fan == nil || res.Set.Fan.Paths != 3000 {
		t.Fatalf("the fan keeps %v paths, want all 3000", res.Set.Fan)
	}
	for _, r := range res.Set.Rows {
		if r.Index != sim.PeakDemand || r.Period != "year" {
			continue
		}
		for k, p := range sim.FanQuantileProbs() {
			if got, want := res.Set.Fan.LoadDuration[k][0], r.Tail.Quantile(p); math.Abs(got-want) > 1e-6*want {
				t.Errorf("busiest day P%.0f %.3f, peak-day demand P%.0f %.3f", 100*p, got, 100*p, want)
			}
		}
		return
	}
	t.Fatal("no peak-day demand row for the year")
}

// TestRunWarnings checks the run's own cautions: none for a target year
// next to the record with forward growth; growth run backwards to a year
// before the demand record's end; a target year more than FarYears past
// the record; a demand model fitted with another temperature file.
func TestRunWarnings(t *testing.T) {
	if testing.Short() {
		t.Skip("fits the demo data")
	}
	t.Parallel()
	run := func(job *Job) []string {
		t.Helper()
		res, err := Run(context.Background(), job)
		if err != nil {
			t.Fatal(err)
		}
		return res.Warnings
	}
	has := func(ws []string, part string) bool {
		return slices.ContainsFunc(ws, func(w string) bool { return strings.Contains(w, part) })
	}
	job := demoDemandJob(t, 200)
	job.Config.Year, job.Growth = 2027, 2
	res, err := Run(context.Background(), job)
	if err != nil {
		t.Fatal(err)
	}
	// The demo's demand model is too narrow on its coldest days (its
	// send-out scales the heating load by the weekday; the model adds a
	// weekday term): that is the one warning of a plain run.
	if len(res.Warnings) != 1 || !strings.HasPrefix(res.Warnings[0], "demand noise on the record's coldest 5 % of days is narrower "+
		"than observed (sd 1,911 against 2,491 GJ/day)") {
		t.Errorf("a plain run warns: %q", res.Warnings)
	}
	job = demoDemandJob(t, 200)
	job.Config.Year, job.Growth = 2023, 2
	if ws := run(job); !has(ws, "runs backwards: the target year 2023 is 2 years before the demand record's end (2025)") {
		t.Errorf("growth back to 2023: %q", ws)
	}
	job = demoDemandJob(t, 200)
	job.Config.Year = 2070
	if ws := run(job); !has(ws, "the target year 2070 is 45 years after the record's end (1955–2025)") {
		t.Errorf("target year 2070: %q", ws)
	}
	// A demand model with a holiday effect, run without holidays.
	job = &Job{Model: res.Model, Demand: res.Demand, Config: sim.Config{Paths: 200, Seed: 5, Year: 2026,
		Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)}}
	if ws := run(job); res.Demand.Holiday != 0 && !has(ws, "but this run has no holidays") {
		t.Errorf("demand model with a holiday effect run without holidays: %q", ws)
	}
	other := *res.Demand
	other.Data.TemperatureSHA256, other.Data.TemperatureFile = "0123", "elsewhere.csv"
	job = &Job{Model: res.Model, Demand: &other, Config: sim.Config{Paths: 200, Seed: 5, Year: 2026,
		Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)}}
	if ws := run(job); !has(ws, "fitted with another temperature file (elsewhere.csv)") {
		t.Errorf("demand model from another file: %q", ws)
	}
	// A heating slope of the wrong sign (a hand-edited file, or a form the
	// user fixed on data it does not fit) is taken, and said.
	inverted := *res.Demand
	inverted.Heating.Slope = -3000
	job = &Job{Model: res.Model, Demand: &inverted, Config: sim.Config{Paths: 200, Seed: 5, Year: 2026,
		Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)}}
	if ws := run(job); !has(ws, "the demand model's heating slope is -3,000 GJ/day per degree, not positive") {
		t.Errorf("negative heating slope: %q", ws)
	}
}

// TestCapacityErrorUnbounded: a target so far in the tail that no path
// lies beyond the order-statistic interval (any:0.001 of 300 paths) has no
// Monte Carlo error (NaN, which the tables word), not an infinite one.
func TestCapacityErrorUnbounded(t *testing.T) {
	const n, k = 300, 40
	heating := sim.Period{Name: "heating"}
	res := &sim.Result{Config: sim.Config{Paths: n, TopDays: k}, Periods: []sim.Period{heating}, Top: [][]float32{make([]float32, n*k)}}
	peaks := make([]float64, n)
	for i := range peaks {
		peaks[i] = 1000 + float64((i*7919)%n) // a permutation of 1000..1299
		res.Top[0][i*k] = float32(peaks[i])
	}
	res.Aggregates = []sim.Aggregate{{Index: sim.PeakDemand, Period: heating, Values: peaks}}
	far, _ := ParseCapacityTarget("any:0.001")
	near, _ := ParseCapacityTarget("peak:1-in-2")
	rows := solveCapacities(res, []CapacityTarget{far, near})
	if !math.IsNaN(rows[0].SE) || rows[0].Capacity < 1298 {
		t.Errorf("any:0.001 of 300 paths: capacity %v ± %v, want the top of the range and no error", rows[0].Capacity, rows[0].SE)
	}
	if se := rows[1].SE; !(se > 0) || math.IsInf(se, 0) {
		t.Errorf("peak:1-in-2: error %v, want a finite one", se)
	}
}

// TestDesignRowsSkipWarmPeriods: the design day is the coldest day at a
// planning standard; a warm period (the cooling season, or July by its own
// degree days) has none worth the name, the year and the heating season do;
// with demand, a warm period keeps its design-day demand.
func TestDesignRowsSkipWarmPeriods(t *testing.T) {
	tail := sim.Summarize([]float64{-9, -7, -5, -3, -1, 1, 3, 5, 7, 9}, false, nil)
	mean := func(m float64) sim.Tail { t := tail; t.Mean = m; return t }
	var rows []sim.Row
	for _, p := range []struct {
		name     string
		hdd, cdd float64
	}{{"year", 3026, 309}, {"heating", 2150, 0}, {"cooling", 220, 300}, {"jul", 4.8, 230}} {
		rows = append(rows, sim.Row{Index: sim.HDD, Period: p.name, Tail: mean(p.hdd)}, sim.Row{Index: sim.CDD, Period: p.name, Tail: mean(p.cdd)},
			sim.Row{Index: sim.Coldest, Period: p.name, Tail: tail})
	}
	var got []string
	for _, d := range designRows(rows, []float64{20}) {
		got = append(got, d.Period)
	}
	if !slices.Equal(got, []string{"year", "heating"}) {
		t.Errorf("design rows for %v, want year and heating", got)
	}
	// With demand, a warm period keeps its peak-day demand (a summer-peaking
	// load's design day) without temperatures.
	for _, p := range []string{"year", "heating", "cooling", "jul"} {
		rows = append(rows, sim.Row{Index: sim.PeakDemand, Period: p, Tail: mean(90000)})
	}
	got = nil
	for _, d := range designRows(rows, []float64{20}) {
		got = append(got, d.Period)
		warm := d.Period == "cooling" || d.Period == "jul"
		if warm != math.IsNaN(d.Coldest) || math.IsNaN(d.Peak) {
			t.Errorf("%s: design day %v, demand %v", d.Period, d.Coldest, d.Peak)
		}
	}
	if !slices.Equal(got, []string{"year", "heating", "cooling", "jul"}) {
		t.Errorf("design rows with demand for %v, want all four", got)
	}
}
