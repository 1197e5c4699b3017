package stress

import (
	"strings"
	"testing"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/hedge"
	"wxstress/model"
	"wxstress/sim"
)

// TestCheckRecord: a record beside a model is refused when it sits many of
// the model's anomaly sds from the model's expected temperatures (the same
// station's record in the other unit scale), and taken when it is the
// model's climate.
func TestCheckRecord(t *testing.T) {
	m := &model.File{
		Data:       model.Data{Units: "C"},
		Trend:      model.Trend{Kind: "none", Epoch: calendar.Epoch, Intercept: 10},
		Seasonal:   model.Seasonal{PeriodDays: calendar.DaysPerYear, Harmonics: []model.Harmonic{{K: 1}}},
		AR:         model.AR{Phi: []float64{0.7}},
		Volatility: model.Volatility{Kind: "monthly"},
	}
	for k := range 12 {
		m.Volatility.Monthly[k] = 2.5
	}
	// anomaly sd: 2.5/√(1 − 0.49) = 3.5 °C
	series := func(v float64) *calibrate.Series {
		s := &calibrate.Series{Name: "obs.csv", Start: calendar.FromYMD(2020, 1, 1), Units: "C"}
		for range 90 {
			s.Temps = append(s.Temps, v)
		}
		return s
	}
	if err := checkRecord(m, series(12)); err != nil {
		t.Errorf("a record 2 °C off the model's mean refused: %v", err)
	}
	err := checkRecord(m, series(50)) // 10 °C in °F
	if err == nil || !strings.Contains(err.Error(), "obs.csv") || !strings.Contains(err.Error(), "in °F") {
		t.Errorf("a °F record on a °C model: %v", err)
	}
	if err := checkRecord(m, series(-20)); err == nil || !strings.Contains(err.Error(), "another station") {
		t.Errorf("a record 30 °C off (not a unit mix-up): %v", err)
	}
}

// TestHedgeOverlap: a contract whose period shares no day with the
// exposure's (December of the target year, in a book for the heating season
// that ends in March of it) is named; one inside it is not.
func TestHedgeOverlap(t *testing.T) {
	ps := []sim.Period{
		{Name: "heating", From: calendar.FromYMD(2025, 11, 1), To: calendar.FromYMD(2026, 3, 31)},
		{Name: "dec", From: calendar.FromYMD(2026, 12, 1), To: calendar.FromYMD(2026, 12, 31)},
		{Name: "jan", From: calendar.FromYMD(2026, 1, 1), To: calendar.FromYMD(2026, 1, 31)},
	}
	f := &hedge.File{Exposure: &hedge.Exposure{Index: "energy", Period: "heating"},
		Contracts: []hedge.Contract{{Name: "dec swap", Period: "dec"}, {Name: "jan swap", Period: "jan"}}}
	got := hedgeOverlap(f, ps)
	if len(got) != 1 || !strings.Contains(got[0], `"dec swap" reads dec (2026-12-01 to 2026-12-31), which shares no day`) {
		t.Errorf("warnings %q", got)
	}
}

// TestUnderWayWarnings: a period that began before the data end is named,
// with its recorded days, when a climate start simulates them afresh (a
// record ending on 31 December and the default heating season of the next
// year, the usual case); periods wholly after the data end or wholly in the
// record, a conditional start and a season under way draw nothing.
func TestUnderWayWarnings(t *testing.T) {
	m := &model.File{Data: model.Data{LastDate: calendar.FromYMD(2025, 12, 31)}}
	ps := []sim.Period{
		{Name: "year", From: calendar.FromYMD(2026, 1, 1), To: calendar.FromYMD(2026, 12, 31)},
		{Name: "heating", From: calendar.FromYMD(2025, 11, 1), To: calendar.FromYMD(2026, 3, 31)},
		{Name: "nov", From: calendar.FromYMD(2025, 11, 1), To: calendar.FromYMD(2025, 11, 30)},
	}
	got := underWayWarnings(m, sim.Config{Year: 2026}, ps)
	if len(got) != 1 || !strings.HasPrefix(got[0], "heating (2025-11-01 to 2026-03-31) began before the data end (2025-12-31): "+
		"a climate start simulates its first 61 days afresh") || !strings.Contains(got[0], "--year 2027 gives the next season") {
		t.Errorf("climate start: %q", got)
	}
	if got := underWayWarnings(m, sim.Config{Year: 2026, Start: sim.StartConditional}, ps); got != nil {
		t.Errorf("conditional start: %q", got)
	}
	if got := underWayWarnings(m, sim.Config{Year: 2026, Observed: &sim.Observed{}}, ps); got != nil {
		t.Errorf("season under way: %q", got)
	}
	// A season under way asked for with --year naming a later season: the
	// observed days count for nothing, and the run says so.
	later := []sim.Period{{Name: "heating", From: calendar.FromYMD(2026, 11, 1), To: calendar.FromYMD(2027, 3, 31)}}
	if got := underWayWarnings(m, sim.Config{Year: 2027, Observed: &sim.Observed{}}, later); len(got) != 1 ||
		!strings.HasPrefix(got[0], "no period of this run was under way at the data end (2025-12-31)") {
		t.Errorf("observed record, later season: %q", got)
	}
}
