package report

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"wxstress/internal/render"
	"wxstress/sim"
)

// Decimals of the report's tables. The numbers are the same float64 values
// as the JSON and CSV outputs, rounded for display: statistics of an index
// to one decimal, none from 10 000 on (the terminal's rule, render.TableNum);
// Monte Carlo errors to two significant digits (never fewer than the
// units); exceedance probabilities to probDecimals.
const (
	valueDecimals = 1
	probDecimals  = 4
)

// value formats a statistic of an index as the tables show it.
func value(v float64) string {
	if math.Abs(v) >= 1e4 {
		return fixed(v, 0)
	}
	return fixed(v, valueDecimals)
}

// seText formats a Monte Carlo standard error to two significant digits
// (0.00094, 0.25, 243), "0" for an exact one.
func seText(se float64) string {
	return fixed(se, seDigits(se))
}

// seDigits is the decimals that show se to two significant digits.
func seDigits(se float64) int {
	if !(se > 0) || math.IsInf(se, 0) {
		return 0
	}
	return min(max(1-int(math.Floor(math.Log10(se))), 0), 12)
}

// changeText formats a scenario's change of the mean to the decade of its
// paired error's first digit (as the terminal does), with no more than four
// significant figures where common random numbers make the error tiny, and
// a sign.
func changeText(mean, se float64) string {
	d := max(seDigits(max(se, 1e-3*math.Abs(mean)))-1, 0)
	if se == 0 {
		d = valueDecimals
	}
	s := fixed(mean, d)
	if mean > 0 && strings.Trim(s, "0.,") != "" {
		s = "+" + s
	}
	return s
}

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
func hasExceedance(r sim.Row) bool { return r.Index != sim.PeakDay && r.Info.Key != "peak-date" }

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
func (b *builder) periodText(name string) string {
	if b.in.Base != nil {
		for _, p := range b.in.Base.Periods {
			if p.Name == name {
				return fmt.Sprintf("%s: %s to %s, %s", name, p.From, p.To, render.Plural(p.Days(), "day"))
			}
		}
	}
	return name
}

// numCell is a number cell of a table, identified for scripts and tests by
// scenario, period, index key and statistic key (as in SimCSV).
type numCell struct {
	Scen, Period, Index, Stat string
	Text                      string
}

func newNumCell(scen string, row sim.Row, stat, text string) numCell {
	return numCell{Scen: scen, Period: row.Period, Index: row.Info.Key, Stat: stat, Text: text}
}

// tailTable is what the template "tail" shows: the tail table of one
// period, statistics down, indices across, and the probabilities of the
// user's thresholds.
type tailTable struct {
	ID, Caption string
	Columns     []struct{ Name, Unit string }
	Stats       []tailStat
	MeanSE      []numCell
	Adverse     []string
	Exceed      []exceedRow
}

// tailStat is one statistic's row of a tail table.
type tailStat struct {
	Label string
	Sep   bool // a rule above: the quantiles, the risk measures, the return levels
	Cells []numCell
}

// exceedRow is one threshold of an index.
type exceedRow struct {
	Name, Worse string
	Prob, SE    numCell
}

func (b *builder) tailTable(scen string, rows []sim.Row, caption string) tailTable {
	t := tailTable{ID: b.uniqueID("tail-" + scen + "-" + rows[0].Period), Caption: caption}
	for _, row := range rows {
		t.Columns = append(t.Columns, struct{ Name, Unit string }{row.Name, row.Unit})
		t.MeanSE = append(t.MeanSE, newNumCell(scen, row, "mean_se", seText(row.Tail.MeanSE)))
		t.Adverse = append(t.Adverse, render.AdverseSide(row))
	}
	stats := render.StatisticsFor(rows[0].Tail.ReturnPeriods)
	firstRL := ""
	for _, s := range stats {
		if strings.HasPrefix(s.Key, "rl") && firstRL == "" {
			firstRL = s.Key
		}
	}
	for _, s := range stats {
		st := tailStat{Label: statLabel(s), Sep: s.Key == "p01" || s.Key == "var95" || s.Key == firstRL}
		for _, row := range rows {
			st.Cells = append(st.Cells, newNumCell(scen, row, s.Key, value(s.Value(row.Tail))))
		}
		t.Stats = append(t.Stats, st)
	}
	for _, row := range rows {
		for _, e := range row.Tail.Exceedances {
			th := strconv.FormatFloat(e.Threshold, 'g', -1, 64)
			dir := ">"
			if !row.Info.HighIsAdverse {
				dir = "<"
			}
			t.Exceed = append(t.Exceed, exceedRow{Name: row.Name, Worse: dir + " " + th + " " + row.Unit,
				Prob: newNumCell(scen, row, "exceed:"+th, fixed(e.Prob, probDecimals)),
				SE:   newNumCell(scen, row, "exceed_se:"+th, fixed(e.SE, probDecimals))})
		}
	}
	return t
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
func (b *builder) indexFigures(rows []sim.Row) ([]figure, []string, error) {
	var figs []figure
	var notes []string
	for _, row := range rows {
		v := values(b.in.Base, row)
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

// figures makes a figGroup of figs, giving each its id.
func (b *builder) figures(figs []figure, notes []string, open bool, summary string) figGroup {
	g := figGroup{Notes: notes, Open: open, Summary: summary}
	for _, f := range figs {
		g.Figures = append(g.Figures, b.figure(f))
	}
	return g
}

// periodBlock is what the template "period" shows: a period's heading, its
// tail table and the plots of its indices.
type periodBlock struct {
	ID, Heading string
	Table       tailTable
	Dates       []string // the day of the peak, as dates (render.DatesText)
	Figures     figGroup
}

// periodBlocks lays out the baseline's rows period by period: the heading
// (idPrefix and heading followed by the period), the tail table (caption
// followed by the period) and the plots, open for the first period.
func (b *builder) periodBlocks(rows []sim.Row, idPrefix, heading, caption, plots string) ([]periodBlock, error) {
	var out []periodBlock
	for k, g := range byPeriodOf(rows) {
		p := g[0].Period
		blk := periodBlock{ID: b.uniqueID(idPrefix + p), Heading: heading + b.periodText(p)}
		levels := slices.DeleteFunc(slices.Clone(g), func(r sim.Row) bool { return r.Index == sim.PeakDay })
		for _, r := range g {
			if r.Dates != nil {
				blk.Dates = append(blk.Dates, render.DatesText(r))
			}
		}
		blk.Table = b.tailTable("baseline", levels, caption+p)
		figs, notes, err := b.indexFigures(g)
		if err != nil {
			return nil, err
		}
		blk.Figures = b.figures(figs, notes, k == 0, fmt.Sprintf("%s, %s (%d plots)", plots, p, len(figs)))
		out = append(out, blk)
	}
	return out, nil
}

// runView is the simulation's settings, as the simulation section tells
// them.
type runView struct {
	Paths, Year int
	Seed        uint64
	Start       string
	Units       string // °C or °F
	HDDBase     float64
	CDDBase     float64
	ColdBelow   float64
}

// simulationView is section 3: the fan chart and, per period, the tail
// table with a histogram and an exceedance curve of each index.
type simulationView struct {
	Run     *runView // nil without tail tables
	Fan     *figView // nil without a fan chart
	Periods []periodBlock
	// History is the record's own seasons beside the model, with its notes;
	// nil without a record.
	History      *textTable
	HistoryTitle string
	HistoryNotes []string
	// Bands is the parameter-uncertainty table; nil without bands.
	Bands      *textTable
	BandsTitle string
	// Design and Capacity are the planner's tables; nil without them.
	Design, Capacity *textTable
	CapacityNotes    []string
	// Extremes is the GEV check; nil without a record.
	Extremes      *textTable
	ExtremesNotes []string
	// HedgeContracts and HedgePosition are the hedge evaluation's tables;
	// nil without a hedge file.
	HedgeContracts, HedgePosition *textTable
	HedgeBurnNote                 string // burn prices from few seasons (render.BurnNote)
	HedgeFigures                  []*figView
}

// planningUnit is the demand unit of a run with demand, "" without.
func planningUnit(s *render.SimReport) string {
	if s.Planning != nil {
		return s.Planning.Unit
	}
	return ""
}

// hedgeFigures are the exceedance curves of the net cost, unhedged and
// hedged, and of each contract's payout.
func hedgeFigures(s *render.SimReport) ([]figure, error) {
	h, cur := s.Hedge, s.HedgeFile.Currency
	cost := sim.Row{Name: "net cost", Period: "the position", Unit: cur, Info: sim.Info{HighIsAdverse: true}}
	net, err := overlayFigure("hedge-net", cost, []string{"unhedged", "hedged as in the file"}, [][]float64{h.Cost, h.Net})
	if err != nil {
		return nil, err
	}
	figs := []figure{net}
	if len(h.Contracts) > 0 {
		var names []string
		var values [][]float64
		for _, c := range h.Contracts {
			names, values = append(names, c.Contract.Name), append(values, c.Payoffs)
		}
		payout := sim.Row{Name: "payout", Period: "one contract bought", Unit: cur, Info: sim.Info{HighIsAdverse: true}}
		f, err := overlayFigure("hedge-payout", payout, names, values)
		if err != nil {
			return nil, err
		}
		figs = append(figs, f)
	}
	return figs, nil
}

func (b *builder) simulationSection() (any, error) {
	in := b.in
	v := &simulationView{}
	if s := in.Sim; s != nil && len(s.Design) > 0 {
		header, rows := render.DesignTable(s.Design, s.Manifest.SnapDays, s.Manifest.Units, planningUnit(s))
		t := newTextTable("design", "Design day at the planning standards (± Monte Carlo s.e.)", header, rows, 2, 3, 4, 5)
		v.Design = &t
	}
	if s := in.Sim; s != nil && len(s.Capacities) > 0 {
		header, rows, notes := render.CapacityTable(s.Capacities, planningUnit(s))
		t := newTextTable("capacity", "Capacity to a target", header, rows, 2)
		v.Capacity, v.CapacityNotes = &t, notes
	}
	if s := in.Sim; s != nil && len(s.Extremes) > 0 {
		header, rows, notes := render.ExtremesTable(s.Extremes, s.Manifest.Units, s.Manifest.Start == sim.StartConditional)
		t := newTextTable("extremes", "", header, rows, 2, 4, 5)
		v.Extremes, v.ExtremesNotes = &t, notes
	}
	if s := in.Sim; s != nil && s.Hedge != nil {
		contracts, position, ch, ph := render.HedgeTables(s.Hedge, s.HedgeFile)
		if len(contracts) > 0 {
			t := newTextTable("hedge", "Contracts: payouts for one contract bought", ch, contracts, 2, 3, 4, 5, 6, 7, 8)
			v.HedgeContracts = &t
		}
		t := newTextTable("hedge", "The position's net cost", ph, position, 1, 2, 3, 4, 5)
		v.HedgePosition, v.HedgeBurnNote = &t, render.BurnNote(s.Hedge)
		figs, err := hedgeFigures(s)
		if err != nil {
			return nil, err
		}
		for _, f := range figs {
			v.HedgeFigures = append(v.HedgeFigures, b.figure(f))
		}
	}
	if s := in.Sim; s != nil && len(s.Bands) > 0 {
		title, header, rows := render.BandTable(s.Rows, s.Bands, s.Refits)
		t := newTextTable("bands", "", header, rows, 2, 3, 4, 5)
		v.Bands, v.BandsTitle = &t, title
	}
	if s := in.Sim; s != nil && s.History != nil && len(s.History.Rows) > 0 {
		title, header, rows, notes := render.HistoryTable(s.History, s.Manifest.Units)
		t := newTextTable("history", "", header, rows, 2, 3, 4, 5, 6, 7, 8, 9)
		v.History, v.HistoryTitle, v.HistoryNotes = &t, title, notes
	}
	if s := in.Sim; s != nil {
		mf := s.Manifest
		start := "a burn-in from the model's stationary state (today's climate, no memory of recent weather)"
		if mf.Start == sim.StartConditional {
			start = "the last observed anomalies (the coming season, from today's state)"
		}
		v.Run = &runView{Paths: mf.Paths, Year: mf.Year, Seed: mf.Seed, Start: start, Units: degrees(mf.Units),
			HDDBase: mf.HDDBase, CDDBase: mf.CDDBase, ColdBelow: mf.ColdBelow}
	}
	if in.Fan != nil {
		f, ok, err := fanFigure(in.Fan, in.Model)
		if err != nil {
			return nil, err
		}
		if ok {
			v.Fan = b.figure(f)
		}
	}
	if in.Sim == nil {
		return v, nil
	}
	var err error
	v.Periods, err = b.periodBlocks(temperatureRows(in.Sim.Rows), "period-", "Period ", "Tail table, baseline, ",
		"Histograms and exceedance curves")
	return v, err
}

// scenariosView is section 4: the scenarios side by side with the
// baseline, and overlaid exceedance curves.
type scenariosView struct {
	Scenarios []scenarioView
	Periods   []comparePeriod
}

// scenarioView names a scenario and what it changes.
type scenarioView struct {
	Name, Description string
	What              string // "" when the scenario lists no changes
}

// comparePeriod is one period of the scenarios section.
type comparePeriod struct {
	ID, Heading string
	Table       compareTable
	Figures     figGroup
}

func (b *builder) scenariosSection() (any, error) {
	s := b.in.Sim
	v := &scenariosView{}
	for _, sc := range s.Scenarios {
		v.Scenarios = append(v.Scenarios, scenarioView{Name: sc.Name, Description: sc.Description,
			What: strings.Join(sc.What, "; ")})
	}
	for gi, g := range byPeriodOf(s.Rows) {
		p := g[0].Period
		cp := comparePeriod{ID: b.uniqueID("compare-" + p), Heading: "Period " + b.periodText(p)}
		cp.Table = b.compareTable(g)
		figs, err := b.overlayFigures(g, gi == 0)
		if err != nil {
			return nil, err
		}
		cp.Figures = b.figures(figs, nil, gi == 0, fmt.Sprintf("Exceedance curves, baseline and scenarios, %s (%d plots)",
			p, len(figs)))
		v.Periods = append(v.Periods, cp)
	}
	return v, nil
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

// compareTable is what the template "compare" shows: the baseline and every
// scenario side by side for each index of a period.
type compareTable struct {
	ID, Period string
	Indices    []compareIndex
}

// compareIndex is one index of a compareTable.
type compareIndex struct {
	Name, Unit, Adverse string
	Baseline            []numCell
	Scenarios           []compareRow
}

// compareRow is one scenario's statistics of an index and the change of
// its mean against the baseline.
type compareRow struct {
	Name             string
	Cells            []numCell
	Change, ChangeSE numCell
}

func (b *builder) compareTable(group []sim.Row) compareTable {
	s := b.in.Sim
	t := compareTable{ID: b.uniqueID("compare-table-" + group[0].Period), Period: group[0].Period}
	cells := func(scen string, row sim.Row) []numCell {
		tl := row.Tail
		var out []numCell
		for _, c := range []struct {
			stat string
			v    float64
		}{{"mean", tl.Mean}, {"p50", tl.Quantile(0.50)}, {"var95", tl.VaR95}, {"var99", tl.VaR99}, {"es95", tl.ES95}} {
			out = append(out, newNumCell(scen, row, c.stat, value(c.v)))
		}
		return out
	}
	for _, base := range group {
		if base.Index == sim.PeakDay {
			continue // a date, not a level
		}
		k := rowPosition(s.Rows, base)
		ix := compareIndex{Name: base.Name, Unit: base.Unit, Adverse: render.AdverseSide(base), Baseline: cells("baseline", base)}
		for _, sc := range s.Scenarios {
			if k < 0 || k >= len(sc.Rows) || k >= len(sc.Changes) {
				continue
			}
			row, c := sc.Rows[k], sc.Changes[k]
			change := changeText(c.Mean, c.MeanSE)
			ix.Scenarios = append(ix.Scenarios, compareRow{Name: sc.Name, Cells: cells(sc.Name, row),
				Change:   newNumCell(sc.Name, row, statChangeMean, change),
				ChangeSE: newNumCell(sc.Name, row, statChangeMeanSE, seText(c.MeanSE))})
		}
		t.Indices = append(t.Indices, ix)
	}
	return t
}

// overlayFigures returns the overlaid exceedance curves of a period: every
// index of the first period, the degree-day indices of the others.
func (b *builder) overlayFigures(group []sim.Row, first bool) ([]figure, error) {
	in := b.in
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
