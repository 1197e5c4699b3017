package sim

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"wxstress/calendar"
	"wxstress/model"
)

// flatModel is a model with no trend and no season: S = level, AR(1) φ, one
// σ for every month, and the given shock family.
func flatModel(level, phi, sigma float64, family string, nu float64) *model.File {
	f := &model.File{
		Schema: model.Schema, SchemaVersion: model.SchemaVersion,
		Data:       model.Data{FirstDate: calendar.FromYMD(2000, 1, 1), LastDate: calendar.FromYMD(2019, 12, 31), Units: "C"},
		Trend:      model.Trend{Kind: "none", Epoch: calendar.Epoch, Intercept: level},
		Seasonal:   model.Seasonal{PeriodDays: calendar.DaysPerYear, Harmonics: []model.Harmonic{{K: 1}}},
		AR:         model.AR{Phi: []float64{phi}, Last: []float64{0}},
		Volatility: model.Volatility{Kind: "monthly"},
		Shocks:     model.Shocks{Family: family, DF: nu},
	}
	if family == model.FamilySkewT {
		f.Shocks.Skew = 1
	}
	for m := range 12 {
		f.Volatility.Monthly[m] = sigma
	}
	if err := f.Validate("test"); err != nil {
		panic(err)
	}
	return f
}

// seasonalModel is a realistic model: trend, two harmonics, AR(p), winter
// volatility above summer, skewed-t shocks.
func seasonalModel(phi []float64) *model.File {
	f := flatModel(10, 0.7, 2, model.FamilySkewT, 8)
	f.Trend = model.Trend{Kind: "linear", Epoch: calendar.Epoch, Intercept: 10, SlopePerYear: 0.02}
	f.Seasonal.Harmonics = []model.Harmonic{{K: 1, Cos: -10, Sin: -4}, {K: 2, Cos: 0.5, Sin: 0.3}}
	f.Shocks.Skew = 0.85
	f.AR.Phi, f.AR.Last = phi, make([]float64, len(phi))
	f.AR.Last[0] = -3
	for m := range 12 {
		f.Volatility.Monthly[m] = 2.3 + 0.7*math.Cos(2*math.Pi*float64(m)/12)
	}
	if err := f.Validate("test"); err != nil {
		panic(err)
	}
	return f
}

func run(t *testing.T, m *model.File, cfg Config) *Result {
	t.Helper()
	if cfg.Bases == (Bases{}) {
		cfg.Bases = BasesFor(model.Celsius)
	}
	res, err := Run(context.Background(), m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func column(t *testing.T, res *Result, x Index, period string) []float64 {
	t.Helper()
	for _, a := range res.Aggregates {
		if a.Index == x && a.Period.Name == period {
			return a.Values
		}
	}
	t.Fatalf("no %v for %s", x, period)
	return nil
}

// Thom's degree-day relation for a normal daily mean (H. C. S. Thom, Monthly
// Weather Review, 1950s; from memory — the same normal partial expectation
// is used in the ASHRAE Handbook — Fundamentals, climatic design chapter):
// E[max(Tb − T, 0)] = σφ(z) + (Tb − μ)Φ(z), z = (Tb − μ)/σ. With φ = 0,
// normal shocks and no season, a year's HDD has mean 365 times that.
func TestMeanHDDMatchesThom(t *testing.T) {
	t.Parallel()
	const mu, sigma, base, paths = 15.0, 4.0, 18.0, 40000
	res := run(t, flatModel(mu, 0, sigma, model.FamilyNormal, 0),
		Config{Paths: paths, Seed: 3, Year: 2023, Periods: []string{"year"}, Bases: Bases{HDD: base, CDD: base, ColdBelow: 0}})
	z := (base - mu) / sigma
	perDay := sigma*distuv.UnitNormal.Prob(z) + (base-mu)*distuv.UnitNormal.CDF(z)
	want := 365 * perDay
	hdd := column(t, res, HDD, "year")
	mean, sd := stat.MeanStdDev(hdd, nil)
	se := sd / math.Sqrt(paths)
	if math.Abs(mean-want) > 4*se {
		t.Errorf("mean annual HDD %.3f, Thom's closed form %.3f (4 s.e. = %.3f)", mean, want, 4*se)
	}
	// And CDD by the mirror formula.
	cddWant := 365 * (sigma*distuv.UnitNormal.Prob(z) - (base-mu)*(1-distuv.UnitNormal.CDF(z)))
	cdd := column(t, res, CDD, "year")
	cm, cs := stat.MeanStdDev(cdd, nil)
	if math.Abs(cm-cddWant) > 4*cs/math.Sqrt(paths) {
		t.Errorf("mean annual CDD %.3f, closed form %.3f", cm, cddWant)
	}
}

// The AR(1) stationary variance σ²/(1 − φ²) and lag-1 autocorrelation φ
// (standard results, e.g. Box, Jenkins and Reinsel, Time Series Analysis,
// ch. 3): with the HDD base far above every temperature, a window's HDD is
// n·(Tb − μ) − ΣX, so Var(one-day HDD) = σ²/(1 − φ²) and
// Var(two-day HDD) = 2σ²(1 + φ)/(1 − φ²).
func TestAR1StationaryVarianceAndLag1(t *testing.T) {
	t.Parallel()
	const phi, sigma, paths = 0.72, 2.5, 60000
	for _, family := range []string{model.FamilyNormal, model.FamilyStudentT} {
		res := run(t, flatModel(10, phi, sigma, family, 7), Config{Paths: paths, Seed: 11, Year: 2023,
			Periods: []string{"03-10:03-10", "03-10:03-11"}, Bases: Bases{HDD: 500, CDD: 500, ColdBelow: -500}})
		v1 := stat.Variance(column(t, res, HDD, "03-10:03-10"), nil)
		v2 := stat.Variance(column(t, res, HDD, "03-10:03-11"), nil)
		want1 := sigma * sigma / (1 - phi*phi)
		// The sample variance of n draws has relative s.e. √(2/n) for a
		// normal (more with fat tails: ×√(1 + κ/2), κ = excess kurtosis ≤ 6/(ν−4) = 2 here).
		tol := 4 * math.Sqrt(2.0/paths) * math.Sqrt(2)
		if math.Abs(v1/want1-1) > tol {
			t.Errorf("%s: stationary variance %.4f, σ²/(1−φ²) = %.4f", family, v1, want1)
		}
		gotPhi := v2/(2*v1) - 1
		if math.Abs(gotPhi-phi) > 0.02 {
			t.Errorf("%s: lag-1 autocorrelation %.4f, want φ = %.2f", family, gotPhi, phi)
		}
	}
}

// The unit-variance Student-t has kurtosis 3 + 6/(ν − 4) for ν > 4 (a
// standard result; e.g. Johnson, Kotz and Balakrishnan, Continuous
// Univariate Distributions, vol. 2, ch. 28). With φ = 0 one day's HDD is
// Tb − μ − σε.
func TestStudentTShockKurtosis(t *testing.T) {
	t.Parallel()
	const nu, paths = 10.0, 200000
	res := run(t, flatModel(0, 0, 1, model.FamilyStudentT, nu), Config{Paths: paths, Seed: 5, Year: 2023,
		Periods: []string{"06-01:06-01"}, Bases: Bases{HDD: 100, CDD: 100, ColdBelow: -100}})
	x := column(t, res, HDD, "06-01:06-01")
	k := stat.ExKurtosis(x, nil) + 3
	if want := 3 + 6/(nu-4); math.Abs(k-want) > 0.15 {
		t.Errorf("kurtosis %.3f, want 3 + 6/(ν−4) = %.3f", k, want)
	}
	if v := stat.Variance(x, nil); math.Abs(v-1) > 0.01 {
		t.Errorf("shock variance %.4f, want 1", v)
	}
}

func TestSameSeedSameResultsForAnyWorkerCount(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.7, -0.05})
	var ref *Result
	for _, w := range []int{1, 2, 7} {
		res := run(t, m, Config{Paths: 5000, Seed: 42, Workers: w, Periods: []string{"year", "heating", "jan"}})
		if ref == nil {
			ref = res
			continue
		}
		for i, a := range res.Aggregates {
			if !slices.Equal(a.Values, ref.Aggregates[i].Values) {
				t.Fatalf("workers=%d: %s %s differs from workers=1", w, a.Period.Name, a.Index.Info().Name)
			}
		}
	}
	other := run(t, m, Config{Paths: 5000, Seed: 43, Workers: 2, Periods: []string{"year", "heating", "jan"}})
	if slices.Equal(other.Aggregates[0].Values, ref.Aggregates[0].Values) {
		t.Error("a different seed gave the same numbers")
	}
}

// TestAggregatesMatchBruteForce recomputes every aggregate of every period
// directly from the simulated days, for overlapping periods of all shapes,
// both shock paths (table and bootstrap) and AR orders 1 and 3.
func TestAggregatesMatchBruteForce(t *testing.T) {
	t.Parallel()
	boot := seasonalModel([]float64{0.6, 0.1, -0.05})
	boot.Shocks = model.Shocks{Family: model.FamilyBootstrap, ByMonth: make([][]float64, 12)}
	r := rand.New(rand.NewPCG(1, 2))
	for m := range 12 {
		for range 50 {
			boot.Shocks.ByMonth[m] = append(boot.Shocks.ByMonth[m], r.NormFloat64())
		}
	}
	for name, m := range map[string]*model.File{"ar1-skewt": seasonalModel([]float64{0.75}), "ar3-bootstrap": boot} {
		cfg := Config{Paths: 1, Year: 2024, Start: StartConditional,
			Periods: []string{"year", "heating", "feb", "12-20:01-10", "gas-year", "01-01:01-01"},
			Bases:   Bases{HDD: 15.5, CDD: 22, ColdBelow: 1}}
		pl, ps, err := prepare(m, &cfg)
		if err != nil {
			t.Fatal(err)
		}
		segs := make([]segStats, len(pl.segs))
		buf := make([]float64, pl.n)
		out := make([][]float64, len(ps)*int(numTempIndices))
		for i := range out {
			out[i] = make([]float64, 1)
		}
		var rng rand.PCG
		for path := range 200 {
			seedPath(&rng, 9, path)
			pl.temps(&rng, buf)
			pl.accumulate(buf, segs)
			pl.collect(segs, out, 0)
			for k, p := range ps {
				days := buf[int(p.From-pl.first) : int(p.To-pl.first)+1]
				want := brute(days, cfg.Bases)
				for x := range numTempIndices {
					got := out[k*int(numTempIndices)+int(x)][0]
					if math.Abs(got-want[x]) > 1e-9*math.Max(1, math.Abs(want[x])) {
						t.Fatalf("%s path %d period %s %s: %v, brute force %v", name, path, p.Name, x.Info().Name, got, want[x])
					}
				}
			}
		}
	}
}

func brute(days []float64, b Bases) [numTempIndices]float64 {
	var v [numTempIndices]float64
	v[Coldest], v[Hottest] = math.Inf(1), math.Inf(-1)
	run := 0
	for _, t := range days {
		v[HDD] += math.Max(b.HDD-t, 0)
		v[CDD] += math.Max(t-b.CDD, 0)
		v[Coldest], v[Hottest] = math.Min(v[Coldest], t), math.Max(v[Hottest], t)
		if t < b.ColdBelow {
			v[ColdDays]++
			run++
			v[ColdSpell] = math.Max(v[ColdSpell], float64(run))
		} else {
			run = 0
		}
	}
	return v
}

func TestConditionalStartCarriesTheLastAnomaly(t *testing.T) {
	t.Parallel()
	// With a very persistent AR and a warm last anomaly, the first days of a
	// conditional run are warmer than a climatological run's.
	m := flatModel(5, 0.95, 1, model.FamilyNormal, 0)
	m.AR.Last = []float64{8}
	cfg := Config{Paths: 4000, Seed: 1, Year: 2020, Periods: []string{"01-01:01-05"}}
	cfg.Start = StartConditional
	cond := stat.Mean(column(t, run(t, m, cfg), HDD, "01-01:01-05"), nil)
	cfg.Start = StartClimate
	clim := stat.Mean(column(t, run(t, m, cfg), HDD, "01-01:01-05"), nil)
	// Expected anomaly on day k is 8·0.95^k: about 7.2 °C on average over
	// the first five days, so HDD over 5 days drop by ≈ 36.
	if !(clim-cond > 30 && clim-cond < 42) {
		t.Errorf("HDD conditional %.1f vs climate %.1f: want the warm start to cut about 36", cond, clim)
	}
	cfg.Start, cfg.Year = StartConditional, 2019
	if _, err := Run(context.Background(), m, cfg); err == nil {
		t.Error("a conditional start before the data end was accepted")
	}
}

func TestRunIsCancellable(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := Run(ctx, flatModel(10, 0.7, 2, model.FamilyNormal, 0), Config{Paths: 100000, Bases: BasesFor(model.Celsius)})
	if err == nil {
		t.Fatal("cancelled run returned no error")
	}
}

func TestConfigErrors(t *testing.T) {
	t.Parallel()
	m := flatModel(10, 0.7, 2, model.FamilyNormal, 0)
	for _, cfg := range []Config{
		{Paths: 0}, {Paths: -5}, {Paths: 10, Workers: -1}, {Paths: 10, Start: "warm"},
		{Paths: 10, Periods: []string{"winter"}}, {Paths: 10, Periods: []string{"13-01:01-02"}},
		{Paths: 10, Year: 1500}, {Paths: 10, Bases: Bases{HDD: math.NaN()}},
	} {
		if _, err := Run(context.Background(), m, cfg); err == nil {
			t.Errorf("%+v accepted", cfg)
		}
	}
}

// TestSnapWithoutDemand runs the design cold snap on a temperature-only
// model (a run with --design and no demand model): the 3-day snap is a mean
// of days, so it lies between each path's coldest day and its period mean.
func TestSnapWithoutDemand(t *testing.T) {
	res := run(t, seasonalModel([]float64{0.7}), Config{Paths: 200, Seed: 5, Year: 2026, Periods: []string{"heating"}, SnapDays: 3})
	snap, coldest := column(t, res, ColdSnap, "heating"), column(t, res, Coldest, "heating")
	for i := range snap {
		if !(snap[i] >= coldest[i]) || math.IsInf(snap[i], 0) {
			t.Fatalf("path %d: 3-day snap %v below the coldest day %v", i, snap[i], coldest[i])
		}
	}
}

// TestSnapLengthInNames: the design snap's length names its indices
// ("coldest 3-day mean", "3-day demand energy"); "peak-day demand" keeps
// its name.
func TestSnapLengthInNames(t *testing.T) {
	res := run(t, seasonalModel([]float64{0.7}), Config{Paths: 50, Seed: 5, Year: 2026, Periods: []string{"heating"},
		SnapDays: 3, Demand: testDemand(), Bases: BasesFor(model.Celsius)})
	names := map[Index]string{}
	for _, r := range res.Summarize(model.Celsius, nil) {
		names[r.Index] = r.Name
	}
	for x, want := range map[Index]string{ColdSnap: "coldest 3-day mean", SnapEnergy: "3-day demand energy",
		PeakDemand: "peak-day demand", Coldest: "coldest day"} {
		if names[x] != want {
			t.Errorf("%s: named %q, want %q", x.Info().Key, names[x], want)
		}
	}
}

// TestFourPathsMatchOne checks that the four-path kernel gives every path
// exactly the temperatures the one-path kernel gives it, with and without
// the slow part, for climate and conditional starts.
func TestFourPathsMatchOne(t *testing.T) {
	slow := seasonalModel([]float64{0.7})
	slow.Slow = &model.Slow{Phi: 0.985, SD: 0.6, State: 0.4, StateSD: 0.3}
	for _, c := range []struct {
		name  string
		m     *model.File
		start string
	}{
		{"fast only, climate", seasonalModel([]float64{0.7}), StartClimate},
		{"slow, climate", slow, StartClimate},
		{"slow, conditional", slow, StartConditional},
	} {
		cfg := Config{Paths: 8, Seed: 11, Year: 2026, Start: c.start, Bases: BasesFor(model.Celsius)}
		pl, _, err := prepare(c.m, &cfg)
		if err != nil {
			t.Fatal(err)
		}
		if !pl.fast1() {
			t.Fatalf("%s: the plan does not take the AR(1) table kernels", c.name)
		}
		var rngs [4]rand.PCG
		var bufs [4][]float64
		for k := range bufs {
			bufs[k] = make([]float64, pl.n)
		}
		pl.temps4(&rngs, &bufs, cfg.Seed, 4)
		one := make([]float64, pl.n)
		for k := range 4 {
			var rng rand.PCG
			seedPath(&rng, cfg.Seed, 4+k)
			pl.temps(&rng, one)
			if !slices.Equal(one, bufs[k]) {
				t.Errorf("%s: path %d differs between the four-path and one-path kernels", c.name, 4+k)
			}
		}
	}
}
