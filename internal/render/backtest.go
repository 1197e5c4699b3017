package render

import (
	"encoding/json"
	"fmt"
	"io"
	"strings"

	"wxstress/backtest"
	"wxstress/internal/numfmt"
	"wxstress/model"
	"wxstress/sim"
)

// BacktestTables writes a backtest's summary: per index and period the
// coverage of the central 50 % and 90 % bands, the tests of the PITs, the
// CRPS of the model and of the earlier seasons' climatology, and a verdict.
func BacktestTables(w io.Writer, r *backtest.Result, file, units string) error {
	e := &errWriter{w: w}
	o := r.Options
	e.printf("%s\n", Wrap(fmt.Sprintf("Backtest of %s: the last %d complete periods of each kind, each fitted on the data "+
		"to the day before it and simulated %s times from that day (conditional start); bases HDD %s, CDD %s °%s",
		file, o.Origins, numfmt.Number(float64(o.Paths)), numfmt.Number(o.Bases.HDD), numfmt.Number(o.Bases.CDD), units), "  "))
	demandUnit := ""
	if o.Demand != nil {
		demandUnit = o.Demand.Unit
	}
	rows := [][]string{}
	for _, row := range r.Rows {
		ev := row.Evidence
		rows = append(rows, []string{
			row.Index.Info().Name, row.Period, row.Index.Info().Unit(model.Units(units), demandUnit), fmt.Sprint(len(row.Origins)),
			fmt.Sprintf("%d/%d (p %s)", ev.Central50.Inside, ev.Cases, PValue(ev.Central50.P)),
			fmt.Sprintf("%d/%d (p %s)", ev.Central90.Inside, ev.Cases, PValue(ev.Central90.P)),
			PValue(ev.KS.P), Num(ev.ProbitSD, 2), TableNum(ev.MeanCRPS), TableNum(ev.MeanRefCRPS),
		})
	}
	e.table([]string{"index", "period", "unit", "origins", "inside 50% band", "inside 90% band", "KS p (PIT)", "sd of probit(PIT)",
		"CRPS model", "CRPS climatology"}, rows)
	for _, row := range r.Rows {
		e.printf("%s\n", Wrap(fmt.Sprintf("  %s, %s: %s", row.Index.Info().Name, row.Period, strings.ReplaceAll(row.Evidence.Verdict, "(expected ", "(expected"+Glue)), "    "))
	}
	e.printf("\n%s\n", Wrap("A calibrated model puts about half the realised values inside its central 50 % band and nine in "+
		"ten inside its 90 % band; the sd of probit(PIT), taken about its own mean, is then about 1 (above 1: too "+
		"narrow; a bias shows in the verdict instead). CRPS (Gneiting & Raftery 2007) is lower for the better forecast; "+
		"the climatology is the distribution of the earlier seasons as they were (not moved along the trend, so part "+
		"of the model's gain on a warming record is its trend), or of all the other tested seasons when fewer than "+
		"two came before (it then sees later years).", ""))
	for _, row := range r.Rows {
		if row.Index >= sim.Energy {
			e.printf("%s\n", Wrap("The demand model is fitted once, on the whole load record: the demand rows' held-out "+
				"seasons were in its fit, so they are not fully out of sample.", ""))
			break
		}
	}
	e.printf("\n%s\n", Wrap(Caution, ""))
	return e.err
}

// BacktestJSON writes the backtest as JSON: a top-level "backtest" array,
// one object per index and period.
func BacktestJSON(w io.Writer, r *backtest.Result, manifest any) error {
	type origin struct {
		Year     int     `json:"year"`
		Realized float64 `json:"realized"`
		PIT      float64 `json:"pit"`
		P05      float64 `json:"p05"`
		P50      float64 `json:"p50"`
		P95      float64 `json:"p95"`
		Missing  int     `json:"missing_days"`
	}
	type row struct {
		Index     string             `json:"index"`
		Period    string             `json:"period"`
		Origins   []origin           `json:"origins"`
		Coverage  map[string]float64 `json:"coverage"`
		CoverageP map[string]float64 `json:"coverage_p"`
		KSP       float64            `json:"ks_p"`
		ProbitSD  float64            `json:"probit_sd"`
		CRPS      float64            `json:"crps"`
		CRPSClim  float64            `json:"crps_climatology"`
		Verdict   string             `json:"verdict"`
	}
	out := struct {
		Manifest any   `json:"manifest"`
		Backtest []row `json:"backtest"`
	}{Manifest: manifest, Backtest: []row{}}
	for _, r := range r.Rows {
		ev := r.Evidence
		j := row{Index: r.Index.Info().Key, Period: r.Period,
			Coverage:  map[string]float64{"50": ev.Central50.Rate(), "90": ev.Central90.Rate()},
			CoverageP: map[string]float64{"50": ev.Central50.P, "90": ev.Central90.P},
			KSP:       ev.KS.P, ProbitSD: ev.ProbitSD, CRPS: ev.MeanCRPS, CRPSClim: ev.MeanRefCRPS, Verdict: ev.Verdict}
		for _, o := range r.Origins {
			j.Origins = append(j.Origins, origin{o.Year, o.Realized, o.PIT, o.P05, o.P50, o.P95, o.Missing})
		}
		out.Backtest = append(out.Backtest, j)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(out)
}
