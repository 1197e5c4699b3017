package render

import (
	"fmt"
	"math"

	"wxstress/internal/numfmt"
	"wxstress/sim"
	"wxstress/stress"
)

// BandTable lays out the parameter-uncertainty bands of the baseline's main
// tail numbers: each value with its 90 % confidence band from the
// parametric bootstrap. The terminal and the HTML report show the same
// cells.
func BandTable(rows []sim.Row, bands []stress.RowBands, refits int) (title string, header []string, cells [][]string) {
	title = fmt.Sprintf("Parameter uncertainty: %d %% bands from %d refits to synthetic records of the fitted model (parametric bootstrap)",
		int(math.Round(100*stress.BandLevel)), refits)
	// VaR 95 % is the 1-in-20 level of a yearly index: one column serves
	// both (the JSON has both).
	header = []string{"index", "period", "unit", "mean", "ES 95%", "1-in-20", "1-in-50"}
	cell := func(v float64, b stress.Band) string {
		// To the precision the band supports: its width's twentieth
		// (a band of ±220 000 GJ shows ten-thousands, not units).
		p := (b.Hi - b.Lo) / 20
		if !(p > 0) {
			p = math.NaN()
		}
		return fmt.Sprintf("%s [%s to %s]", numfmt.Value(v, p), numfmt.Value(b.Lo, p), numfmt.Value(b.Hi, p))
	}
	for k, r := range rows {
		if k >= len(bands) || r.Index == sim.PeakDay || rare(r.Tail) {
			continue
		}
		b, t := bands[k], r.Tail
		cells = append(cells, []string{r.Name, r.Period, r.Unit, cell(t.Mean, b.Mean), cell(t.ES95, b.ES95),
			cell(t.ReturnLevel(20), b.RL20), cell(t.ReturnLevel(50), b.RL50)})
	}
	return title, header, cells
}

func writeBands(e *errWriter, r *SimReport) {
	if r.Mixed {
		e.printf("\nParameter uncertainty is in the tables above: the paths were spread over %d models refitted to synthetic\n"+
			"records of the fitted model (parametric bootstrap), so the tails are the predictive distribution.\n", r.Refits)
	}
	if len(r.Bands) == 0 {
		return
	}
	title, header, cells := BandTable(r.Rows, r.Bands, r.Refits)
	e.printf("\n%s\n", title)
	e.table(header, cells)
	e.printf("  Each number is the fitted model's; the band is the basic bootstrap interval from models refitted to " +
		"synthetic records like this one (each simulated with the same seed), which corrects the refits' shared bias.\n")
}

type jsonBand struct {
	Lo float64 `json:"lo"`
	Hi float64 `json:"hi"`
}

type jsonRowBands struct {
	Mean  jsonBand `json:"mean"`
	VaR95 jsonBand `json:"var95"`
	ES95  jsonBand `json:"es95"`
	RL20  jsonBand `json:"return_level_20"`
	RL50  jsonBand `json:"return_level_50"`
}

func toJSONBands(b stress.RowBands) *jsonRowBands {
	j := func(x stress.Band) jsonBand { return jsonBand{x.Lo, x.Hi} }
	return &jsonRowBands{j(b.Mean), j(b.VaR95), j(b.ES95), j(b.RL20), j(b.RL50)}
}
