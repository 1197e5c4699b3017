package scenarios

import (
	"context"
	"errors"
	"math"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/model"
	"wxstress/sim"
)

// coldModel is a climate whose daily mean never reaches an 18 °C heating
// base: level −5 °C, small σ, so every day of every path is a heating day.
func coldModel() *model.File {
	f := &model.File{
		Schema: model.Schema, SchemaVersion: model.SchemaVersion,
		Data:       model.Data{FirstDate: calendar.FromYMD(1990, 1, 1), LastDate: calendar.FromYMD(2024, 12, 31), Units: "C"},
		Trend:      model.Trend{Kind: "linear", Epoch: calendar.Epoch, Intercept: -5, SlopePerYear: 0.02},
		Seasonal:   model.Seasonal{PeriodDays: calendar.DaysPerYear, Harmonics: []model.Harmonic{{K: 1, Cos: -3, Sin: -1}}},
		AR:         model.AR{Phi: []float64{0.7}, Last: []float64{0.5}},
		Volatility: model.Volatility{Kind: "monthly"},
		Shocks:     model.Shocks{Family: model.FamilyStudentT, DF: 8},
	}
	for m := range 12 {
		f.Volatility.Monthly[m] = 1
	}
	return f
}

func simulate(t *testing.T, m *model.File, periods ...string) *sim.Result {
	t.Helper()
	if len(periods) == 0 {
		periods = []string{"year"}
	}
	res, err := sim.Run(context.Background(), m, sim.Config{Paths: 2000, Seed: 99, Year: 2025, Periods: periods,
		Bases: sim.BasesFor(model.Celsius)})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func apply(t *testing.T, s *Scenario, m *model.File) *model.File {
	t.Helper()
	out, err := s.Apply(m, 2025)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// pathDiff returns scenario − baseline of one aggregate, path by path.
func pathDiff(base, scen *sim.Result, k int) []float64 {
	d := make([]float64, len(base.Aggregates[k].Values))
	for i := range d {
		d[i] = scen.Aggregates[k].Values[i] - base.Aggregates[k].Values[i]
	}
	return d
}

const exact = 1e-9 // relative: sums of a few hundred terms in float64

// First principles: where every day is below the heating base, HDD is
// Σ(Tb − T), so a uniform shift of −Δ raises each year's HDD by exactly
// Δ × days, and a D-day cold spell of −Δ by D × Δ; with common random numbers
// this holds path by path.
func TestShiftAndColdSpellAreExactInAColdClimate(t *testing.T) {
	t.Parallel()
	m := coldModel()
	base := simulate(t, m)
	if hottest := slices.Max(base.Aggregates[sim.Hottest].Values); hottest >= 18 {
		t.Fatal("test premise broken: some day reaches the heating base")
	}
	const delta = 1.5
	cases := []struct {
		name string
		s    *Scenario
		want float64
	}{
		{"uniform shift", &Scenario{Name: "cool", Shift: &Shift{Uniform: ptr(-delta)}}, delta * 365},
		{"monthly shift", &Scenario{Name: "cool-jan", Shift: &Shift{Monthly: []float64{-delta, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0}}}, delta * 31},
		{"cold spell", &Scenario{Name: "spell", Events: []Event{{Days: 10, Anomaly: delta, Window: "03-01:10-31"}}}, 10 * delta},
		{"hot spell", &Scenario{Name: "warm-spell", Events: []Event{{Kind: "hot", Days: 4, Anomaly: delta, Start: "06-10"}}}, -4 * delta},
	}
	for _, c := range cases {
		scen := simulate(t, apply(t, c.s, m))
		for i, d := range pathDiff(base, scen, int(sim.HDD)) {
			if math.Abs(d-c.want) > exact*math.Abs(base.Aggregates[sim.HDD].Values[i]) {
				t.Fatalf("%s: path %d HDD changed by %.9f, want exactly %.3f", c.name, i, d, c.want)
			}
		}
	}
}

// Scaling σ by c scales the anomaly path by c (same shocks, X₀ = 0 before
// the burn-in), so the variance of the annual mean anomaly, and of HDD in a
// climate that never reaches the base, scales by c².
func TestVolatilityScaleScalesVarianceBySquare(t *testing.T) {
	t.Parallel()
	m := coldModel()
	const c = 1.3
	base := simulate(t, m)
	scen := simulate(t, apply(t, &Scenario{Name: "x", Volatility: &Volatility{Scale: ptr(c)}}, m))
	vb, vs := stat.Variance(base.Aggregates[sim.HDD].Values, nil), stat.Variance(scen.Aggregates[sim.HDD].Values, nil)
	if math.Abs(vs/vb-c*c) > 1e-6 {
		t.Errorf("variance ratio %.8f, want c² = %.4f", vs/vb, c*c)
	}
}

// Common random numbers: the scenario-minus-baseline difference has a much
// smaller standard error than the difference of two independent runs.
func TestCommonRandomNumbersShrinkTheStandardError(t *testing.T) {
	t.Parallel()
	m := coldModel()
	m.Trend.Intercept = 10 // a climate with both heating and cooling days
	m.Seasonal.Harmonics[0] = model.Harmonic{K: 1, Cos: -10, Sin: -4}
	base := simulate(t, m)
	scen := simulate(t, apply(t, &Scenario{Name: "w", Shift: &Shift{Uniform: ptr(1.0)}}, m))
	bRows, sRows := base.Summarize("C", nil), scen.Summarize("C", nil)
	ch := sim.Compare(base, scen, bRows, sRows)[sim.HDD]
	if ratio := ch.MeanSE / ch.IndependentSE; ratio > 0.1 {
		t.Errorf("paired s.e. %.3f is %.2f of the independent s.e. %.3f; want below 0.1", ch.MeanSE, ratio, ch.IndependentSE)
	}
	if ch.Mean >= 0 {
		t.Errorf("warming by 1 °C changed mean HDD by %+.1f", ch.Mean)
	}
	// A uniform shift moves every path's coldest day by exactly 1 °C: the
	// paired error is rounding noise, reported as 0.
	if c := sim.Compare(base, scen, bRows, sRows)[sim.Coldest]; c.MeanSE != 0 || math.Abs(c.Mean-1) > 1e-9 {
		t.Errorf("coldest day under a 1 °C shift: change %v ± %v, want exactly 1 ± 0", c.Mean, c.MeanSE)
	}
}

func TestTrendChanges(t *testing.T) {
	t.Parallel()
	m := coldModel()
	b := m.Trend.Slope()
	// Moving to 2050 along the trend raises the level by slope × days.
	out := apply(t, &Scenario{Name: "t", Trend: &Trend{TargetYear: ptr(2050)}}, m)
	want := b * float64(calendar.YearStart(2050)-calendar.YearStart(2025))
	if got := out.Trend.Intercept - m.Trend.Intercept; math.Abs(got-want) > 1e-12 {
		t.Errorf("level change %v, want %v", got, want)
	}
	// A new slope keeps the level at the end of the data.
	out = apply(t, &Scenario{Name: "s", Units: "C", Trend: &Trend{SlopePerDecade: ptr(0.5)}}, m)
	end := m.Data.LastDate.ModelTime()
	if a, z := m.Mean(end), out.Mean(end); math.Abs(a-z) > 1e-9 {
		t.Errorf("level at the data end moved from %v to %v", a, z)
	}
	if got := out.Trend.SlopePerYear * 10; math.Abs(got-0.5) > 1e-12 {
		t.Errorf("slope %v per decade, want 0.5", got)
	}
	m.Trend = model.Trend{Kind: "none", Epoch: calendar.Epoch, Intercept: 3}
	if _, err := (&Scenario{Name: "t", Trend: &Trend{TargetYear: ptr(2050)}}).Apply(m, 2025); err == nil {
		t.Error("moving along a trend the model does not have was accepted")
	}
}

func TestPersistenceChanges(t *testing.T) {
	t.Parallel()
	m := coldModel()
	out := apply(t, &Scenario{Name: "p", Persistence: &Persistence{Scale: ptr(1.2), KeepVariance: true}}, m)
	if math.Abs(out.AR.Phi[0]-0.84) > 1e-12 {
		t.Errorf("φ = %v, want 0.84", out.AR.Phi[0])
	}
	// AR(1) stationary variance σ²/(1 − φ²) is kept (standard result).
	v := func(f *model.File) float64 {
		return f.Volatility.Monthly[0] * f.Volatility.Monthly[0] / (1 - f.AR.Phi[0]*f.AR.Phi[0])
	}
	if math.Abs(v(out)/v(m)-1) > 1e-9 {
		t.Errorf("stationary variance %v, was %v", v(out), v(m))
	}
	// And the simulated daily variance agrees.
	one := func(f *model.File) float64 {
		return stat.Variance(simulate(t, f, "05-01:05-01").Aggregates[sim.Coldest].Values, nil)
	}
	if r := one(out) / one(m); math.Abs(r-1) > 0.12 {
		t.Errorf("simulated one-day variance ratio %.3f, want 1", r)
	}
	if _, err := (&Scenario{Name: "p", Persistence: &Persistence{Scale: ptr(1.5)}}).Apply(m, 2025); err == nil ||
		!strings.Contains(err.Error(), "not stationary") {
		t.Errorf("φ = 1.05 accepted: %v", err)
	}
	out = apply(t, &Scenario{Name: "p2", Persistence: &Persistence{Phi: []float64{0.6, 0.1}}}, m)
	if len(out.AR.Last) != 2 || out.AR.Last[0] != 0.5 {
		t.Errorf("AR state not carried to the new order: %v", out.AR.Last)
	}
}

func TestTailChanges(t *testing.T) {
	t.Parallel()
	m := coldModel()
	m.Shocks = model.Shocks{Family: model.FamilyNormal}
	out := apply(t, &Scenario{Name: "t", Tails: &Tails{DF: ptr(5.0)}}, m)
	if out.Shocks.Family != model.FamilyStudentT || out.Shocks.DF != 5 {
		t.Errorf("normal with df = 5 became %+v", out.Shocks)
	}
	out = apply(t, &Scenario{Name: "t", Tails: &Tails{DF: ptr(6.0), Skew: ptr(0.8)}}, m)
	if out.Shocks.Family != model.FamilySkewT || out.Shocks.Skew != 0.8 {
		t.Errorf("got %+v", out.Shocks)
	}
	m.Shocks = model.Shocks{Family: model.FamilyBootstrap, ByMonth: make([][]float64, 12)}
	for i := range m.Shocks.ByMonth {
		m.Shocks.ByMonth[i] = []float64{-1, 1}
	}
	if _, err := (&Scenario{Name: "t", Tails: &Tails{DF: ptr(5.0)}}).Apply(m, 2025); err == nil {
		t.Error("tails on a bootstrap model accepted")
	}
	// Fatter tails lower the 1-in-100 coldest day (more extreme cold days).
	m = coldModel()
	m.Shocks = model.Shocks{Family: model.FamilyNormal}
	base, fat := simulate(t, m), simulate(t, apply(t, &Scenario{Name: "f", Tails: &Tails{DF: ptr(4.0)}}, m))
	b, f := sim.Summarize(base.Aggregates[sim.Coldest].Values, false, nil), sim.Summarize(fat.Aggregates[sim.Coldest].Values, false, nil)
	if f.ReturnLevel(100) >= b.ReturnLevel(100) {
		t.Errorf("1-in-100 coldest day %.2f with ν = 4, %.2f with normal shocks", f.ReturnLevel(100), b.ReturnLevel(100))
	}
}

func TestUnitsConvert(t *testing.T) {
	t.Parallel()
	m := coldModel()
	m.Data.Units = "F"
	out := apply(t, &Scenario{Name: "w", Units: "C", Shift: &Shift{Uniform: ptr(1.0)}}, m)
	if d := out.Trend.Intercept - m.Trend.Intercept; math.Abs(d-1.8) > 1e-12 {
		t.Errorf("1 °C on a °F model shifted by %v °F, want 1.8", d)
	}
}

func TestApplyDoesNotModifyTheModel(t *testing.T) {
	t.Parallel()
	m := coldModel()
	before := m.Volatility.Monthly
	apply(t, &Scenario{Name: "v", Volatility: &Volatility{Scale: ptr(2.0)}, Persistence: &Persistence{Phi: []float64{0.5}}}, m)
	if m.Volatility.Monthly != before || m.AR.Phi[0] != 0.7 {
		t.Error("Apply modified its input")
	}
}

// Every example file in this directory parses, applies and runs; the warming
// one lowers annual HDD and the cold spell raises it.
func TestExampleFiles(t *testing.T) {
	t.Parallel()
	files, _ := filepath.Glob("*.toml")
	if len(files) < 4 {
		t.Fatalf("%d example files, want at least 4", len(files))
	}
	m := coldModel()
	m.Trend.Intercept = 10
	m.Seasonal.Harmonics[0] = model.Harmonic{K: 1, Cos: -10, Sin: -4}
	base := simulate(t, m, "year", "heating", "cooling")
	mean := func(r *sim.Result) float64 { return stat.Mean(r.Aggregates[sim.HDD].Values, nil) }
	for _, f := range files {
		s, err := Load(f)
		if err != nil {
			t.Errorf("%s: %v", f, err)
			continue
		}
		scen := simulate(t, apply(t, s, m), "year", "heating", "cooling")
		switch f {
		case "warming_1c.toml":
			if mean(scen) >= mean(base) {
				t.Errorf("%s does not lower annual HDD", f)
			}
		case "cold_spell.toml":
			if mean(scen) <= mean(base) {
				t.Errorf("%s does not raise annual HDD", f)
			}
		}
	}
}

func TestBuiltinsApplyAndDescribe(t *testing.T) {
	t.Parallel()
	m := coldModel()
	for _, s := range Builtins() {
		if _, err := s.Apply(m, 2025); err != nil {
			t.Errorf("%s: %v", s.Name, err)
		}
		d := strings.Join(s.Describe(), "; ")
		if !strings.ContainsAny(d, "°×φν") && !strings.Contains(d, "climate of") {
			t.Errorf("%s: description without units or symbols: %q", s.Name, d)
		}
	}
	if _, err := Lookup("no-such-thing"); err == nil || !strings.Contains(err.Error(), "warm-1c") {
		t.Errorf("unknown name: %v", err)
	}
}

// Bad scenario files: one case per kind of error, each asserting the file,
// line and key in the message.
func TestBadScenarioFiles(t *testing.T) {
	t.Parallel()
	cases := []struct {
		name, src, want string
	}{
		{"unknown top-level key", "name = \"x\"\nwarmth = 1\n", "bad.toml:2: key warmth: unknown key"},
		{"unknown key in a table", "[shift]\nuniform = 1\nmonthy = [1]\n", "bad.toml:3: key shift.monthy: unknown key; valid keys are uniform, monthly"},
		{"unknown key in an event", "[[event]]\ndays = 3\nanomaly = 2\nstart = \"01-10\"\nlength = 4\n", "bad.toml:5: key event.length: unknown key"},
		{"wrong type", "[shift]\nuniform = \"one\"\n", "bad.toml:2: key shift.uniform:"},
		{"syntax", "[shift\nuniform = 1\n", "bad.toml:2: TOML syntax:"},
		{"shift out of range", "\n[shift]\nuniform = 45\n", "bad.toml:3: key shift.uniform: 45 is out of range"},
		{"monthly length", "[shift]\nmonthly = [1, 2]\n", "bad.toml:2: key shift.monthly: has 2 values, want 12"},
		{"negative scale", "[volatility]\nscale = -1\n", "bad.toml:2: key volatility.scale: -1: a scale must be in (0, 10]"},
		{"df too small", "[tails]\ndf = 2\n", "bad.toml:2: key tails.df: ν = 2"},
		{"skew out of range", "[tails]\nskew = 9\n", "bad.toml:2: key tails.skew"},
		{"phi count", "[persistence]\nphi = []\n", "bad.toml:2: key persistence.phi: has 0 values"},
		{"target year", "[trend]\ntarget_year = 3000\n", "bad.toml:2: key trend.target_year: 3000 is outside"},
		{"event days", "[[event]]\ndays = 0\nanomaly = 5\nstart = \"01-01\"\n", "bad.toml:2: key event.days"},
		{"event window", "[[event]]\ndays = 3\nanomaly = 5\nwindow = \"12-01\"\n", "bad.toml:4: key event.window"},
		{"event both starts", "[[event]]\ndays = 3\nanomaly = 5\nwindow = \"12-01:01-31\"\nstart = \"01-01\"\n", "bad.toml:5: key event.start: give exactly one"},
		// 29 February alone has no day outside a leap year (a run refused
		// it as a usage error without the file's line).
		// Names head the CSV's first column: one line, no formula start.
		{"formula name", "name = \"=HYPERLINK(1)\"\n", "bad.toml:1: key name: \"=HYPERLINK(1)\": want a name that does not start with ="},
		{"two-line name", "name = \"a\\nb\"\n", "bad.toml:1: key name: \"a\\nb\": want one line"},
		{"comma name", "name = \"a,b\"\n", "bad.toml:1: key name: \"a,b\": want one line without commas"},
		{"event on 29 February", "[[event]]\ndays = 3\nanomaly = 5\nstart = \"02-29\"\n", "bad.toml:4: key event.start: \"02-29\" exists only in leap years"},
		{"event window 29 February", "[[event]]\ndays = 3\nanomaly = 5\nwindow = \"02-29:02-29\"\n", "bad.toml:4: key event.window: \"02-29:02-29\" has a day only in leap years"},
		{"event kind", "[[event]]\nkind = \"wet\"\ndays = 3\nanomaly = 5\nstart = \"01-01\"\n", "bad.toml:2: key event.kind"},
		{"probability", "[[event]]\ndays = 3\nanomaly = 5\nstart = \"01-01\"\nprobability = 1.5\n", "bad.toml:5: key event.probability"},
		{"units", "units = \"K\"\n", "bad.toml:1: key units"},
	}
	for _, c := range cases {
		_, err := Parse([]byte(c.src), "bad.toml")
		if err == nil {
			t.Errorf("%s: accepted", c.name)
			continue
		}
		if !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s: error %q, want it to start with %q", c.name, err, c.want)
		}
		if !errors.Is(err, ErrScenario) {
			t.Errorf("%s: error does not wrap ErrScenario", c.name)
		}
	}
}

// An event with probability p happens in a fraction p of the years: in a
// climate that never reaches the heating base, the paths whose HDD rose by
// exactly D × Δ are the years with the event.
func TestEventProbability(t *testing.T) {
	t.Parallel()
	m := coldModel()
	base := simulate(t, m)
	s := &Scenario{Name: "half", Events: []Event{{Days: 5, Anomaly: 2, Window: "03-01:09-30", Probability: ptr(0.3)}}}
	scen := simulate(t, apply(t, s, m))
	hit := 0
	for i, d := range pathDiff(base, scen, int(sim.HDD)) {
		switch {
		case math.Abs(d-10) <= exact*base.Aggregates[sim.HDD].Values[i]:
			hit++
		case math.Abs(d) > exact*base.Aggregates[sim.HDD].Values[i]:
			t.Fatalf("path %d changed by %v: neither 0 nor the whole event", i, d)
		}
	}
	// Binomial(2000, 0.3): sd ≈ 20.5; allow four.
	if n := float64(len(base.Aggregates[sim.HDD].Values)); math.Abs(float64(hit)-0.3*n) > 4*math.Sqrt(n*0.3*0.7) {
		t.Errorf("the event happened in %d of %.0f years, want about %.0f", hit, n, 0.3*n)
	}
}

// A monthly volatility scale changes only its month: with (almost) no
// persistence, scaling January's σ by c scales the spread of January's HDD
// by c (same shocks, a climate below the base) and leaves July's alone.
func TestMonthlyVolatilityScale(t *testing.T) {
	t.Parallel()
	m := coldModel()
	m.AR.Phi = []float64{0.0001} // no carry-over between days: January alone is scaled
	ms := []float64{1.5, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1}
	base := simulate(t, m, "jan", "jul")
	scen := simulate(t, apply(t, &Scenario{Name: "jan", Volatility: &Volatility{MonthlyScale: ms}}, m), "jan", "jul")
	sd := func(r *sim.Result, k int) float64 { return stat.StdDev(r.Aggregates[k].Values, nil) }
	jan, jul := int(sim.HDD), len(base.Aggregates)/2+int(sim.HDD)
	if r := sd(scen, jan) / sd(base, jan); math.Abs(r-1.5) > 1e-3 {
		t.Errorf("January HDD sd ratio %.4f, want 1.5", r)
	}
	if r := sd(scen, jul) / sd(base, jul); math.Abs(r-1) > 1e-3 {
		t.Errorf("July HDD sd ratio %.4f, want 1", r)
	}
}

func TestDescribeForWorksOutTheTrendShift(t *testing.T) {
	t.Parallel()
	m := coldModel() // slope 0.02 °C a year
	lines := strings.Join((&Scenario{Name: "t", Trend: &Trend{TargetYear: ptr(2050)}}).DescribeFor(m, 2025), "; ")
	// 25 years (9131 days) at 0.02/365.25 °C a day: +0.50 °C.
	if !strings.Contains(lines, "level +0.50 °C against 2025") {
		t.Errorf("description %q", lines)
	}
}
