package sim

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/model"
)

// testDemand is a 5-parameter change-point load model in GJ/day.
func testDemand() *model.Demand {
	d := &model.Demand{
		Schema: model.DemandSchema, SchemaVersion: model.DemandSchemaVersion, Unit: "GJ/day", TemperatureUnits: "C",
		Form: model.FormHeatingCoolingBand, Intercept: 38000, Holiday: -4000,
		Heating: model.ChangePoint{Present: true, BalancePoint: 15.5, Slope: 3100},
		Cooling: model.ChangePoint{Present: true, BalancePoint: 22, Slope: 450},
		Noise:   model.DemandNoise{Phi: 0.5, Sigma: 1400, Last: 2000},
	}
	d.Weekday[5], d.Weekday[6] = -2600, -3800 // Saturday, Sunday
	return d
}

// TestDemandAggregatesMatchBruteForce recomputes energy, peak, the day of
// the peak and the days over capacity from the simulated days.
func TestDemandAggregatesMatchBruteForce(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.72})
	cfg := Config{Paths: 1, Year: 2024, Periods: []string{"year", "heating", "jan", "07-01:07-31"},
		Bases: BasesFor(model.Celsius), Demand: testDemand(), Capacity: 95000,
		Holidays: []calendar.Date{calendar.FromYMD(2024, time.January, 1), calendar.FromYMD(2023, time.December, 25)}}
	pl, ps, err := prepare(m, &cfg)
	if err != nil {
		t.Fatal(err)
	}
	nx := len(pl.indices)
	if nx != int(numIndices) {
		t.Fatalf("%d indices per period, want %d", nx, numIndices)
	}
	segs := make([]segStats, len(pl.segs))
	buf, dbuf := make([]float64, pl.n), make([]float64, pl.n)
	out := make([][]float64, len(ps)*nx)
	for i := range out {
		out[i] = make([]float64, 1)
	}
	var rng rand.PCG
	for path := range 100 {
		pl.path(&rng, 3, path, buf, dbuf)
		pl.accumulate(buf, segs)
		pl.accumulateDemand(dbuf, segs)
		pl.collect(segs, out, 0)
		for k, p := range ps {
			lo, hi := int(p.From-pl.first), int(p.To-pl.first)+1
			sum, peak, at, over := 0.0, math.Inf(-1), 0, 0.0
			for d := lo; d < hi; d++ {
				sum += dbuf[d]
				if dbuf[d] > peak {
					peak, at = dbuf[d], d
				}
				if dbuf[d] > cfg.Capacity {
					over++
				}
			}
			want := map[Index]float64{Energy: sum, PeakDemand: peak,
				PeakDay: float64(at - lo + 1), OverCapacity: over}
			for x, w := range want {
				if got := out[k*nx+int(x)][0]; math.Abs(got-w) > 1e-9*math.Max(1, math.Abs(w)) {
					t.Fatalf("path %d %s %s = %v, brute force %v", path, p.Name, x.Info().Name, got, w)
				}
			}
		}
	}
}

// In a climate always below the heating balance point with no weekday or
// holiday effects, a period's energy is n·β0 + βH·HDD(base TbH) + Σu, and
// the AR(1) noise u has mean zero: the identity holds path by path up to Σu,
// whose mean over paths is within Monte Carlo error of 0.
func TestDemandEnergyIsLinearInHDD(t *testing.T) {
	t.Parallel()
	d := testDemand()
	d.Form, d.Cooling, d.Holiday, d.Weekday = model.FormHeatingOnly, model.ChangePoint{}, 0, [7]float64{}
	d.Noise.Last = 0
	m := flatModel(2, 0.7, 2, model.FamilyNormal, 0)
	const paths = 4000
	res, err := Run(context.Background(), m, Config{Paths: paths, Seed: 4, Year: 2023, Periods: []string{"year"},
		Bases: Bases{HDD: d.Heating.BalancePoint, CDD: 30, ColdBelow: 0}, Demand: d})
	if err != nil {
		t.Fatal(err)
	}
	resid := make([]float64, paths)
	for i := range paths {
		hdd := res.Aggregates[HDD].Values[i]
		resid[i] = res.Aggregates[Energy].Values[i] - 365*d.Intercept - d.Heating.Slope*hdd
	}
	mean, sd := stat.MeanStdDev(resid, nil)
	// Σu over 365 days of an AR(1) with φ = 0.5, σ = 1400 has sd about
	// 1400·√365/(1 − 0.5) ≈ 53 500.
	if want := 1400 * math.Sqrt(365) / 0.5; math.Abs(sd/want-1) > 0.1 {
		t.Errorf("sd of the noise sum %.0f, want about %.0f", sd, want)
	}
	if math.Abs(mean) > 4*sd/math.Sqrt(paths) {
		t.Errorf("mean of energy − (n·β0 + βH·HDD) is %.0f, want 0 within %.0f", mean, 4*sd/math.Sqrt(paths))
	}
}

func TestDemandKeepsTemperatureStreams(t *testing.T) {
	t.Parallel()
	// Adding a demand model must not change the temperatures (their random
	// stream is separate), so temperature indices are identical.
	m := seasonalModel([]float64{0.72})
	a := run(t, m, Config{Paths: 300, Seed: 8})
	b := run(t, m, Config{Paths: 300, Seed: 8, Demand: testDemand()})
	for k := range numTempIndices {
		for i, v := range a.Aggregates[k].Values {
			if b.Aggregates[k].Values[i] != v {
				t.Fatalf("%s changed when demand was added", k.Info().Name)
			}
		}
	}
	if _, err := Run(context.Background(), m, Config{Paths: 10, Capacity: 5, Bases: BasesFor(model.Celsius)}); err == nil {
		t.Error("a capacity without a demand model was accepted")
	}
	d := testDemand()
	d.TemperatureUnits = "F"
	if _, err := Run(context.Background(), m, Config{Paths: 10, Demand: d, Bases: BasesFor(model.Celsius)}); err == nil {
		t.Error("a °F demand model on a °C temperature model was accepted")
	}
}

// A year 3 °C colder than normal, in a climate always below the heating
// balance point, used βH·3 more per day than normal weather would have; the
// normalized demand takes exactly that out (up to the Monte Carlo error of
// the normal-weather mean).
func TestWeatherNormalize(t *testing.T) {
	t.Parallel()
	d := testDemand()
	m := flatModel(2, 0.7, 0.01, model.FamilyNormal, 0)
	var hist []HistoryDay
	start := calendar.YearStart(2022)
	for i := range 365 {
		day := start + calendar.Date(i)
		temp := m.Mean(day.ModelTime()) - 3
		hist = append(hist, HistoryDay{Date: day, Temp: temp, Load: d.Expected(temp, day.Weekday(), false) + 500})
	}
	const paths = 500
	out, err := WeatherNormalize(context.Background(), m, d, Config{Seed: 2, Bases: BasesFor(model.Celsius)}, hist, paths)
	if err != nil {
		t.Fatal(err)
	}
	if len(out) != 1 || out[0].Year != 2022 || out[0].Days != 365 {
		t.Fatalf("got %+v", out)
	}
	y := out[0]
	if math.Abs(y.Actual-y.AtActualWeather-365*500) > 1e-6 {
		t.Errorf("actual − modelled at actual weather = %.1f, want 365·500", y.Actual-y.AtActualWeather)
	}
	want := y.Actual - 365*3*d.Heating.Slope
	// Σ of AR(1) noise over a year has sd ≈ 53 500 (see above); its mean
	// over 500 paths ≈ 2 400.
	if tol := 4 * 53500 / math.Sqrt(paths); math.Abs(y.Normalized-want) > tol {
		t.Errorf("normalized %.0f, want %.0f ± %.0f", y.Normalized, want, tol)
	}
}

// The load-duration curve's first rank is the year's peak day, so its
// quantiles across paths equal those of the peak-day index of a Run with
// the same seed and paths (the same years, path by path).
func TestLoadDurationFirstRankIsThePeak(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.72})
	cfg := Config{Seed: 6, Year: 2027, Bases: BasesFor(model.Celsius), Demand: testDemand()}
	fan, err := RunFan(context.Background(), m, cfg, 600)
	if err != nil {
		t.Fatal(err)
	}
	cfg.Paths = 600 // the default periods, as the fan's: the same paths
	res := run(t, m, cfg)
	var peak []float64
	for _, a := range res.Aggregates {
		if a.Index == PeakDemand && a.Period.Name == "year" {
			peak = a.Values
		}
	}
	tail := Summarize(peak, true, nil)
	for k, p := range FanQuantileProbs() {
		want := stat.Quantile(p, stat.LinInterp, sortedCopy(peak), nil)
		if got := fan.LoadDuration[k][0]; math.Abs(got-want) > 1e-9*want {
			t.Errorf("load-duration rank 1, P%.0f = %.3f; peak-day index %.3f", 100*p, got, want)
		}
	}
	if fan.LoadDuration[2][0] != tail.Quantile(0.50) {
		t.Errorf("median of the highest day %v, P50 of the peak %v", fan.LoadDuration[2][0], tail.Quantile(0.50))
	}
	for r := 1; r < len(fan.LoadDuration[2]); r++ {
		if fan.LoadDuration[2][r] > fan.LoadDuration[2][r-1]+1e-9 {
			t.Fatalf("median load-duration curve rises at rank %d", r+1)
		}
	}
}

func sortedCopy(x []float64) []float64 {
	y := slices.Clone(x)
	slices.Sort(y)
	return y
}

// TestHolidaysAcrossHeatingSeason runs the heating season of 2025, 1
// November 2024 to 31 March 2025, with holidays from rules and a listed
// date: each rule must give its day in both calendar years, and each
// holiday in the season must lower the season's energy by exactly the
// holiday coefficient on every path (the noise does not depend on the
// calendar, so both runs share it).
func TestHolidaysAcrossHeatingSeason(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.72})
	cfg := Config{Paths: 200, Seed: 11, Year: 2025, Periods: []string{"heating"}, Bases: BasesFor(model.Celsius), Demand: testDemand()}
	first, last, err := SimulatedYears(m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	if first > 2024 || last != 2025 {
		t.Fatalf("simulated years %d..%d, want ..2024 to 2025", first, last)
	}
	// Common practice: US Thanksgiving (fourth Thursday of November),
	// 2024-11-28; Martin Luther King Jr. Day (third Monday of January),
	// 2025-01-20; New Year's Day. Shrove Tuesday is Easter − 47 days: Easter
	// 2025 is 20 April (published Easter tables, from memory), so 4 March.
	rules := []calendar.HolidayRule{calendar.Nth(4, time.Thursday, time.November), calendar.Nth(3, time.Monday, time.January),
		calendar.Fixed(time.January, 1), calendar.Easter(-47)}
	listed := []calendar.Date{calendar.FromYMD(2019, time.December, 25)}
	cfg.Holidays = calendar.HolidaysIn(listed, rules, first, last)
	for _, r := range rules {
		for _, y := range []int{2024, 2025} {
			if d, _ := r.In(y); !slices.Contains(cfg.Holidays, d) {
				t.Errorf("%s in %d (%s) is not among the simulated holidays", r, y, d)
			}
		}
	}
	inSeason := []string{"2024-11-28", "2024-12-25", "2025-01-01", "2025-01-20", "2025-03-04"}
	var got []string
	for _, d := range cfg.Holidays {
		if d >= calendar.FromYMD(2024, time.November, 1) && d <= calendar.FromYMD(2025, time.March, 31) {
			got = append(got, d.String())
		}
	}
	if !slices.Equal(got, inSeason) {
		t.Errorf("holidays in the season %v, want %v", got, inSeason)
	}

	with := run(t, m, cfg)
	cfg.Holidays = nil
	without := run(t, m, cfg)
	const tol = 1e-6 // GJ; the season sums about 10⁷ GJ, rounding is near 10⁻⁹
	a, b := column(t, with, Energy, "heating"), column(t, without, Energy, "heating")
	want := float64(len(inSeason)) * testDemand().Holiday
	for i := range a {
		if math.Abs(a[i]-b[i]-want) > tol {
			t.Fatalf("path %d: energy change %v, want %v", i, a[i]-b[i], want)
		}
	}
}

func TestSimulatedYears(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.72}) // data end: see flatModel
	end := m.Data.LastDate
	for _, c := range []struct {
		cfg         Config
		first, last int
	}{
		// A conditional start simulates from the day after the data end.
		{Config{Paths: 1, Year: end.Year() + 3, Start: StartConditional, Periods: []string{"year"}}, (end + 1).Year(), end.Year() + 3},
		// A climatological start: the burn-in of a few weeks before 1 May.
		{Config{Paths: 1, Year: 2030, Periods: []string{"cooling"}}, 2030, 2030},
		// The heating season of 2030 starts on 1 November 2029.
		{Config{Paths: 1, Year: 2030, Periods: []string{"jan", "heating"}}, 2029, 2030},
	} {
		first, last, err := SimulatedYears(m, c.cfg)
		if err != nil || first != c.first || last != c.last {
			t.Errorf("%+v: %d..%d, %v; want %d..%d", c.cfg.Periods, first, last, err, c.first, c.last)
		}
	}
	if _, _, err := SimulatedYears(m, Config{Paths: 1, Year: end.Year(), Start: StartConditional, Periods: []string{"year"}}); err == nil {
		t.Error("a conditional start before the data end was accepted")
	}
}
