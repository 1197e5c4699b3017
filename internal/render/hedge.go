package render

import (
	"fmt"
	"math"
	"strings"

	"wxstress/hedge"
	"wxstress/internal/numfmt"
)

// money writes an amount of currency for a table: whole units with
// thousands separators.
func money(v float64) string {
	if math.IsNaN(v) {
		return "—"
	}
	return numfmt.Fixed(v, 0)
}

// HedgeTables lays out a hedge evaluation: the contracts' payout
// distributions and prices, and the position's net cost unhedged and
// hedged with the minimum-variance quantities. The terminal and the HTML
// report show the same cells.
func HedgeTables(h *hedge.Result, f *hedge.File) (contracts, position [][]string, contractHead, positionHead []string) {
	cur := f.Currency
	// Every money column names the currency: a wide table is printed in
	// parts, and each part must read alone.
	contractHead = []string{"contract", "reads", "mean payout (" + cur + ")", "sd (" + cur + ")", "P5 / P50 / P95 / P99 (" + cur + ")",
		"P(payout > 0)", fmt.Sprintf("loaded, %s (λ = %g)", cur, h.Options.Loading), fmt.Sprintf("%g quantile (%s)", h.Options.Level, cur),
		"burn, " + cur + " (seasons)"}
	for _, c := range h.Contracts {
		burn := "—"
		if c.Seasons > 0 {
			burn = fmt.Sprintf("%s (%d)", money(c.Burn), c.Seasons)
		}
		contracts = append(contracts, []string{c.Contract.Name, fmt.Sprintf("%s %s, %s", c.Contract.Index, c.Contract.Period, c.Contract.Kind),
			money(c.Mean), money(c.SD), fmt.Sprintf("%s / %s / %s / %s", money(c.P5), money(c.P50), money(c.P95), money(c.P99)),
			numfmt.Percent(c.ProbPayout), money(c.LoadedPrice), money(c.QuantilePrice), burn})
	}
	positionHead = []string{"net cost (" + cur + ")", "mean", "sd", "VaR 95%", "ES 95%", "ES 99%"}
	row := func(name string, r hedge.Risk) []string {
		return []string{name, money(r.Mean), money(r.SD), money(r.VaR95), money(r.ES95), money(r.ES99)}
	}
	position = append(position, row("unhedged", h.Unhedged), row("hedged as in the file", h.Hedged))
	for _, c := range h.Contracts {
		if q := c.MinVar.Quantity; !math.IsNaN(q) {
			position = append(position, row(fmt.Sprintf("%s alone, × %.2f", c.Contract.Name, q), c.MinVar.Net))
		}
	}
	return contracts, position, contractHead, positionHead
}

// BurnNote cautions about burn prices from fewer than 10 seasons, with the
// standard error of each, sd/√n of the seasons' own payouts (not the run's
// payout sd, which a run from the data end narrows). Empty when every burn
// price rests on 10 seasons or more.
func BurnNote(h *hedge.Result) string {
	var parts []string
	for _, c := range h.Contracts {
		if c.Seasons > 0 && c.Seasons < 10 {
			se := "± " + money(c.BurnSE)
			switch {
			case c.Seasons == 1:
				se = "no error from one season"
			case math.IsNaN(c.BurnSE):
				se = "every season paid the same: its error not estimable"
			}
			parts = append(parts, fmt.Sprintf("%s from %d, %s", c.Contract.Name, c.Seasons, se))
		}
	}
	if len(parts) == 0 {
		return ""
	}
	return "Burn prices from fewer than 10 seasons are a rough guide (" + strings.Join(parts, "; ") +
		": the standard error sd/√n of the seasons' own payouts)."
}

// writeHedge writes the hedge evaluation to the terminal.
func writeHedge(e *errWriter, r *SimReport) {
	if r.Hedge == nil {
		return
	}
	contracts, position, ch, ph := HedgeTables(r.Hedge, r.HedgeFile)
	e.printf("\nHedges (a statistical evaluation on the simulated years, not a price quote or advice)\n")
	if len(contracts) > 0 {
		e.table(ch, contracts)
		e.printf("  Payouts are for one contract bought; the burn price is the mean payout over the record's seasons " +
			"moved to the target year's trend level.\n")
		if n := BurnNote(r.Hedge); n != "" {
			e.printf("  %s\n", n)
		}
		if r.Manifest.Start == "conditional" {
			e.printf("  This run starts from the data end (and the season so far, when observed), so its payouts are " +
				"conditional on today's state; the burn price, from whole past seasons, is not.\n")
		}
	}
	e.table(ph, position)
	if len(position) > 2 {
		e.printf("  \"alone, × q\": that contract without the others, at its minimum-variance quantity q.\n")
	}
	if !math.IsNaN(r.Hedge.VarianceReduction) {
		e.printf("  The hedges in the file %s.\n", VarianceChange(r.Hedge.VarianceReduction, "the net cost's variance"))
	}
}

// jsonHedge is the hedge evaluation in the JSON output.
type jsonHedge struct {
	Currency          string         `json:"currency"`
	Loading           float64        `json:"loading"`
	QuantileLevel     float64        `json:"quantile_level"`
	Unhedged          jsonRisk       `json:"unhedged"`
	Hedged            jsonRisk       `json:"hedged"`
	VarianceReduction *float64       `json:"variance_reduction"`
	Contracts         []jsonContract `json:"contracts"`
}

type jsonRisk struct {
	Mean  float64 `json:"mean"`
	SD    float64 `json:"sd"`
	VaR95 float64 `json:"var95"`
	ES95  float64 `json:"es95"`
	ES99  float64 `json:"es99"`
}

type jsonContract struct {
	Name                 string             `json:"name"`
	Index                string             `json:"index"`
	Period               string             `json:"period"`
	Kind                 string             `json:"kind"`
	Mean                 float64            `json:"mean_payout"`
	MeanSE               float64            `json:"mean_payout_se"`
	SD                   float64            `json:"sd"`
	Quantiles            map[string]float64 `json:"quantiles"`
	ProbPayout           float64            `json:"probability_of_payout"`
	LoadedPrice          float64            `json:"loaded_price"`
	QuantilePrice        float64            `json:"quantile_price"`
	Burn                 *float64           `json:"burn_price"`
	BurnSE               *float64           `json:"burn_price_se"`
	BurnSeasons          int                `json:"burn_seasons"`
	MinVarianceQuantity  *float64           `json:"min_variance_quantity"`
	MinVarianceNet       *jsonRisk          `json:"min_variance_net,omitempty"`
	MinVarianceReduction *float64           `json:"min_variance_reduction"`
}

func toJSONRisk(r hedge.Risk) jsonRisk { return jsonRisk{r.Mean, r.SD, r.VaR95, r.ES95, r.ES99} }

func toJSONHedge(r *SimReport) *jsonHedge {
	h := r.Hedge
	if h == nil {
		return nil
	}
	j := &jsonHedge{Currency: r.HedgeFile.Currency, Loading: h.Options.Loading, QuantileLevel: h.Options.Level,
		Unhedged: toJSONRisk(h.Unhedged), Hedged: toJSONRisk(h.Hedged), VarianceReduction: finitePtr(h.VarianceReduction)}
	for _, c := range h.Contracts {
		jc := jsonContract{Name: c.Contract.Name, Index: c.Contract.Index, Period: c.Contract.Period, Kind: string(c.Contract.Kind),
			Mean: c.Mean, MeanSE: c.MeanSE, SD: c.SD, Quantiles: map[string]float64{"0.01": c.P1, "0.05": c.P5, "0.50": c.P50, "0.95": c.P95, "0.99": c.P99},
			ProbPayout: c.ProbPayout, LoadedPrice: c.LoadedPrice, QuantilePrice: c.QuantilePrice, Burn: finitePtr(c.Burn),
			BurnSE: finitePtr(c.BurnSE), BurnSeasons: c.Seasons, MinVarianceQuantity: finitePtr(c.MinVar.Quantity), MinVarianceReduction: finitePtr(c.MinVar.VarianceReduction)}
		if !math.IsNaN(c.MinVar.Quantity) {
			n := toJSONRisk(c.MinVar.Net)
			jc.MinVarianceNet = &n
		}
		j.Contracts = append(j.Contracts, jc)
	}
	return j
}

// VarianceChange words a hedge's variance reduction v (0.2 is 20 %): "remove
// 20.0% of what", or, when the hedges add variance, "add 62.0% to what".
func VarianceChange(v float64, what string) string {
	if v < 0 {
		return "add " + numfmt.Percent(-v) + " to " + what
	}
	return "remove " + numfmt.Percent(v) + " of " + what
}
