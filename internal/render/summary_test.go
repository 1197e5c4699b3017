package render

import (
	"strings"
	"testing"

	"wxstress/hedge"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

// TestScaleUnit checks the units of large values: SI prefixes for joules
// and watt-hours (the SI prefixes of the BIPM SI Brochure, 9th edition;
// its table number from memory: 7), words otherwise.
func TestScaleUnit(t *testing.T) {
	for _, c := range []struct {
		unit string
		big  float64
		f    float64
		want string
	}{
		{"GJ", 20.7e6, 1e3, "TJ"},
		{"GJ/day", 999_999, 1, "GJ/day"},
		{"MWh/day", 3e6, 1e3, "GWh/day"},
		{"kWh", 4e9, 1e6, "GWh"},
		{"J", 2e6, 1e3, "kJ"},
		{"therm", 5e6, 1e3, "thousand therm"},
		{"MMBtu", 5e9, 1e6, "million MMBtu"},
		{"°C·day", 3e3, 1, "°C·day"},
	} {
		f, u := ScaleUnit(c.unit, c.big)
		if f != c.f || u != c.want {
			t.Errorf("ScaleUnit(%q, %g) = %g, %q; want %g, %q", c.unit, c.big, f, u, c.f, c.want)
		}
	}
}

// TestOccurs checks which rows the summary keeps: heating figures not for
// the cooling season, cooling figures not for the heating season, nothing
// that is zero nineteen years in twenty, everything else; and, by their own
// degree days, heating figures not for July (HDD 4.8 against CDD 230, New
// York 2016) nor cooling figures for January, both kinds for the year.
func TestOccurs(t *testing.T) {
	some := sim.Summarize([]float64{10, 20, 30, 40, 50, 60, 70, 80, 90, 100}, true, nil)
	zero := sim.Summarize(make([]float64, 40), true, nil)
	withMean := func(m float64) sim.Tail { t := some; t.Mean = m; return t }
	rows := []sim.Row{
		{Index: sim.HDD, Period: "jul", Tail: withMean(4.8)}, {Index: sim.CDD, Period: "jul", Tail: withMean(230)},
		{Index: sim.HDD, Period: "jan", Tail: withMean(560)}, {Index: sim.CDD, Period: "jan", Tail: withMean(3)},
		{Index: sim.HDD, Period: "year", Tail: withMean(3026)}, {Index: sim.CDD, Period: "year", Tail: withMean(309)},
		{Index: sim.HDD, Period: "heating", Tail: withMean(2148)}, {Index: sim.CDD, Period: "heating", Tail: withMean(0.4)},
		{Index: sim.HDD, Period: "cooling", Tail: withMean(220)}, {Index: sim.CDD, Period: "cooling", Tail: withMean(307)},
	}
	for _, c := range []struct {
		x      sim.Index
		period string
		tail   sim.Tail
		want   bool
	}{
		{sim.HDD, "heating", some, true},
		{sim.HDD, "cooling", some, false},
		{sim.CDD, "heating", some, false},
		{sim.CDD, "cooling", some, true},
		{sim.Coldest, "cooling", some, false},
		{sim.Coldest, "year", some, true},
		{sim.CDD, "dec", some, true},
		{sim.CDD, "dec", zero, false},
		{sim.Energy, "cooling", some, true},
		{sim.HDD, "jul", some, false},
		{sim.Coldest, "jul", some, false},
		{sim.CDD, "jul", some, true},
		{sim.CDD, "jan", some, false},
		{sim.Coldest, "jan", some, true},
		{sim.CDD, "year", some, true},
		{sim.HDD, "year", some, true},
	} {
		if got := occurs(sim.Row{Index: c.x, Period: c.period, Tail: c.tail}, rows); got != c.want {
			t.Errorf("%v, %s: occurs %v, want %v", c.x.Info().Key, c.period, got, c.want)
		}
	}
	// A southern station: its "heating" (November to March) is its summer,
	// its "cooling" (May to September) its winter; the degree days decide.
	south := []sim.Row{
		{Index: sim.HDD, Period: "heating", Tail: withMean(12)}, {Index: sim.CDD, Period: "heating", Tail: withMean(610)},
		{Index: sim.HDD, Period: "cooling", Tail: withMean(1400)}, {Index: sim.CDD, Period: "cooling", Tail: withMean(25)},
	}
	for _, c := range []struct {
		x      sim.Index
		period string
		want   bool
	}{{sim.Coldest, "heating", false}, {sim.CDD, "heating", true}, {sim.Coldest, "cooling", true}, {sim.CDD, "cooling", false}} {
		if got := occurs(sim.Row{Index: c.x, Period: c.period, Tail: some}, south); got != c.want {
			t.Errorf("southern %v, %s: occurs %v, want %v", c.x.Info().Key, c.period, got, c.want)
		}
	}
}

// TestCapacityWords checks the summary's plain words for each kind of
// capacity target (--capacity-target).
func TestCapacityWords(t *testing.T) {
	for in, want := range map[string]string{
		"peak:1-in-20":  "for the 1-in-20 peak day",
		"peak:1-in-2.5": "for the 1-in-2.5 peak day",
		"days:1":        "with at most 1 day a year over it on average",
		"days:0.5":      "with at most 0.5 days a year over it on average",
		"any:0.05":      "with a 5.0% chance a year of any day over it",
		"nonsense":      "for nonsense",
	} {
		if got := capacityWords(in); got != want {
			t.Errorf("%s: %q, want %q", in, got, want)
		}
	}
}

// TestRecordWarnings: the summary warns of a record mean outside the
// model's band only when its resampling p-value is below 0.05/(2k) for the
// two checks on each of k rows (Bonferroni), and of record seasons beyond every simulated
// year only when Σ n/(n + m) over those rows, the chance that a right model
// shows one, is below 5 %.
func TestRecordWarnings(t *testing.T) {
	coldest := stress.HistoryRow{Period: "year", Index: sim.Coldest, Values: []float64{-1.9, -3.5, -3.8, -0.2}, P95: -0.5,
		Mean: -2.35, ModelMean: -0.6, MeanBand: [2]float64{-2.0, 0.6}, MeanVerdict: "model too mild", MeanP: 0.004,
		SDVerdict: "inside", SDP: 0.5}
	cdd := stress.HistoryRow{Period: "year", Index: sim.CDD, Values: make([]float64, 71), P95: 400, ModelMean: 309,
		MeanVerdict: "inside", MeanP: 0.4, SDVerdict: "inside", SDP: 0.6, Worst: []stress.WorstSeason{{Year: 2019, Value: 621.6}}}
	h := &stress.HistoricalSeasons{Paths: 10000, Rows: []stress.HistoryRow{coldest, cdd}}
	got := strings.Join(recordWarnings(h, model.Celsius), "\n")
	for _, want := range []string{
		"the model is off in level: the record's mean lies outside its band (p below 0.05/4, 4 checks on 2 rows) " +
			"for coldest day, year -2.4" + Glue + "°C against -2.0 to 0.6" + Glue + "°C over 4 seasons (model too mild, p 0.004)",
		"beyond all 10,000 simulated years",
		"CDD, year 2019 (621.6" + Glue + "°C·day)",
		"this long would show that 0.74% of the time over the 2 rows checked", // 4/10 004 + 71/10 071
	} {
		if !strings.Contains(got, want) {
			t.Errorf("warnings lack %q:\n%s", want, got)
		}
	}
	// p 0.02 is below 0.05 but not below 0.05/4 (a mean and an sd on each
	// of two rows).
	h.Rows[0].MeanP = 0.02
	if got := strings.Join(recordWarnings(h, model.Celsius), "\n"); strings.Contains(got, "off in level") {
		t.Errorf("warned of level at p 0.02 over four checks:\n%s", got)
	}
	h.Paths = 1000 // 4/1004 + 71/1071 = 7.0 %: a right model shows that too often to say
	if got := strings.Join(recordWarnings(h, model.Celsius), "\n"); strings.Contains(got, "beyond all") {
		t.Errorf("warned of a season beyond 1 000 paths in a 71-season record:\n%s", got)
	}
}

// TestTargetSE: the error a Monte Carlo warning aims at reads apart from
// the one it has.
func TestTargetSE(t *testing.T) {
	for _, c := range []struct {
		se, target float64
		want       string
	}{{11.4, 10.6, "± 10.6"}, {17, 10.6, "± 11"}, {0.0123, 0.0118, "± 0.0118"}, {2400, 1600, "± 1,600"}, {2440, 2360, "± 2,360"}} {
		if got := targetSE(c.se, c.target); got != c.want {
			t.Errorf("targetSE(%v, %v) = %q, want %q", c.se, c.target, got, c.want)
		}
	}
}

// TestSmallSampleCautions: figures from a handful of seasons say so. A burn
// price from 3 seasons carries sd/√3; one from 30 none; the record's P5 /
// P95 of 4 seasons is not shown; a worst season most simulated years match
// is "not rare", not "1 in 2 or less".
func TestSmallSampleCautions(t *testing.T) {
	h := &hedge.Result{Contracts: []hedge.ContractResult{
		{Contract: hedge.Contract{Name: "jan swap"}, SD: 120000, Seasons: 3, BurnSE: 69282},
		{Contract: hedge.Contract{Name: "heating call"}, SD: 50000, Seasons: 30, BurnSE: 9000},
	}}
	if got := BurnNote(h); !strings.Contains(got, "jan swap from 3, ± 69,282") || strings.Contains(got, "heating call") {
		t.Errorf("burn note %q", got)
	}
	h.Contracts = h.Contracts[1:]
	if got := BurnNote(h); got != "" {
		t.Errorf("burn note from 30 seasons: %q", got)
	}
	if got := recordP5P95(stress.HistoryRow{Values: make([]float64, 4), P5: -3.7, P95: -0.3}); got != "—" {
		t.Errorf("P5 / P95 of 4 seasons: %q", got)
	}
	if got := recordP5P95(stress.HistoryRow{Values: make([]float64, 10), P5: -3.7, P95: -0.3}); got != "-3.7 / -0.3" {
		t.Errorf("P5 / P95 of 10 seasons: %q", got)
	}
	if got := oneIn(0.954); !strings.HasPrefix(got, "not rare") {
		t.Errorf("oneIn(0.954) = %q", got)
	}
}

// TestApartDecimals: a value outside a band reads apart from the edge it
// passes ("3.3 against 2.4–3.3" said nothing); inside, or already apart,
// the decimals stay.
func TestApartDecimals(t *testing.T) {
	for _, c := range []struct {
		d    int
		v    float64
		band [2]float64
		want int
	}{
		{1, 3.32, [2]float64{2.41, 3.30}, 2},
		{1, 3.5, [2]float64{2.2, 3.0}, 1},
		{1, 3.0, [2]float64{2.2, 3.1}, 1},     // inside
		{1, -2.04, [2]float64{-2.03, 0.6}, 2}, // below, -2.0 against -2.0
		{1, 3.30001, [2]float64{2, 3.3}, 4},   // at most four decimals
	} {
		if got := apartDecimals(c.d, c.v, c.band); got != c.want {
			t.Errorf("apartDecimals(%d, %v, %v) = %d, want %d", c.d, c.v, c.band, got, c.want)
		}
	}
}

// TestSaturatedCapacityWarned: a days target whose solve ran out of counted
// days in some years is too low, and the summary says so (it was a
// footnote of --detail only).
func TestSaturatedCapacityWarned(t *testing.T) {
	r := &SimReport{Capacities: []stress.CapacityRow{{Target: "days:10", Period: "heating", Capacity: 80000, Saturated: 0.02}}}
	got := strings.Join(summaryWarnings(r, nil), "\n")
	if !strings.Contains(got, "capacity days:10, heating: 2.0% of the years have more days over it than a solve counts") {
		t.Errorf("warnings %q", got)
	}
}

// TestSpreadWarningOneLine: the windows whose spread lies outside the
// model's band are one warning, as the fit says it (four near-identical
// lines before).
func TestSpreadWarningOneLine(t *testing.T) {
	m := &model.File{Diagnostics: &model.Diagnostics{Spread: []model.WindowSpread{
		{Days: 30, Verdict: "too narrow"}, {Days: 91, Verdict: "inside"}, {Days: 151, Verdict: "too narrow"}, {Days: 365, Verdict: "too narrow"},
	}}}
	got := summaryWarnings(&SimReport{}, m)
	if len(got) != 1 || got[0] != "the record's spread over 30, 151 and 365 days lies outside the model's band (model too narrow)" {
		t.Errorf("warnings %q", got)
	}
}
