package render

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"wxstress/internal/numfmt"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

// summaryIndices are the indices the one-page summary shows, in order, and
// the periods each is shown for: degree days where they occur, the coldest
// day of winter, and the demand figures.
var summaryIndices = []sim.Index{sim.HDD, sim.CDD, sim.Coldest, sim.Energy, sim.PeakDemand}

// occurs reports whether an index means something in its period for the
// summary: not rare, and a heating figure (HDD, the coldest day) not for a
// warm period (the cooling season, July) nor a cooling figure (CDD) for a
// cold one (the heating season, January), where they are small remainders
// nobody plans on (a warm October day's CDD; sim.Season); rows are the
// run's rows, which tell the period's kind. --detail shows them all.
func occurs(r sim.Row, rows []sim.Row) bool {
	if rare(r.Tail) {
		return false
	}
	return fitsSeason(r.Index, rows, r.Period)
}

// fitsSeason reports whether index x means something in a period of the
// kind rows give it (sim.Season): heating figures (HDD, the coldest day)
// not in a warm period, cooling figures (CDD) not in a cold one.
func fitsSeason(x sim.Index, rows []sim.Row, period string) bool {
	cold, warm := sim.Season(rows, period)
	switch x {
	case sim.HDD, sim.Coldest:
		return !warm
	case sim.CDD:
		return !cold
	}
	return true
}

// rare reports whether an index hardly occurs in its period: zero in
// nineteen years of twenty, with a mean below one (CDD in winter, cold days
// in summer). Its tail numbers mean nothing.
func rare(t sim.Tail) bool { return t.Quantile(0.95) == 0 && t.Mean < 1 }

// ModelLine describes a temperature model in one line for people.
func ModelLine(m *model.File) string {
	u := "°" + m.Data.Units
	parts := []string{}
	if m.Trend.Kind == "linear" {
		parts = append(parts, fmt.Sprintf("trend %+.2f %s/decade", 10*m.Trend.SlopePerYear, u))
	} else {
		parts = append(parts, "no trend")
	}
	parts = append(parts, fmt.Sprintf("fast AR(%d) φ₁ %.2f", len(m.AR.Phi), m.AR.Phi[0]))
	if sl := m.Slow; sl != nil {
		parts = append(parts, fmt.Sprintf("slow part φ %.3f (%.0f days, sd %.2f %s)", sl.Phi, sl.EFoldingDays, sl.SD, u))
	} else {
		parts = append(parts, "no slow part")
	}
	parts = append(parts, model.FamilyLabel(m.Shocks.Family)+" shocks")
	return strings.Join(parts, ", ")
}

// Summary is the one-page summary of a run, laid out once for the terminal
// and the HTML report: the figures each user came for — season degree days
// and energy at the median, 1-in-20 and 1-in-50 with the expected
// shortfall, the design day and capacity, the hedged position, baseline
// against scenarios — then the warnings. The full tables are SimTables.
type Summary struct {
	Run       []string // what was run: paths, year, start, model, season under way
	KeyTitle  string
	KeyHead   []string
	KeyRows   [][]string
	Notes     []string // exceedances, design days, capacities, the hedge
	ScenTitle string
	ScenHead  []string // nil without scenarios
	ScenRows  [][]string
	Warnings  []string
}

// NewSummary lays out the summary of r; m (the temperature model) may be
// nil.
func NewSummary(r *SimReport, m *model.File) *Summary {
	sm := &Summary{KeyTitle: "Key figures (adverse side: high for degree days and demand, low for the coldest day)"}
	mf := r.Manifest
	periods := make([]string, len(mf.Periods))
	for i, p := range mf.Periods {
		periods[i] = p
		if span := r.periodSpan(p); span != "" {
			// Each date kept whole when the line wraps ("31 Mar 2030",
			// not "31 Mar" / "2030").
			from, to, _ := strings.Cut(strings.TrimSuffix(strings.TrimPrefix(span, " ("), ")"), " to ")
			periods[i] += " (" + strings.ReplaceAll(from, " ", Glue) + " to " + strings.ReplaceAll(to, " ", Glue) + ")"
		}
	}
	bases := fmt.Sprintf("HDD and CDD base %g °%s", mf.HDDBase, mf.Units)
	if mf.HDDBase != mf.CDDBase {
		bases = fmt.Sprintf("HDD base %g °%s, CDD base %g °%s", mf.HDDBase, mf.Units, mf.CDDBase, mf.Units)
	}
	sm.Run = append(sm.Run, Wrap(fmt.Sprintf("%s synthetic years of %d (%s start, seed %d), %s: %s; %s",
		numfmt.Number(float64(mf.Paths)), mf.Year, mf.Start, mf.Seed, Plural(len(mf.Periods), "period"),
		strings.Join(periods, ", "), bases), "  "))
	if m != nil {
		sm.Run = append(sm.Run, "Model: "+ModelLine(m))
	}
	if g := GrowthLine(mf); g != "" {
		sm.Run = append(sm.Run, g)
	}
	if r.Mixed {
		sm.Run = append(sm.Run, "Parameter uncertainty: "+r.Uncertainty)
	}
	for _, o := range r.InSeason {
		if o.Days > 0 {
			sm.Run = append(sm.Run, fmt.Sprintf("Season under way: %s, %d days observed, HDD so far %s °%s·day", o.Period, o.Days,
				numfmt.Fixed(o.Values[sim.HDD], 0), mf.Units))
		}
	}

	bandCol := len(r.Bands) > 0
	for _, x := range summaryIndices {
		for k, row := range r.Rows {
			if row.Index != x || !occurs(row, r.Rows) {
				continue
			}
			t := row.Tail
			f, unit := ScaleUnit(row.Unit, max(math.Abs(t.Quantile(0.5)), math.Abs(t.ES95)))
			// One precision for the row: that of its least precise figure
			// (the largest Monte Carlo error), so that a row does not read
			// "-9.31 | -14.9 | -16.6".
			se := rowSE(t)
			v := func(x float64) string { return numfmt.Value(x/f, se/f) }
			line := []string{row.Name + ", " + row.Period, unit,
				v(t.Quantile(0.5)), v(t.ReturnLevel(20)), v(t.ReturnLevel(50)), v(t.ES95)}
			if bandCol {
				b := r.Bands[k].RL20
				line = append(line, fmt.Sprintf("%s to %s", v(b.Lo), v(b.Hi)))
			}
			sm.KeyRows = append(sm.KeyRows, line)
		}
	}
	sm.KeyHead = []string{"index, period", "unit", "P50", "1-in-20", "1-in-50", "ES 95%"}
	if bandCol {
		sm.KeyHead = append(sm.KeyHead, "1-in-20, 90% band")
		sm.Notes = append(sm.Notes, fmt.Sprintf("90%% band: 1-in-20 over %d refits to synthetic records like the station's "+
			"(parameter uncertainty)", r.Refits))
	}
	for _, row := range r.Rows {
		for _, x := range row.Tail.Exceedances {
			if !occurs(row, r.Rows) && x.Prob == 0 {
				continue // "the coldest day of summer below −15: 0 ± 0" says nothing
			}
			sm.Notes = append(sm.Notes, ExceedLine(row, x))
		}
	}

	// The planner's and the retailer's lines.
	peakUnit := ""
	for _, row := range r.Rows {
		if row.Index == sim.PeakDemand {
			peakUnit = " " + row.Unit
		}
	}
	planning := planningPeriod(mf.Periods)
	if mf.Start == sim.StartConditional && (len(r.Design) > 0 || len(r.Capacities) > 0) {
		// From the data end, the figures below are this season's: a
		// planning standard is a climate start's.
		sm.Notes = append(sm.Notes, "From the data end, so this season's; for a planning standard, run with --start climate:")
	}
	for _, d := range r.Design {
		if d.Period != planning {
			continue // the other periods' design days: --detail
		}
		// The two temperatures at one precision, the coarser of their errors'.
		tse := d.ColdestSE
		if !(d.SnapSE <= tse) && !math.IsNaN(d.SnapSE) && !math.IsInf(d.SnapSE, 0) {
			tse = d.SnapSE
		}
		var line string
		switch {
		case math.IsNaN(d.Coldest) && math.IsNaN(d.Peak):
			continue
		case math.IsNaN(d.Coldest): // a warm period: its peak-day demand, no coldest day
			line = fmt.Sprintf("Peak-day demand 1-in-%s, %s: %s%s", periodKey(d.T), d.Period, numfmt.Value(d.Peak, d.PeakSE), peakUnit)
		default:
			line = fmt.Sprintf("Design day 1-in-%s, %s: %s °%s, %d-day snap %s °%s", periodKey(d.T), d.Period,
				numfmt.Value(d.Coldest, tse), mf.Units, mf.SnapDays, numfmt.Value(d.Snap, tse), mf.Units)
			if !math.IsNaN(d.Peak) {
				line += ", demand " + numfmt.Value(d.Peak, d.PeakSE) + peakUnit
			}
		}
		sm.Notes = append(sm.Notes, line)
	}
	if mf.Capacity > 0 {
		for _, row := range r.Rows {
			if row.Index != sim.OverCapacity || planning != "" && row.Period != planning {
				continue
			}
			t := row.Tail
			per := "season" // the period's days in each simulated year
			if row.Period == "year" {
				per = "year"
			}
			sm.Notes = append(sm.Notes, fmt.Sprintf("Days over the %s%s capacity, %s, per simulated %s: mean %s, P50 %s, 1-in-20 %s, 1-in-50 %s",
				numfmt.Number(mf.Capacity), peakUnit, row.Period, per, numfmt.Value(t.Mean, t.MeanSE), numfmt.Number(t.Quantile(0.5)),
				numfmt.Number(t.ReturnLevel(20)), numfmt.Number(t.ReturnLevel(50))))
		}
	}
	for _, c := range bindingCapacities(r.Capacities) {
		unbounded := ""
		if math.IsNaN(c.SE) {
			unbounded = " (too few paths beyond it to bound its Monte Carlo error: run more)"
		}
		period := c.Period
		if len(r.Capacities) > 1 && c.Period != planning {
			// Not the design day's period: the one that needs the most.
			period += ", the period that binds"
		}
		sm.Notes = append(sm.Notes, fmt.Sprintf("Capacity %s, %s: %s%s%s", capacityWords(c.Target), period,
			cell2(c.Capacity, c.SE), peakUnit, unbounded))
	}
	if h := r.Hedge; h != nil {
		sm.Notes = append(sm.Notes, fmt.Sprintf("Hedged position (%s): ES 95%% of the net cost %s unhedged, %s hedged; the hedges %s",
			r.HedgeFile.Currency, numfmt.Fixed(h.Unhedged.ES95, 0), numfmt.Fixed(h.Hedged.ES95, 0), VarianceChange(h.VarianceReduction, "its variance")))
	}

	// Scenarios: the change of the mean of the first few key figures.
	if len(r.Scenarios) > 0 {
		keys := scenarioKeys(r.Rows)
		sm.ScenTitle = "Scenarios: change of the mean against the baseline (same random numbers, so ± is the paired error)"
		sm.ScenHead = []string{"scenario"}
		scale := make([]float64, len(keys))
		for i, k := range keys {
			row := r.Rows[k]
			f, unit := ScaleUnit(row.Unit, max(math.Abs(row.Tail.Quantile(0.5)), math.Abs(row.Tail.ES95)))
			scale[i] = f
			sm.ScenHead = append(sm.ScenHead, row.Name+", "+row.Period+"\n"+unit)
		}
		for _, sc := range r.Scenarios {
			line := []string{sc.Name}
			for i, k := range keys {
				c := sc.Changes[k]
				line = append(line, ChangeText(c.Mean/scale[i], c.MeanSE/scale[i]))
			}
			sm.ScenRows = append(sm.ScenRows, line)
		}
	}
	sm.Warnings = summaryWarnings(r, m)
	return sm
}

// scenarioKeys picks the rows of the summary's scenario table: up to three
// of HDD, demand energy, peak-day demand and the coldest day, each for the
// heating season when the run has it.
func scenarioKeys(rows []sim.Row) []int {
	var keys []int
	for _, x := range []sim.Index{sim.HDD, sim.Energy, sim.PeakDemand, sim.Coldest} {
		if len(keys) == 3 {
			break
		}
		hasHeating := slices.ContainsFunc(rows, func(q sim.Row) bool { return q.Index == x && q.Period == "heating" })
		for k, row := range rows {
			if row.Index == x && occurs(row, rows) && (row.Period == "heating" || !hasHeating) {
				keys = append(keys, k)
				break
			}
		}
	}
	return keys
}

// rowSE is the precision of a summary row: the largest finite Monte Carlo
// error among its P50, 1-in-20, 1-in-50 and ES 95 % (NaN when none is
// known, which numfmt.Value prints to four significant digits).
func rowSE(t sim.Tail) float64 {
	se := math.NaN()
	for _, e := range []float64{t.QuantileSE[4], t.ReturnLevelError(20), t.ReturnLevelError(50), t.ES95SE} {
		if !math.IsNaN(e) && !math.IsInf(e, 0) && !(e <= se) {
			se = e
		}
	}
	return se
}

// summaryWarnings collects what should make a reader doubt the figures:
// the run's own cautions (the manifest's: a far target year, growth run
// backwards, another station's demand model, the model's slow-part
// caution), Monte Carlo error (in one line), the record's mean or spread
// outside the model's band, return levels outside the GEV interval, and the
// fit's spread check.
func summaryWarnings(r *SimReport, m *model.File) []string {
	warns := slices.Clone(r.Manifest.Warnings)
	if w := mcSummary(r.Rows); w != "" {
		warns = append(warns, w)
	}
	if h := r.History; h != nil {
		warns = append(warns, recordWarnings(h, model.Units(r.Manifest.Units))...)
	}
	for _, c := range r.Capacities {
		if c.Saturated > 0 {
			warns = append(warns, fmt.Sprintf("capacity %s, %s: %s of the years have more days over it than a solve counts, so "+
				"the days over it are undercounted and the capacity too low", c.Target, c.Period, numfmt.Percent(c.Saturated)))
		}
	}
	warns = append(warns, gevWarnings(r.Extremes)...)
	if m != nil && m.Diagnostics != nil {
		// One line for the windows outside, as the fit says it.
		byVerdict := map[string][]int{}
		for _, s := range m.Diagnostics.Spread {
			if s.Verdict == "too narrow" || s.Verdict == "too wide" {
				byVerdict[s.Verdict] = append(byVerdict[s.Verdict], s.Days)
			}
		}
		for _, v := range []string{"too narrow", "too wide"} {
			if d := byVerdict[v]; len(d) > 0 {
				days := make([]string, len(d))
				for i, x := range d {
					days[i] = strconv.Itoa(x)
				}
				list := strings.Join(days, ", ")
				if len(d) > 1 {
					list = strings.Join(days[:len(d)-1], ", ") + " and " + days[len(d)-1]
				}
				warns = append(warns, fmt.Sprintf("the record's spread over %s days lies outside the model's band (model %s)", list, v))
			}
		}
	}
	return warns
}

// recordWarnings words what the record's own seasons say against the
// model, for the rows the key figures show (HDD, CDD and the coldest day,
// heating figures not of warm periods nor cooling ones of cold periods).
// Each check is made on every such row, so a warning needs evidence that
// survives the number of checks, two on each of k rows: a resampling
// p-value below 0.05/(2k) (Bonferroni) for a mean or sd outside the model's
// band, and, for seasons
// beyond every one of m simulated years, a chance Σ n/(n + m) over the rows
// below 5 % (under the model the worst of n seasons lies beyond all m paths
// with probability n/(n + m), by exchangeability). The bands allow for the
// Monte Carlo error of the model's figures, and a mean or sd is not judged
// from fewer than 20 paths a season. The seasons are taken as independent,
// which a slow part with a long e-folding time makes a little optimistic.
func recordWarnings(h *stress.HistoricalSeasons, units model.Units) []string {
	var rows []stress.HistoryRow
	for _, row := range h.Rows {
		if historyShown(row) && (row.Index == sim.HDD || row.Index == sim.CDD || row.Index == sim.Coldest) &&
			historyOccurs(row, h.Rows) {
			rows = append(rows, row)
		}
	}
	if len(rows) == 0 {
		return nil
	}
	// Two checks a row (mean and sd): the level is 0.05 over both.
	checks := 2 * len(rows)
	level := 0.05 / float64(checks)
	var warns, sds, means []string
	for _, row := range rows {
		unit := row.Index.Info().Unit(units, "")
		if h.Paths < 20*len(row.Values) {
			continue // the model's own figure too uncertain for a verdict to stand on (the table shows it)
		}
		if row.SDVerdict != "inside" && row.SDP < level {
			d := apartDecimals(sdDecimals(min(row.SD, row.SDBand[0])), row.SD, row.SDBand)
			sds = append(sds, fmt.Sprintf("%s, %s %s%s%s against %s–%s%s%s (%s, p %s)", row.Index.Info().Name, row.Period,
				numfmt.Fixed(row.SD, d), Glue, unit, numfmt.Fixed(row.SDBand[0], d), numfmt.Fixed(row.SDBand[1], d), Glue, unit,
				row.SDVerdict, pText(row.SDP)))
		}
		if row.MeanVerdict != "inside" && row.MeanP < level {
			d := apartDecimals(1, row.Mean, row.MeanBand)
			means = append(means, fmt.Sprintf("%s, %s %s%s%s against %s to %s%s%s over %d seasons (%s, p %s)", row.Index.Info().Name,
				row.Period, numfmt.Fixed(row.Mean, d), Glue, unit, numfmt.Fixed(row.MeanBand[0], d), numfmt.Fixed(row.MeanBand[1], d),
				Glue, unit, len(row.Values), row.MeanVerdict, pText(row.MeanP)))
		}
	}
	checked := fmt.Sprintf("p below 0.05/%d, %d checks on %d rows", checks, checks, len(rows))
	if len(sds) > 0 {
		warns = append(warns, "the record's sd lies outside the model's band ("+checked+") for "+strings.Join(sds, "; "))
	}
	if len(means) > 0 {
		warns = append(warns, "the model is off in level: the record's mean lies outside its band ("+checked+") for "+
			strings.Join(means, "; "))
	}
	chance := 0.0
	var beyond []string
	for _, row := range rows {
		n := len(row.Values)
		chance += float64(n) / float64(n+h.Paths)
		unit := row.Index.Info().Unit(units, "")
		for _, w := range row.Worst {
			if w.Prob <= 0 {
				beyond = append(beyond, fmt.Sprintf("%s, %s %d (%s%s%s)", row.Index.Info().Name, row.Period, w.Year,
					numfmt.Fixed(w.Value, 1), Glue, unit))
			}
		}
	}
	if len(beyond) > 3 {
		beyond = append(beyond[:3], fmt.Sprintf("%d more", len(beyond)-3))
	}
	if len(beyond) > 0 && chance < 0.05 {
		warns = append(warns, fmt.Sprintf("the record holds seasons beyond all %s simulated years (at the target year's trend "+
			"level): %s; were the model right, a record this long would show that %s of the time over the %d rows checked: a very "+
			"rare season, or a model too narrow on that side", numfmt.Number(float64(h.Paths)), strings.Join(beyond, "; "),
			numfmt.Percent(chance), len(rows)))
	}
	return warns
}

// historyOccurs is occurs for a row of the record's seasons: the period's
// kind from the model's mean HDD and CDD in the history rows.
func historyOccurs(row stress.HistoryRow, rows []stress.HistoryRow) bool {
	var simRows []sim.Row
	for _, r := range rows {
		if r.Period == row.Period && (r.Index == sim.HDD || r.Index == sim.CDD) {
			simRows = append(simRows, sim.Row{Index: r.Index, Period: r.Period, Tail: sim.Tail{Mean: r.ModelMean}})
		}
	}
	return fitsSeason(row.Index, simRows, row.Period)
}

// pText writes a p-value for a warning: two significant digits, "< 0.001"
// below.
func pText(p float64) string {
	if p < 0.001 {
		return "< 0.001"
	}
	return strconv.FormatFloat(p, 'g', 2, 64)
}

// SimSummary writes the one-page summary (NewSummary) for the terminal.
func SimSummary(w io.Writer, r *SimReport, m *model.File) error {
	sm := NewSummary(r, m)
	e := &errWriter{w: w}
	for _, l := range sm.Run {
		e.printf("%s\n", Wrap(l, "  "))
	}
	e.printf("\n%s\n", sm.KeyTitle)
	e.table(sm.KeyHead, sm.KeyRows)
	for _, n := range sm.Notes {
		e.printf("%s\n", Wrap(n, "  "))
	}
	if sm.ScenHead != nil {
		e.printf("\n%s\n", Wrap(sm.ScenTitle, ""))
		e.table(sm.ScenHead, sm.ScenRows)
	}
	if len(sm.Warnings) > 0 {
		e.printf("\nWarnings\n")
		for _, w := range sm.Warnings {
			e.printf("%s\n", wrap("  - "+w, wrapWidth, "    "))
		}
	}
	e.printf("\nFull tables: --detail (or --format csv|json).\n%s\n", wrap(Caution, wrapWidth, ""))
	return e.err
}

// mcSummary condenses the Monte Carlo flags of the rows the summary shows
// into one line: how many far-tail figures need more paths, the worst of
// them, and the paths that would settle them all. Empty when none does.
func mcSummary(rows []sim.Row) string {
	var shown []sim.Row
	for _, row := range rows {
		if slices.Contains(summaryIndices, row.Index) && occurs(row, rows) {
			shown = append(shown, row)
		}
	}
	flags := monteCarloFlags(shown)
	if len(flags) == 0 {
		return ""
	}
	worst, paths := flags[0], 0
	for _, f := range flags {
		if f.se/f.target > worst.se/worst.target {
			worst = f
		}
		if f.paths == 0 || paths < 0 {
			paths = -1
		} else {
			paths = max(paths, f.paths)
		}
	}
	need := "more paths (--paths) would settle them"
	if paths > 0 {
		need = "about " + numfmt.RoundUp(paths) + " paths would settle them all (--paths)"
	}
	figure := numfmt.Value(worst.value, worst.se) + Glue + strings.ReplaceAll(numfmt.SE(worst.se), " ", Glue) + Glue + worst.row.Unit
	if math.IsInf(worst.se, 0) || math.IsNaN(worst.se) {
		// Too few paths beyond the level for its error to be estimated.
		figure = numfmt.Number(worst.value) + Glue + worst.row.Unit + ", too few paths beyond it to estimate its error"
	}
	have := "have"
	if len(flags) == 1 {
		have = "has"
	}
	return fmt.Sprintf("Monte Carlo error: %d of the %d rows %s a far-tail figure (ES 99%%, 1-in-50, 1-in-100) less precise "+
		"than a twentieth of the sd, worst the %s of %s, %s (%s); %s",
		len(flags), len(shown), have, worst.stat, worst.row.Name, worst.row.Period, figure, need)
}

// DemandLine describes a demand model in one line for people: its form and
// each side's balance point and slope.
func DemandLine(d *model.Demand) string {
	u := "°" + d.TemperatureUnits
	parts := []string{d.Form + " change-point model"}
	for _, s := range []struct {
		name, side string
		cp         model.ChangePoint
	}{{"heating", "below", d.Heating}, {"cooling", "above", d.Cooling}} {
		if s.cp.Present {
			parts = append(parts, fmt.Sprintf("%s %s %s %s, %s %s per %s", s.name, s.side, numfmt.Fixed(s.cp.BalancePoint, 1), u,
				numfmt.Value(s.cp.Slope, s.cp.SlopeSE), d.Unit, u))
		}
	}
	return strings.Join(parts, "; ")
}

// Wrap breaks a line of prose for the terminal at wrapWidth columns,
// starting continuation lines with indent.
func Wrap(text, indent string) string { return wrap(text, wrapWidth, indent) }

// planningPeriod is the period whose design day the summary shows: the
// heating season when the run has it, else the year, else the first.
func planningPeriod(periods []string) string {
	for _, p := range []string{"heating", "year"} {
		if slices.Contains(periods, p) {
			return p
		}
	}
	if len(periods) > 0 {
		return periods[0]
	}
	return ""
}

// capacityWords says a capacity target (peak:1-in-T, days:x, any:p) in
// words for the summary's line; the target as given when it does not parse.
func capacityWords(target string) string {
	t, err := stress.ParseCapacityTarget(target)
	if err != nil {
		return "for " + target
	}
	switch t.Kind {
	case "peak":
		return "for the 1-in-" + periodKey(t.Value) + " peak day"
	case "days":
		days := "days"
		if t.Value == 1 {
			days = "day"
		}
		return "with at most " + numfmt.Number(t.Value) + " " + days + " a year over it on average"
	default:
		return "with a " + numfmt.Percent(t.Value) + " chance a year of any day over it"
	}
}

// bindingCapacities keeps, for each capacity target, the period that needs
// the most capacity: the one that binds.
func bindingCapacities(rows []stress.CapacityRow) []stress.CapacityRow {
	var out []stress.CapacityRow
	for _, c := range rows {
		i := slices.IndexFunc(out, func(o stress.CapacityRow) bool { return o.Target == c.Target })
		switch {
		case i < 0:
			out = append(out, c)
		case c.Capacity > out[i].Capacity:
			out[i] = c
		}
	}
	return out
}

// siPrefixes are the SI prefixes ScaleUnit steps through.
const siPrefixes = "kMGTPE"

// ScaleUnit returns the divisor and the unit that show values of magnitude
// big with at most six integer digits: the next SI prefix for energy in
// joules or watt-hours (GJ → TJ, MWh/day → GWh/day), else "thousand" or
// "million" before the unit.
func ScaleUnit(unit string, big float64) (float64, string) {
	steps := 0
	for f := big; f >= 1e6 && steps < 2; f /= 1e3 {
		steps++
	}
	if steps == 0 {
		return 1, unit
	}
	factor := math.Pow(1e3, float64(steps))
	base, per, _ := strings.Cut(unit, "/")
	if per != "" {
		per = "/" + per
	}
	for _, u := range []string{"J", "Wh"} {
		pre, ok := strings.CutSuffix(base, u)
		if !ok {
			continue
		}
		i := 0
		if pre != "" {
			i = strings.Index(siPrefixes, pre) + 1
			if i == 0 || len(pre) != 1 {
				break
			}
		}
		if i+steps-1 < len(siPrefixes) {
			return factor, siPrefixes[i+steps-1:i+steps] + u + per
		}
	}
	return factor, []string{"thousand ", "million "}[steps-1] + unit
}
