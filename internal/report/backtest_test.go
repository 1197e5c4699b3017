package report

import (
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"wxstress/backtest"
	"wxstress/evidence"
	"wxstress/sim"
)

// TestBacktestReport renders a backtest of hand-made cases: one PIT
// histogram and one band plot per row, the verdicts, and the title escaped.
func TestBacktestReport(t *testing.T) {
	t.Parallel()
	r := rand.New(rand.NewPCG(3, 4))
	var rows []backtest.Row
	for _, period := range []string{"year", "heating"} {
		row := backtest.Row{Index: sim.HDD, Period: period}
		var cases []evidence.Case
		for y := 2000; y < 2020; y++ {
			sample := make([]float64, 200)
			for i := range sample {
				sample[i] = 3000 + 150*r.NormFloat64()
			}
			obs := 3000 + 150*r.NormFloat64()
			row.Origins = append(row.Origins, backtest.Origin{Year: y, Realized: obs, PIT: evidence.PIT(sample, obs),
				P05: 2750, P50: 3000, P95: 3250})
			cases = append(cases, evidence.Case{Sample: sample, Observed: obs})
		}
		ev, err := evidence.Evaluate(cases)
		if err != nil {
			t.Fatal(err)
		}
		row.Evidence = ev
		rows = append(rows, row)
	}
	res := &backtest.Result{Options: backtest.Options{Origins: 20, Paths: 200, Bases: sim.BasesFor("C")}, Rows: rows}
	var b strings.Builder
	err := WriteBacktest(&b, res, BacktestMeta{Title: "Backtest of <b>x</b>", Created: time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC), Units: "C"})
	if err != nil {
		t.Fatal(err)
	}
	page := b.String()
	if n := strings.Count(page, "<svg"); n != 4 {
		t.Errorf("%d plots, want 2 per row", n)
	}
	if strings.Contains(page, "<b>x</b>") || !strings.Contains(page, "&lt;b&gt;x&lt;/b&gt;") {
		t.Error("the title is not escaped")
	}
	for _, row := range rows {
		if !strings.Contains(page, row.Evidence.Verdict) {
			t.Errorf("verdict of %s missing", row.Period)
		}
	}
}
