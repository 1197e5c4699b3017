package report

import (
	"bytes"
	"fmt"
	"html"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"wxstress/internal/render"
	"wxstress/model"
)

// HTMLReport writes in as one self-contained HTML5 page: inline CSS and
// inline SVG plots, no script, no external resource of any kind, laid out to
// print on A4 or Letter. Each section appears only when its input is
// present: Data (Series or Model), Fit (Model), Simulation (Sim or Fan),
// Scenarios (Sim.Scenarios), Demand (Demand, or demand rows in Sim), and
// always the Manifest with the cautions.
//
// The numbers of the tail tables are formatted from the same sim.Row values
// as SimJSON and SimCSV, with a fixed number of decimals, and every number
// cell carries data-scen, data-period, data-index and data-stat attributes
// (statistic keys as in SimCSV) so that scripts can read them back.
//
// HTMLReport builds the page in memory and writes it with one Write, so a
// plotting error leaves w untouched. It panics if in is nil.
func HTMLReport(w io.Writer, in *ReportInput) error {
	if in == nil || in.Model == nil {
		panic("render: HTMLReport needs an input with a model")
	}
	r := newReport(in)
	if err := r.build(); err != nil {
		return err
	}
	_, err := w.Write(r.b.Bytes())
	return err
}

// report is the page being built.
type report struct {
	in    *ReportInput
	b     bytes.Buffer
	units string // "C", "F" or ""
	ids   map[string]int
	n     int // sections written, for their numbers
}

func newReport(in *ReportInput) *report {
	r := &report{in: in, ids: map[string]int{}}
	switch {
	case in.Model != nil:
		r.units = in.Model.Data.Units
	case in.Sim != nil:
		r.units = in.Sim.Manifest.Units
	}
	return r
}

func (r *report) printf(format string, a ...any) { fmt.Fprintf(&r.b, format, a...) }
func (r *report) raw(s string)                   { r.b.WriteString(s) }

// esc escapes text for HTML element content and quoted attribute values.
func esc(s string) string { return html.EscapeString(s) }

// uniqueID returns s made into an id, with a suffix if it was used before.
func (r *report) uniqueID(s string) string {
	var b strings.Builder
	for _, c := range strings.ToLower(s) {
		switch {
		case c >= 'a' && c <= 'z', c >= '0' && c <= '9', c == '-':
			b.WriteRune(c)
		default:
			b.WriteByte('-')
		}
	}
	id := b.String()
	r.ids[id]++
	if k := r.ids[id]; k > 1 {
		id += "-" + strconv.Itoa(k)
	}
	return id
}

// sectionDef is a top-level section of the page.
type sectionDef struct {
	id, title string
	present   bool
	write     func() error
}

func (r *report) sections() []sectionDef {
	in := r.in
	return []sectionDef{
		{"data", "Data", in.Series != nil || in.Model != nil, r.writeData},
		{"fit", "Fit", in.Model != nil, r.writeFit},
		{"simulation", "Simulation", in.Sim != nil && len(temperatureRows(in.Sim.Rows)) > 0 || in.Fan != nil, r.writeSimulation},
		{"scenarios", "Scenarios", in.Sim != nil && len(in.Sim.Scenarios) > 0, r.writeScenarios},
		{"demand", "Demand", in.Demand != nil || in.Sim != nil && len(demandRows(in.Sim.Rows)) > 0, r.writeDemand},
		{"manifest", "Manifest and cautions", true, r.writeManifest},
	}
}

func (r *report) build() error {
	in := r.in
	title := in.Title
	if title == "" {
		title = "wxstress report"
		if in.Model != nil && in.Model.Data.Description != "" {
			title += ": " + in.Model.Data.Description
		}
	}
	r.printf("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"+
		"<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>%s</title>\n<style>\n%s</style>\n</head>\n<body>\n<main>\n",
		esc(title), reportCSS)
	r.printf("<header>\n<h1>%s</h1>\n", esc(title))
	r.printf("<p class=\"sub\">%s</p>\n", esc(r.subtitle()))
	r.printf("<div class=\"caution\" role=\"note\"><strong>Caution.</strong> %s</div>\n", esc(render.Caution))
	r.writeSummary()
	secs := r.sections()
	r.raw("<nav class=\"toc\" aria-label=\"Contents\"><strong>Contents</strong>\n<ol>\n")
	for _, s := range secs {
		if s.present {
			r.printf("<li><a href=\"#%s\">%s</a></li>\n", s.id, esc(s.title))
		}
	}
	r.raw("</ol>\n</nav>\n</header>\n")
	for _, s := range secs {
		if !s.present {
			continue
		}
		r.n++
		r.printf("\n<section class=\"top\" id=\"%s\">\n<h2>%d. %s</h2>\n", s.id, r.n, esc(s.title))
		if err := s.write(); err != nil {
			return err
		}
		r.raw("</section>\n")
	}
	r.printf("\n<footer><p>%s</p></footer>\n</main>\n</body>\n</html>\n", esc(render.Caution))
	return nil
}

func (r *report) subtitle() string {
	in := r.in
	var parts []string
	if m := in.Model; m != nil {
		if m.Data.Description != "" {
			parts = append(parts, m.Data.Description)
		}
		parts = append(parts, fmt.Sprintf("record %s to %s", m.Data.FirstDate, m.Data.LastDate))
	}
	if in.Sim != nil {
		parts = append(parts, fmt.Sprintf("%d synthetic years for %d", in.Sim.Manifest.Paths, in.Sim.Manifest.Year))
	}
	if !in.Created.IsZero() {
		parts = append(parts, "created "+createdText(in.Created))
	}
	return strings.Join(parts, " · ")
}

func createdText(t time.Time) string {
	if t.IsZero() {
		return "—"
	}
	return t.UTC().Format("2006-01-02 15:04:05") + " UTC"
}

// writeSummary writes what the report is about, for a reader who never ran
// the tool, and the key facts of this run.
func (r *report) writeSummary() {
	in := r.in
	r.raw("<p class=\"intro\">This report comes from a statistical model of daily mean temperature fitted to a station " +
		"record: T(t) = S(t) + X(t), where S is a linear trend plus a seasonal cycle of period 365.25 days and X is an " +
		"autoregressive (AR) anomaly driven by random shocks whose size σ changes by calendar month. The model is " +
		"checked against the record, then run many times to produce synthetic years of the target year; each synthetic " +
		"year gives heating and cooling degree days (HDD, CDD), its coldest and hottest day and its longest cold spell. " +
		"The tail tables summarise those years: percentiles, expected shortfall (the mean of the worst 5 % or 1 % of " +
		"years) and 1-in-T return levels (passed on the adverse side once in T years on average).</p>\n")
	r.raw("<dl class=\"facts\">\n")
	fact := func(k, v string) { r.printf("<dt>%s</dt><dd>%s</dd>\n", esc(k), esc(v)) }
	if m := in.Model; m != nil {
		name := m.Data.File
		if m.Data.Description != "" {
			name = m.Data.Description + ", file " + m.Data.File
		}
		fact("Record", fmt.Sprintf("%s: %s to %s, %d days, %d missing, °%s", name, m.Data.FirstDate, m.Data.LastDate,
			m.Data.Days, m.Data.Missing, m.Data.Units))
		fact("Model", modelOneLine(m))
	}
	if s := in.Sim; s != nil {
		mf := s.Manifest
		fact("Simulation", fmt.Sprintf("%d synthetic years for %d (%s start), seed %d; periods %s", mf.Paths, mf.Year,
			mf.Start, mf.Seed, strings.Join(mf.Periods, ", ")))
		if len(s.Scenarios) > 0 {
			var names []string
			for _, sc := range s.Scenarios {
				names = append(names, sc.Name)
			}
			fact("Scenarios", strings.Join(names, ", "))
		}
	}
	if d := in.Demand; d != nil {
		fact("Demand", strings.TrimSpace(fmt.Sprintf("%s, %s, change-point form %s", d.Retailer, d.Unit, d.Form)))
	}
	r.raw("</dl>\n")
}

// modelOneLine describes a model's structure in one line.
func modelOneLine(m *model.File) string {
	u := degrees(m.Data.Units)
	trend := "no trend"
	if m.Trend.Kind == "linear" {
		trend = fmt.Sprintf("trend %+.2f %s/decade", 10*m.Trend.SlopePerYear, u)
	}
	slow := "no slow part"
	if sl := m.Slow; sl != nil {
		slow = fmt.Sprintf("slow part φ_slow %.4f (e-folding %.0f days, sd %s %s)", sl.Phi, sl.EFoldingDays, render.Num(sl.SD, 2), u)
	}
	return fmt.Sprintf("%s, %d seasonal harmonic(s), fast AR(%d), %s, monthly σ %s–%s %s, %s shocks", trend,
		len(m.Seasonal.Harmonics), len(m.AR.Phi), slow, render.Num(minOf(m.Volatility.Monthly[:]), 2),
		render.Num(maxOf(m.Volatility.Monthly[:]), 2), u, familyName(m.Shocks.Family))
}

func minOf(v []float64) float64 {
	out := math.Inf(1)
	for _, x := range v {
		out = min(out, x)
	}
	return out
}

func maxOf(v []float64) float64 {
	out := math.Inf(-1)
	for _, x := range v {
		out = max(out, x)
	}
	return out
}

func familyName(f string) string {
	switch f {
	case model.FamilyStudentT:
		return "Student-t"
	case model.FamilySkewT:
		return "skewed Student-t"
	case model.FamilyBootstrap:
		return "seasonal bootstrap"
	}
	return f
}

// writeFigure writes a plot with its colour key and caption.
func (r *report) writeFigure(f figure) {
	r.printf("<figure id=\"%s\">\n%s\n", r.uniqueID(f.ID), f.SVG)
	if len(f.Key) > 0 || f.Caption != "" {
		r.raw("<figcaption>")
		if len(f.Key) > 0 {
			r.raw("<ul class=\"key\">")
			for _, k := range f.Key {
				r.printf("<li><span class=\"sw %s\" style=\"%s\"></span>%s</li>", k.Style, swatchStyle(k), esc(k.Label))
			}
			r.raw("</ul>")
		}
		if f.Caption != "" {
			r.printf("<p>%s</p>", esc(f.Caption))
		}
		r.raw("</figcaption>\n")
	}
	r.raw("</figure>\n")
}

// swatchStyle is the inline colour of a key's swatch.
func swatchStyle(k keyItem) string {
	c := cssColor(k.Color)
	if k.Style == "band" || k.Style == "bar" || k.Style == "dot" {
		return "background:" + c
	}
	return "border-top-color:" + c
}

// cssColor writes a colour as rgba().
func cssColor(c interface{ RGBA() (r, g, b, a uint32) }) string {
	r, g, b, a := c.RGBA()
	if a == 0 {
		return "transparent"
	}
	un := func(v uint32) uint32 { return (v * 0xffff / a) >> 8 } // un-premultiply
	return fmt.Sprintf("rgba(%d,%d,%d,%.2f)", un(r), un(g), un(b), float64(a)/0xffff)
}

// kvTable writes a two-column table of label and value.
func (r *report) kvTable(class, caption string, rows [][2]string) {
	r.printf("<div class=\"wide\"><table class=\"kv %s\">\n", class)
	if caption != "" {
		r.printf("<caption>%s</caption>\n", esc(caption))
	}
	r.raw("<tbody>\n")
	for _, row := range rows {
		r.printf("<tr><th scope=\"row\">%s</th><td>%s</td></tr>\n", esc(row[0]), esc(row[1]))
	}
	r.raw("</tbody></table></div>\n")
}

// simpleTable writes a table of text cells; columns listed in numeric are
// right-aligned.
func (r *report) simpleTable(class, caption string, header []string, rows [][]string, numeric ...int) {
	isNum := map[int]bool{}
	for _, k := range numeric {
		isNum[k] = true
	}
	cls := func(k int) string {
		if isNum[k] {
			return " class=\"n\""
		}
		return ""
	}
	r.printf("<div class=\"wide\"><table class=\"%s\">\n", class)
	if caption != "" {
		r.printf("<caption>%s</caption>\n", esc(caption))
	}
	r.raw("<thead><tr>")
	for k, h := range header {
		r.printf("<th scope=\"col\"%s>%s</th>", cls(k), esc(h))
	}
	r.raw("</tr></thead>\n<tbody>\n")
	for _, row := range rows {
		r.raw("<tr>")
		for k, c := range row {
			r.printf("<td%s>%s</td>", cls(k), esc(c))
		}
		r.raw("</tr>\n")
	}
	r.raw("</tbody></table></div>\n")
}

// writeData writes section 1: the record and its quality.
func (r *report) writeData() error {
	in := r.in
	r.raw("<p>The daily mean temperatures the model was fitted to. Gaps are left as gaps: the fit uses only days " +
		"with a value (and, for the AR part, days whose previous days are present).</p>\n")
	if in.Series != nil && len(in.Series.Dates) == len(in.Series.Temps) && len(in.Series.Dates) > 0 {
		f, ok, err := seriesFigure(in.Series, in.Model)
		if err != nil {
			return err
		}
		if ok {
			r.writeFigure(f)
		}
	}
	r.kvTable("quality", "Data quality", r.dataRows())
	return nil
}

func (r *report) dataRows() [][2]string {
	in := r.in
	if m := in.Model; m != nil {
		d := m.Data
		rows := [][2]string{}
		if d.Description != "" {
			rows = append(rows, [2]string{"station", d.Description})
		}
		share := 0.0
		if d.Days > 0 {
			share = 100 * float64(d.Missing) / float64(d.Days)
		}
		rows = append(rows,
			[2]string{"file", d.File},
			[2]string{"SHA-256 of the file", d.SHA256},
			[2]string{"span", fmt.Sprintf("%s to %s (%.1f years)", d.FirstDate, d.LastDate, float64(d.Days)/365.25)},
			[2]string{"days in the span", strconv.Itoa(d.Days)},
			[2]string{"missing days", fmt.Sprintf("%d (%.2f %%)", d.Missing, share)},
			[2]string{"longest gap", fmt.Sprintf("%d days", d.LongestGap)},
			[2]string{"daily mean", d.MeanFrom},
			[2]string{"units", degrees(d.Units)},
		)
		if m.Diagnostics != nil {
			rows = append(rows, [2]string{"days used in the mean model", strconv.Itoa(m.Diagnostics.Observations)},
				[2]string{"days used in the AR fit", strconv.Itoa(m.Diagnostics.ARPairs)})
		}
		warn := "none"
		if len(d.Warnings) > 0 {
			warn = strings.Join(d.Warnings, "; ")
		}
		return append(rows, [2]string{"warnings", warn})
	}
	return nil
}

// paramRows is the compact table of a model's parameters.
func paramRows(m *model.File) [][2]string {
	u := degrees(m.Data.Units)
	rows := [][2]string{
		{"mean model S(t)", fmt.Sprintf("a + b·t + %d harmonic(s), period %.2f days, t in days since %s",
			len(m.Seasonal.Harmonics), m.Seasonal.PeriodDays, m.Trend.Epoch)},
		{"level a", fmt.Sprintf("%.3f %s", m.Trend.Intercept, u)},
	}
	est := m.Trend.Estimate
	if m.Trend.Kind == "linear" {
		annual := ""
		if est.Years >= 3 {
			annual = fmt.Sprintf(", %.3f from %d annual means", est.SEAnnual, est.Years)
		}
		rows = append(rows, [2]string{"trend b", fmt.Sprintf("%+.3f %s/decade (s.e. %.3f allowing for day-to-day autocorrelation%s)",
			10*m.Trend.SlopePerYear, u, est.SEAdjusted, annual)})
	} else {
		rows = append(rows, [2]string{"trend b", fmt.Sprintf("none (fitted slope %+.3f %s/decade, s.e. %.3f, not used)",
			est.PerDecade, u, est.SEAdjusted)})
	}
	for _, h := range m.Seasonal.Harmonics {
		rows = append(rows, [2]string{fmt.Sprintf("harmonic %d", h.K), fmt.Sprintf("amplitude %.3f %s, phase %.4f rad, first peak day %.1f (%s)",
			h.Amplitude, u, h.Phase, h.PeakDayOfYear, render.DayName(h.PeakDayOfYear))})
	}
	rows = append(rows,
		[2]string{"seasonal extremes", fmt.Sprintf("warmest day %.1f (%s), coldest day %.1f (%s); R² of S = %.4f",
			m.Seasonal.PeakDayOfYear, render.DayName(m.Seasonal.PeakDayOfYear), m.Seasonal.TroughDayOfYear,
			render.DayName(m.Seasonal.TroughDayOfYear), m.Seasonal.R2)})
	var phi []string
	for i, v := range m.AR.Phi {
		se := ""
		if i < len(m.AR.PhiSE) {
			se = fmt.Sprintf(" (s.e. %.4f)", m.AR.PhiSE[i])
		}
		phi = append(phi, fmt.Sprintf("φ%d = %.4f%s", i+1, v, se))
	}
	rows = append(rows, [2]string{fmt.Sprintf("fast part Y: AR(%d)", len(m.AR.Phi)), strings.Join(phi, ", ")})
	if sl := m.Slow; sl != nil {
		rows = append(rows, [2]string{"slow part F: AR(1)", fmt.Sprintf("φ_slow = %.4f (s.e. %.4f), e-folding time %.0f days, "+
			"stationary sd %.3f %s (s.e. %.3f); at the data end F = %+.2f ± %.2f %s",
			sl.Phi, sl.PhiSE, sl.EFoldingDays, sl.SD, u, sl.SDSE, sl.State, sl.StateSD, u)})
	} else {
		rows = append(rows, [2]string{"slow part F", "none"})
	}
	if c := m.Diagnostics; c != nil && c.SlowChoice != nil {
		rows = append(rows, [2]string{"slow part: choice", fmt.Sprintf("%s (likelihood ratio %.2f, p-value %s against ½χ²₁ + ½χ²₂; "+
			"BIC %s with, %s without)", c.SlowChoice.Rule, c.SlowChoice.LR, render.PValue(c.SlowChoice.P),
			render.Num(c.SlowChoice.BICWith, 1), render.Num(c.SlowChoice.BICWithout, 1))})
	}
	var sig []string
	for k, v := range m.Volatility.Monthly {
		sig = append(sig, fmt.Sprintf("%s %.3f", time.Month(k + 1).String()[:3], v))
	}
	rows = append(rows, [2]string{"σ by month (" + u + ")", strings.Join(sig, ", ")},
		[2]string{"shocks ε", render.ShockText(m.Shocks)})
	if sc := m.Scenario; sc != nil {
		rows = append(rows, [2]string{"scenario applied", sc.Name})
	}
	return rows
}

// writeFit writes section 2: the fitted model and its diagnostics.
func (r *report) writeFit() error {
	m := r.in.Model
	dg := m.Diagnostics
	r.printf("<p>Fitted model: %s. The seasonal mean explains %.1f %% of the daily variance (R²); the rest is the "+
		"anomaly X, which persists from day to day (AR) and is driven by shocks of a size σ that depends on the month.</p>\n",
		esc(modelOneLine(m)), 100*m.Seasonal.R2)
	r.kvTable("params", "Fitted parameters", paramRows(m))
	if m.Trend.Rule != "" {
		r.printf("<p class=\"note\">Trend: %s.</p>\n", esc(m.Trend.Rule))
	}

	r.raw("<h3>Seasonal cycle and volatility</h3>\n")
	f, ok, err := seasonalFigure(m, r.in.Series)
	if err != nil {
		return err
	}
	if ok {
		r.writeFigure(f)
	}
	r.raw("<div class=\"grid\">\n")
	sf, err := sigmaFigure(m)
	if err != nil {
		return err
	}
	r.writeFigure(sf)
	if dg != nil && len(dg.ACF) > 0 && len(dg.PACF) > 0 {
		r.raw("</div>\n<h3>Persistence: autocorrelation of the anomaly X</h3>\n")
		r.printf("<p>The anomaly's autocorrelation (ACF) decays with the lag; its partial autocorrelation (PACF) shows "+
			"how many past days matter once the nearer days are known. For an AR(%d) the PACF should be small beyond "+
			"lag %d. Bars beyond the dashed bounds are significant at the 5 %% level.</p>\n<div class=\"grid\">\n",
			len(m.AR.Phi), len(m.AR.Phi))
		acf, err := correlogramFigure("fig-acf", "ACF of the anomaly X", "autocorrelation", dg.ACF, dg.ACFBound)
		if err != nil {
			return err
		}
		r.writeFigure(acf)
		pacf, err := correlogramFigure("fig-pacf", "PACF of the anomaly X", "partial autocorrelation", dg.PACF, dg.ACFBound)
		if err != nil {
			return err
		}
		r.writeFigure(pacf)
	}
	r.raw("</div>\n")

	_, famName := shockDist(m)
	hasQQ := dg != nil && len(dg.QQTheoretical) > 1 && len(dg.QQTheoretical) == len(dg.QQSample)
	hasZ := r.in.Series != nil && len(r.in.Series.Z) > 0
	if hasQQ || hasZ {
		r.printf("<h3>Shocks: distribution of the standardized innovations z</h3>\n<p>z is each day's innovation divided "+
			"by its month's σ. The simulator draws z from the fitted %s.</p>\n<div class=\"grid\">\n", esc(famName))
		if hasQQ {
			qq, err := qqFigure(dg.QQTheoretical, dg.QQSample, famName)
			if err != nil {
				return err
			}
			r.writeFigure(qq)
		}
		if hasZ {
			h, ok, err := shockHistFigure(r.in.Series.Z, m)
			if err != nil {
				return err
			}
			if ok {
				r.writeFigure(h)
			}
		}
		r.raw("</div>\n")
	}
	if dg == nil {
		r.raw("<p class=\"note\">The model file carries no diagnostics.</p>\n")
		return nil
	}
	r.writeOrderTables(m)
	r.writeTests(m)
	r.writeSpread(m)
	return nil
}

// writeOrderTables writes the harmonics and AR-order BIC tables and the
// shock-family AIC table.
func (r *report) writeOrderTables(m *model.File) {
	dg := m.Diagnostics
	r.raw("<h3>Model choice</h3>\n<p>Lower BIC or AIC is better; a difference above 10 is strong evidence. " +
		"Δ is the difference from the lowest value.</p>\n<div class=\"tables\">\n")
	orderTable := func(caption, col string, s []model.OrderScore) {
		if len(s) == 0 {
			return
		}
		best := math.Inf(1)
		for _, o := range s {
			best = min(best, o.BIC)
		}
		var rows [][]string
		for _, o := range s {
			note := ""
			if o.Chosen {
				note = "fitted"
			}
			rows = append(rows, []string{strconv.Itoa(o.Order), render.Num(o.BIC, 1), render.Num(o.BIC-best, 1), note})
		}
		r.simpleTable("order", caption, []string{col, "BIC", "Δ BIC", ""}, rows, 1, 2)
	}
	orderTable("Seasonal harmonics by BIC", "harmonics K", dg.HarmonicsTable)
	orderTable("Fast AR order by BIC (exact likelihood; with the slow part in the model when it was considered)", "order p", dg.ARTable)
	if len(dg.ShockTable) > 0 {
		best := math.Inf(1)
		for _, s := range dg.ShockTable {
			if s.Family != model.FamilyBootstrap {
				best = min(best, s.AIC)
			}
		}
		var rows [][]string
		for _, s := range dg.ShockTable {
			if s.Family == model.FamilyBootstrap {
				rows = append(rows, []string{familyName(s.Family), "—", "—", "—", "—", "no likelihood", render.Mark(s.Chosen)})
				continue
			}
			rows = append(rows, []string{familyName(s.Family), render.Num(s.LogLik, 1), strconv.Itoa(s.Params), render.Num(s.AIC, 1),
				render.Num(s.AIC-best, 1), render.ShapeText(s), render.Mark(s.Chosen)})
		}
		r.simpleTable("order", "Shock family by AIC", []string{"family", "log-likelihood", "shape parameters", "AIC",
			"Δ AIC", "shape", ""}, rows, 1, 2, 3, 4)
	}
	r.raw("</div>\n")
	if dg.ARAdvice != "" {
		r.printf("<p class=\"warn\">Note: %s.</p>\n", esc(dg.ARAdvice))
	}
}

// writeTests writes the diagnostic tests with plain-language verdicts.
func (r *report) writeTests(m *model.File) {
	dg := m.Diagnostics
	p := len(m.AR.Phi)
	lb := func(t model.Test) string {
		if t.P < 0.05 {
			return fmt.Sprintf("AR(%d) leaves autocorrelation in the shocks: consider a higher order", p)
		}
		return "no remaining autocorrelation detected at the 5 % level"
	}
	lb2 := func(t model.Test) string {
		if t.P < 0.05 {
			return "shock sizes cluster in time beyond the monthly σ (volatility clustering): extremes of short windows may be understated"
		}
		return "no volatility clustering detected beyond the monthly σ at the 5 % level"
	}
	jb := "consistent with normal shocks at the 5 % level"
	if dg.JarqueBera.P < 0.05 {
		jb = fmt.Sprintf("the shocks are not normal (skewness %.2f, excess kurtosis %.2f): a fat-tailed or skewed family is warranted",
			dg.Skewness, dg.ExcessKurtosis)
	}
	fam := familyName(dg.KSFamily)
	ks := fmt.Sprintf("no departure from the fitted %s detected at the 5 %% level", fam)
	if dg.KS.P < 0.05 {
		ks = fmt.Sprintf("the shocks depart from the fitted %s at the 5 %% level; with %d days even small departures "+
			"are detected, so judge their size in the QQ plot", fam, dg.ARPairs)
	}
	t := func(name string, x model.Test, df bool, v string) []string {
		d := ""
		if df {
			d = render.Num(x.DF, 0)
		}
		return []string{name, render.Num(x.Stat, 3), d, render.PValue(x.P), v}
	}
	rows := [][]string{
		t("Ljung–Box Q(10) on z", dg.LjungBoxZ10, true, lb(dg.LjungBoxZ10)),
		t("Ljung–Box Q(20) on z", dg.LjungBoxZ20, true, lb(dg.LjungBoxZ20)),
		t("Ljung–Box Q(10) on z²", dg.LjungBoxZ210, true, lb2(dg.LjungBoxZ210)),
		t("Ljung–Box Q(20) on z²", dg.LjungBoxZ220, true, lb2(dg.LjungBoxZ220)),
		t("Jarque–Bera (normality)", dg.JarqueBera, true, jb),
		t("Kolmogorov–Smirnov D against the "+fam, dg.KS, false, ks),
		{"skewness of z", render.Num(dg.Skewness, 3), "", "", skewText(dg.Skewness)},
		{"excess kurtosis of z", render.Num(dg.ExcessKurtosis, 3), "", "", kurtText(dg.ExcessKurtosis)},
	}
	r.raw("<h3>Diagnostic tests of the standardized shocks z</h3>\n")
	r.simpleTable("tests", "", []string{"test", "statistic", "df", "p-value", "what it means"}, rows, 1, 2, 3)
}

func skewText(s float64) string {
	switch {
	case s < -0.1:
		return "longer cold tail than warm tail"
	case s > 0.1:
		return "longer warm tail than cold tail"
	}
	return "close to symmetric"
}

func kurtText(k float64) string {
	if k > 0.2 {
		return "more extreme days than a normal distribution gives"
	}
	return "tails close to normal"
}

// writeSpread writes the window-spread comparison and what it means for
// seasonal degree-day tails.
func (r *report) writeSpread(m *model.File) {
	dg := m.Diagnostics
	if len(dg.Spread) == 0 {
		return
	}
	u := degrees(m.Data.Units)
	var rows [][]string
	var notes []string
	for _, s := range dg.Spread {
		band, fast := "—", "—"
		if s.Band[1] > 0 {
			band = render.Num(s.Band[0], 3) + "–" + render.Num(s.Band[1], 3)
		}
		if s.BandFastOnly != nil {
			fast = render.Num(s.BandFastOnly[0], 3) + "–" + render.Num(s.BandFastOnly[1], 3)
		}
		rows = append(rows, []string{fmt.Sprintf("%d-day means", s.Days), strconv.Itoa(s.Windows), render.Num(s.Observed, 3),
			render.Num(s.Model, 3), band, s.Verdict, fast})
		notes = append(notes, spreadSentence(s, m.Slow != nil))
	}
	r.raw("<h3>Spread of window means: data against model</h3>\n<p>Degree days of a month or a season are sums of " +
		"daily values, so their tails depend on how widely the mean anomaly of a whole window varies. This compares " +
		"the standard deviation of non-overlapping window means of X in the record with what the fitted model implies, " +
		"and gives the 5–95 % range of that sd in records of the same length and gaps simulated from the fitted model " +
		"(and from the fast AR alone, for comparison): an observed sd outside the band is evidence against the model's " +
		"spread at that scale.</p>\n")
	r.simpleTable("spread", "", []string{"window", "windows", "observed sd (" + u + ")", "model sd (" + u + ")",
		"90 % band (" + u + ")", "observed", "band without the slow part"}, rows, 1, 2, 3)
	r.raw("<ul class=\"verdicts\">\n")
	for _, n := range notes {
		r.printf("<li>%s</li>\n", esc(n))
	}
	r.raw("</ul>\n")
}

func spreadSentence(s model.WindowSpread, slow bool) string {
	switch s.Verdict {
	case "inside":
		return fmt.Sprintf("%d-day windows: the observed spread lies inside the model's band, so degree-day sums over "+
			"such windows should have about the right width.", s.Days)
	case "too narrow":
		if !slow {
			return fmt.Sprintf("%d-day windows: the observed spread lies above the model's band: simulated sums over such "+
				"windows are too narrow and their tails understated. Refit with the slow part (--slow on); more AR lags "+
				"do not add low-frequency spread.", s.Days)
		}
		return fmt.Sprintf("%d-day windows: the observed spread lies above the model's band even with the slow part: "+
			"read tails over such windows as lower bounds.", s.Days)
	case "too wide":
		return fmt.Sprintf("%d-day windows: the observed spread lies below the model's band: the model is wider than "+
			"the record at that span, so tails there err on the cautious side.", s.Days)
	}
	return fmt.Sprintf("%d-day windows: no band (too few windows or the lean fit).", s.Days)
}

// writeManifest writes section 6: provenance of the run and the cautions.
func (r *report) writeManifest() error {
	in := r.in
	version := ""
	switch {
	case in.Sim != nil:
		version = in.Sim.Manifest.ToolVersion
	case in.Model != nil:
		version = in.Model.ToolVersion
	}
	rows := [][2]string{
		{"tool", strings.TrimSpace("wxstress " + version)},
		{"created", createdText(in.Created)},
		{"run time", runTimeText(in.RunTime)},
	}
	if s := in.Sim; s != nil {
		mf := s.Manifest
		u := degrees(mf.Units)
		scen := "none"
		if len(mf.Scenarios) > 0 {
			scen = strings.Join(mf.Scenarios, ", ")
		}
		rows = append(rows,
			[2]string{"model file", mf.ModelFile},
			[2]string{"model SHA-256", mf.ModelSHA256},
			[2]string{"data SHA-256", mf.DataSHA256},
			[2]string{"seed", strconv.FormatUint(mf.Seed, 10)},
			[2]string{"synthetic years (paths)", strconv.Itoa(mf.Paths)},
			[2]string{"target year", strconv.Itoa(mf.Year)},
			[2]string{"start", mf.Start},
			[2]string{"periods", strings.Join(mf.Periods, ", ")},
			[2]string{"days simulated per path", strconv.Itoa(mf.SimulatedDays)},
			[2]string{"bases", fmt.Sprintf("HDD %g %s, CDD %g %s, cold day below %g %s", mf.HDDBase, u, mf.CDDBase, u,
				mf.ColdBelow, u)},
			[2]string{"shocks", mf.Shocks},
			[2]string{"scenarios", scen},
		)
		if mf.DemandModel != "" {
			rows = append(rows, [2]string{"demand model", mf.DemandModel}, [2]string{"demand model SHA-256", mf.DemandSHA256})
		}
		if mf.Capacity > 0 {
			rows = append(rows, [2]string{"capacity", strings.TrimSpace(fmt.Sprintf("%g %s", mf.Capacity, r.demandUnit()))})
		}
		rows = append(rows, [2]string{"quantile convention", mf.Quantiles})
	}
	r.kvTable("manifest", "Run", rows)
	if len(in.Inputs) > 0 {
		var files [][]string
		for _, f := range in.Inputs {
			files = append(files, []string{f.Role, f.Name, f.SHA256})
		}
		r.simpleTable("inputs", "Input files", []string{"role", "file", "SHA-256"}, files)
	}
	if in.Model != nil {
		r.kvTable("params", "Model parameters", paramRows(in.Model))
	}
	r.raw("<h3 id=\"cautions\">Cautions</h3>\n<ul class=\"cautions\">\n")
	for _, c := range r.cautions() {
		r.printf("<li>%s</li>\n", esc(c))
	}
	r.raw("</ul>\n")
	return nil
}

func runTimeText(d time.Duration) string {
	if d <= 0 {
		return "—"
	}
	return d.Round(time.Millisecond).String()
}

// cautions lists what a reader must keep in mind, the statement every
// output carries first.
func (r *report) cautions() []string {
	out := []string{render.Caution}
	if s := r.in.Sim; s != nil && s.Manifest.Paths > 0 {
		n := s.Manifest.Paths
		out = append(out, fmt.Sprintf("Tail numbers are Monte Carlo estimates from %d synthetic years: the 1-in-100 "+
			"level rests on about %d years beyond it and the 99 %% expected shortfall on the worst %d, so they carry "+
			"sampling error; more paths narrow it.", n, n/100, max(1, int(math.Ceil(0.01*float64(n))))))
	}
	if s := r.in.Sim; s != nil && len(s.Scenarios) > 0 {
		out = append(out, "Scenarios are what-if changes to the fitted model (level, trend, volatility, persistence, "+
			"tails or injected events), not projections of what will happen.")
	}
	out = append(out, "The model is only as good as the record and the fit: read the diagnostics before relying on "+
		"the tails, in particular the spread of window means for seasonal degree days.")
	return out
}

// reportCSS styles the page on screen and in print. It names local font
// families only; nothing is fetched.
const reportCSS = `:root { --ink: #1b1b1b; --muted: #555; --rule: #d4d4d4; --head: #f1f1f1; --accent: #0072b2; --warn: #d55e00; }
* { box-sizing: border-box; }
html { -webkit-text-size-adjust: 100%; }
body { margin: 0; color: var(--ink); background: #fff; font: 15px/1.45 "Liberation Sans", Arial, Helvetica, sans-serif; }
main { max-width: 1200px; margin: 0 auto; padding: 20px 28px 48px; }
h1 { font-size: 1.65em; margin: 0.2em 0 0.1em; }
h2 { font-size: 1.35em; margin: 1.8em 0 0.6em; padding-bottom: 0.15em; border-bottom: 2px solid var(--accent); }
h3 { font-size: 1.1em; margin: 1.5em 0 0.4em; }
h4 { font-size: 1em; margin: 1.2em 0 0.3em; }
p { max-width: 60em; }
.sub { color: var(--muted); margin: 0 0 0.8em; }
.caution { border-left: 6px solid var(--warn); background: #fbeee4; padding: 0.6em 1em; margin: 0.8em 0; max-width: 60em; }
.intro { margin: 0.8em 0; }
.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0.15em 1.2em; margin: 0.8em 0; }
.facts dt { font-weight: bold; }
.facts dd { margin: 0; }
.toc { margin: 1em 0; }
.toc ol { margin: 0.3em 0; padding-left: 1.6em; columns: 2; max-width: 36em; }
a { color: var(--accent); }
.note { color: var(--muted); }
.warn { color: var(--warn); font-weight: bold; }
.wide { overflow-x: auto; }
table { border-collapse: collapse; margin: 0.5em 0 1.2em; font-size: 0.88em; }
caption { text-align: left; font-weight: bold; padding: 0 0 0.3em; }
th, td { border-bottom: 1px solid var(--rule); padding: 0.2em 0.6em; text-align: left; vertical-align: top; }
thead th { background: var(--head); border-bottom: 2px solid #999; vertical-align: bottom; }
tbody th { font-weight: normal; }
.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.u { display: block; font-weight: normal; color: var(--muted); font-size: 0.9em; }
tr.sep th, tr.sep td { border-top: 2px solid #bbb; }
tr.group th { background: #fafafa; font-weight: bold; }
.kv th { white-space: nowrap; padding-right: 1.5em; }
.kv td, .inputs td { overflow-wrap: anywhere; }
.tables { display: flex; flex-wrap: wrap; gap: 0 2.5em; align-items: flex-start; }
.verdicts li { margin: 0.2em 0; max-width: 60em; }
figure { margin: 0.8em 0 1.4em; break-inside: avoid; page-break-inside: avoid; }
figure svg { display: block; max-width: 100%; height: auto; }
figcaption { font-size: 0.86em; color: var(--muted); max-width: 16cm; }
figcaption p { margin: 0.3em 0 0; }
.key { list-style: none; margin: 0.3em 0 0; padding: 0; display: flex; flex-wrap: wrap; gap: 0.15em 1.2em; color: var(--ink); }
.sw { display: inline-block; width: 24px; height: 0; margin-right: 0.4em; vertical-align: middle; border-top: 3px solid; }
.sw.dash { border-top-style: dashed; }
.sw.band, .sw.bar { height: 11px; border-top: 0; }
.sw.dot { width: 10px; height: 10px; border-top: 0; border-radius: 50%; }
.grid { display: grid; grid-template-columns: repeat(auto-fill, minmax(450px, 1fr)); gap: 0 1.5em; align-items: start; }
details { margin: 0.8em 0; }
summary { cursor: pointer; font-weight: bold; color: var(--accent); }
.cautions li { margin: 0.3em 0; max-width: 60em; }
footer { margin-top: 3em; padding-top: 0.6em; border-top: 1px solid var(--rule); color: var(--muted); font-size: 0.85em; }
@media (max-width: 700px) { main { padding: 12px; } .grid { grid-template-columns: 1fr; } .toc ol { columns: 1; } }
@media print {
  @page { margin: 14mm 12mm; }
  body { font-size: 9.5pt; }
  main { max-width: none; padding: 0; }
  section.top { break-before: page; page-break-before: always; }
  h2, h3, h4, caption { break-after: avoid; page-break-after: avoid; }
  a { color: inherit; text-decoration: none; }
  .wide { overflow: visible; }
  table { font-size: 8.5pt; break-inside: auto; }
  thead { display: table-header-group; }
  tr { break-inside: avoid; page-break-inside: avoid; }
  .grid { display: block; }
  figure svg { max-width: 100%; }
  details > summary { list-style: none; }
  details::details-content { content-visibility: visible; display: contents; }
  .caution { background: none; }
}
`
