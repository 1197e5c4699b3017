package report

import (
	"fmt"
	"strconv"
	"strings"

	"wxstress/internal/render"
	"wxstress/sim"
)

// Decimals of the report's tail tables. The numbers are the same float64
// values as the JSON and CSV outputs, rounded for display.
const (
	valueDecimals = 1 // statistics of an index, in its unit
	seDecimals    = 2 // Monte Carlo standard errors
	probDecimals  = 4 // exceedance probabilities and their standard errors
)

// Statistic keys of the comparison tables, as in SimCSV.
const (
	statChangeMean   = "change_mean"
	statChangeMeanSE = "change_mean_se"
)

// fixed formats a table number with d decimals, "—" for NaN, and without
// the sign of a value that rounds to zero ("0.0", not "-0.0").
func fixed(v float64, d int) string {
	s := render.Num(v, d)
	if strings.HasPrefix(s, "-") && strings.Trim(s, "-0.") == "" {
		return s[1:]
	}
	return s
}

// temperatureUnit reports whether a row's unit is a temperature, a degree
// day or a count of days, the units of the temperature indices.
func temperatureUnit(u string) bool {
	switch u {
	case "°C", "°F", "°C·day", "°F·day", "days":
		return true
	}
	return false
}

// isDemandRow reports whether a row is a demand index: one of the
// simulator's demand indices, a key that names demand, energy or a peak, or
// a unit that is not a temperature unit.
func isDemandRow(r sim.Row) bool {
	return r.Index >= sim.Energy || strings.HasPrefix(r.Info.Key, "demand") || r.Info.Key == "energy" ||
		strings.Contains(r.Info.Key, "peak") || !temperatureUnit(r.Unit)
}

// hasExceedance reports whether an exceedance curve of the row means
// anything: not for the day of the peak, a date rather than a level.
func hasExceedance(r sim.Row) bool { return r.Index != sim.PeakDay && r.Info.Key != "peak-day" }

func temperatureRows(rows []sim.Row) []sim.Row {
	var out []sim.Row
	for _, r := range rows {
		if !isDemandRow(r) {
			out = append(out, r)
		}
	}
	return out
}

func demandRows(rows []sim.Row) []sim.Row {
	var out []sim.Row
	for _, r := range rows {
		if isDemandRow(r) {
			out = append(out, r)
		}
	}
	return out
}

// values returns the per-path values behind row r in res, nil when res does
// not have them.
func values(res *sim.Result, r sim.Row) []float64 {
	if res == nil {
		return nil
	}
	known := len(sim.IndexKeys())
	for _, a := range res.Aggregates {
		if a.Index != r.Index || a.Period.Name != r.Period {
			continue
		}
		if int(a.Index) >= 0 && int(a.Index) < known && a.Index.Info().Key != r.Info.Key {
			continue
		}
		return a.Values
	}
	return nil
}

// periodText describes a period with its dates when the run has them.
func (r *report) periodText(name string) string {
	if r.in.Base != nil {
		for _, p := range r.in.Base.Periods {
			if p.Name == name {
				return fmt.Sprintf("%s: %s to %s, %d days", name, p.From, p.To, p.Days())
			}
		}
	}
	return name
}

// cellAttrs identifies a number cell for scripts and tests.
func cellAttrs(scen string, row sim.Row, stat string) string {
	return fmt.Sprintf(` data-scen="%s" data-period="%s" data-index="%s" data-stat="%s"`,
		esc(scen), esc(row.Period), esc(row.Info.Key), esc(stat))
}

// tailTable writes the tail table of one period: statistics down, indices
// across, every number cell identified by its attributes.
func (r *report) tailTable(scen string, rows []sim.Row, caption string) {
	r.printf("<div class=\"wide\"><table class=\"tail\" id=\"%s\">\n<caption>%s</caption>\n<thead><tr><th scope=\"col\">statistic</th>",
		r.uniqueID("tail-"+scen+"-"+rows[0].Period), esc(caption))
	for _, row := range rows {
		r.printf("<th scope=\"col\" class=\"n\">%s<span class=\"u\">%s</span></th>", esc(row.Name), esc(row.Unit))
	}
	r.raw("</tr></thead>\n<tbody>\n")
	for _, s := range render.Statistics() {
		sep := ""
		if s.Key == "p01" || s.Key == "var95" || s.Key == "rl2" {
			sep = " class=\"sep\""
		}
		r.printf("<tr%s><th scope=\"row\">%s</th>", sep, esc(statLabel(s)))
		for _, row := range rows {
			r.printf("<td class=\"n\"%s>%s</td>", cellAttrs(scen, row, s.Key), fixed(s.Value(row.Tail), valueDecimals))
		}
		r.raw("</tr>\n")
	}
	r.raw("<tr class=\"sep\"><th scope=\"row\">s.e. of the mean</th>")
	for _, row := range rows {
		r.printf("<td class=\"n\"%s>%s</td>", cellAttrs(scen, row, "mean_se"), fixed(row.Tail.MeanSE, seDecimals))
	}
	r.raw("</tr>\n<tr><th scope=\"row\">adverse side</th>")
	for _, row := range rows {
		r.printf("<td class=\"n\">%s</td>", render.AdverseSide(row))
	}
	r.raw("</tr>\n</tbody></table></div>\n")
	r.exceedTable(scen, rows)
}

// statLabel explains the risk statistics in their row labels.
func statLabel(s render.Statistic) string {
	switch s.Key {
	case "var95":
		return "VaR 95% (adverse 95% quantile)"
	case "var99":
		return "VaR 99% (adverse 99% quantile)"
	case "es95":
		return "ES 95% (mean of worst 5% of years)"
	case "es99":
		return "ES 99% (mean of worst 1% of years)"
	}
	return s.Label
}

// exceedTable writes the probabilities of user thresholds, if any.
func (r *report) exceedTable(scen string, rows []sim.Row) {
	any := false
	for _, row := range rows {
		any = any || len(row.Tail.Exceedances) > 0
	}
	if !any {
		return
	}
	r.raw("<div class=\"wide\"><table class=\"exceed\">\n<caption>Probability of a year worse than a threshold</caption>\n" +
		"<thead><tr><th scope=\"col\">index</th><th scope=\"col\">worse than</th><th scope=\"col\" class=\"n\">probability</th>" +
		"<th scope=\"col\" class=\"n\">± s.e.</th></tr></thead>\n<tbody>\n")
	for _, row := range rows {
		for _, e := range row.Tail.Exceedances {
			th := strconv.FormatFloat(e.Threshold, 'g', -1, 64)
			dir := ">"
			if !row.Info.HighIsAdverse {
				dir = "<"
			}
			r.printf("<tr><td>%s</td><td>%s %s %s</td><td class=\"n\"%s>%s</td><td class=\"n\"%s>%s</td></tr>\n",
				esc(row.Name), dir, th, esc(row.Unit), cellAttrs(scen, row, "exceed:"+th), fixed(e.Prob, probDecimals),
				cellAttrs(scen, row, "exceed_se:"+th), fixed(e.SE, probDecimals))
		}
	}
	r.raw("</tbody></table></div>\n")
}

// byPeriodOf groups rows by period in order of first appearance.
func byPeriodOf(rows []sim.Row) [][]sim.Row {
	var out [][]sim.Row
	at := map[string]int{}
	for _, row := range rows {
		k, ok := at[row.Period]
		if !ok {
			k = len(out)
			at[row.Period] = k
			out = append(out, nil)
		}
		out[k] = append(out[k], row)
	}
	return out
}

// indexFigures returns the histogram and exceedance curve of each row whose
// per-path values are known and not all equal, and notes for the others.
func (r *report) indexFigures(rows []sim.Row) ([]figure, []string, error) {
	var figs []figure
	var notes []string
	for _, row := range rows {
		v := values(r.in.Base, row)
		switch {
		case v == nil:
			continue
		case degenerate(v):
			notes = append(notes, fmt.Sprintf("%s, %s: every synthetic year gives %s %s, nothing to plot.",
				row.Name, row.Period, render.Num(v[0], valueDecimals), row.Unit))
			continue
		}
		id := "fig-" + row.Period + "-" + row.Info.Key
		h, err := indexHistFigure(id+"-hist", row, v)
		if err != nil {
			return nil, nil, err
		}
		figs = append(figs, h)
		if !hasExceedance(row) {
			continue
		}
		e, err := exceedanceFigure(id+"-exceed", row, v)
		if err != nil {
			return nil, nil, err
		}
		figs = append(figs, e)
	}
	return figs, notes, nil
}

// writeFigures writes figures in a grid, inside a closed <details> unless
// open.
func (r *report) writeFigures(figs []figure, notes []string, open bool, summary string) {
	if len(figs) == 0 && len(notes) == 0 {
		return
	}
	if !open {
		r.printf("<details>\n<summary>%s</summary>\n", esc(summary))
	}
	r.raw("<div class=\"grid\">\n")
	for _, f := range figs {
		r.writeFigure(f)
	}
	r.raw("</div>\n")
	for _, n := range notes {
		r.printf("<p class=\"note\">%s</p>\n", esc(n))
	}
	if !open {
		r.raw("</details>\n")
	}
}

// writeSimulation writes section 3: the fan chart and, per period, the tail
// table with a histogram and an exceedance curve of each index.
func (r *report) writeSimulation() error {
	in := r.in
	if s := in.Sim; s != nil {
		mf := s.Manifest
		start := "a burn-in from the model's stationary state (today's climate, no memory of recent weather)"
		if mf.Start == sim.StartConditional {
			start = "the last observed anomalies (the coming season, from today's state)"
		}
		u := degrees(mf.Units)
		r.printf("<p>%d synthetic years for %d, each starting from %s, with seed %d: synthetic year i always draws "+
			"the same random numbers, whatever the number of workers. Degree days use a base of %g %s for HDD and "+
			"%g %s for CDD; a cold day has a mean below %g %s.</p>\n", mf.Paths, mf.Year, esc(start), mf.Seed,
			mf.HDDBase, u, mf.CDDBase, u, mf.ColdBelow, u)
	}
	if in.Fan != nil {
		f, ok, err := fanFigure(in.Fan, in.Model)
		if err != nil {
			return err
		}
		if ok {
			r.raw("<h3>The simulated year</h3>\n")
			r.writeFigure(f)
		}
	}
	if in.Sim == nil {
		return nil
	}
	groups := byPeriodOf(temperatureRows(in.Sim.Rows))
	if len(groups) == 0 {
		return nil
	}
	r.raw("<h3>How to read the tail tables</h3>\n<p>P1 … P99 are percentiles over the synthetic years (Hyndman–Fan " +
		"type 4). The adverse side is high for degree days, the hottest day, cold days and cold spells, and low for " +
		"the coldest day. VaR 95% is the adverse 95 % quantile; ES 95% (expected shortfall) is the mean of the worst " +
		"5 % of years, always at least as adverse as VaR. The return level 1-in-T is passed on the adverse side once " +
		"in T years on average. Each histogram marks the median and the adverse 95 % and 99 % levels; each " +
		"exceedance curve gives, for every value, the probability that a year is at least that adverse, on a log " +
		"scale so the rare years stay visible.</p>\n")
	for k, g := range groups {
		r.printf("<h3 id=\"%s\">Period %s</h3>\n", r.uniqueID("period-"+g[0].Period), esc(r.periodText(g[0].Period)))
		r.tailTable("baseline", g, "Tail table, baseline, "+g[0].Period)
		figs, notes, err := r.indexFigures(g)
		if err != nil {
			return err
		}
		r.writeFigures(figs, notes, k == 0, fmt.Sprintf("Histograms and exceedance curves, %s (%d plots)", g[0].Period, len(figs)))
	}
	return nil
}

// writeScenarios writes section 4: the scenarios side by side with the
// baseline, and overlaid exceedance curves.
func (r *report) writeScenarios() error {
	s := r.in.Sim
	r.raw("<p>Each scenario changes the fitted model and is simulated with the same seed and the same number of " +
		"years, so synthetic year i of a scenario has the same random shocks as year i of the baseline (common random " +
		"numbers). The change of the mean is therefore measured far more precisely than two independent runs would " +
		"allow; its standard error (s.e.) is that of the paired differences.</p>\n<dl class=\"scenarios\">\n")
	for _, sc := range s.Scenarios {
		r.printf("<dt><strong>%s</strong></dt><dd>%s", esc(sc.Name), esc(sc.Description))
		if len(sc.What) > 0 {
			r.printf(" (%s)", esc(strings.Join(sc.What, "; ")))
		}
		r.raw("</dd>\n")
	}
	r.raw("</dl>\n")
	groups := byPeriodOf(s.Rows)
	for gi, g := range groups {
		r.printf("<h3 id=\"%s\">Period %s</h3>\n", r.uniqueID("compare-"+g[0].Period), esc(r.periodText(g[0].Period)))
		r.compareTable(g)
		figs, err := r.overlayFigures(g, gi == 0)
		if err != nil {
			return err
		}
		r.writeFigures(figs, nil, gi == 0, fmt.Sprintf("Exceedance curves, baseline and scenarios, %s (%d plots)",
			g[0].Period, len(figs)))
	}
	return nil
}

// rowPosition returns the position of row in the baseline's rows.
func rowPosition(rows []sim.Row, row sim.Row) int {
	for k, x := range rows {
		if x.Period == row.Period && x.Index == row.Index && x.Info.Key == row.Info.Key {
			return k
		}
	}
	return -1
}

// compareTable writes the baseline and every scenario side by side for each
// index of a period.
func (r *report) compareTable(group []sim.Row) {
	s := r.in.Sim
	r.printf("<div class=\"wide\"><table class=\"compare\" id=\"%s\">\n<caption>Baseline and scenarios, %s</caption>\n"+
		"<thead><tr><th scope=\"col\">scenario</th><th scope=\"col\" class=\"n\">mean</th><th scope=\"col\" class=\"n\">P50</th>"+
		"<th scope=\"col\" class=\"n\">P95</th><th scope=\"col\" class=\"n\">P99</th><th scope=\"col\" class=\"n\">ES 95%%</th>"+
		"<th scope=\"col\" class=\"n\">1-in-20</th><th scope=\"col\" class=\"n\">change of mean ± s.e.</th></tr></thead>\n<tbody>\n",
		r.uniqueID("compare-table-"+group[0].Period), esc(group[0].Period))
	cells := func(scen string, row sim.Row) {
		t := row.Tail
		for _, c := range []struct {
			stat string
			v    float64
		}{{"mean", t.Mean}, {"p50", t.Quantiles[4]}, {"p95", t.Quantiles[7]}, {"p99", t.Quantiles[8]},
			{"es95", t.ES95}, {"rl20", t.ReturnLevels[3]}} {
			r.printf("<td class=\"n\"%s>%s</td>", cellAttrs(scen, row, c.stat), fixed(c.v, valueDecimals))
		}
	}
	for _, base := range group {
		k := rowPosition(s.Rows, base)
		r.printf("<tr class=\"group sep\"><th scope=\"rowgroup\" colspan=\"8\">%s (%s), adverse side %s</th></tr>\n",
			esc(base.Name), esc(base.Unit), render.AdverseSide(base))
		r.raw("<tr><th scope=\"row\">baseline</th>")
		cells("baseline", base)
		r.raw("<td class=\"n\"></td></tr>\n")
		for _, sc := range s.Scenarios {
			if k < 0 || k >= len(sc.Rows) || k >= len(sc.Changes) {
				continue
			}
			row, c := sc.Rows[k], sc.Changes[k]
			r.printf("<tr><th scope=\"row\">%s</th>", esc(sc.Name))
			cells(sc.Name, row)
			change := fixed(c.Mean, valueDecimals)
			if !strings.HasPrefix(change, "-") && change != fixed(0, valueDecimals) {
				change = "+" + change
			}
			r.printf("<td class=\"n\"><span%s>%s</span> ± <span%s>%s</span></td></tr>\n",
				cellAttrs(sc.Name, row, statChangeMean), change,
				cellAttrs(sc.Name, row, statChangeMeanSE), fixed(c.MeanSE, seDecimals))
		}
	}
	r.raw("</tbody></table></div>\n")
}

// overlayFigures returns the overlaid exceedance curves of a period: every
// index of the first period, the degree-day indices of the others.
func (r *report) overlayFigures(group []sim.Row, first bool) ([]figure, error) {
	in := r.in
	if in.Base == nil || len(in.Scenarios) != len(in.Sim.Scenarios) {
		return nil, nil
	}
	var figs []figure
	for _, row := range group {
		if !first && row.Info.Key != "hdd" && row.Info.Key != "cdd" || !hasExceedance(row) {
			continue
		}
		base := values(in.Base, row)
		if base == nil || degenerate(base) {
			continue
		}
		names, vals := []string{"baseline"}, [][]float64{base}
		for i, res := range in.Scenarios {
			if v := values(res, row); v != nil {
				names = append(names, in.Sim.Scenarios[i].Name)
				vals = append(vals, v)
			}
		}
		f, err := overlayFigure("fig-overlay-"+row.Period+"-"+row.Info.Key, row, names, vals)
		if err != nil {
			return nil, err
		}
		figs = append(figs, f)
	}
	return figs, nil
}
