package report

import (
	"bytes"
	"embed"
	"fmt"
	"html/template"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"

	"wxstress/internal/numfmt"
	"wxstress/internal/render"
	"wxstress/model"
	"wxstress/stress"
)

// Write writes in as one self-contained HTML5 page: inline CSS and
// inline SVG plots, no script, no external resource of any kind, laid out to
// print on A4 or Letter. Each section appears only when its input is
// present: Data (Series or Model), Fit (Model), Simulation (Sim or Fan),
// Scenarios (Sim.Scenarios), Demand (Demand, or demand rows in Sim), and
// always the Manifest with the cautions.
//
// The page is the template "page" of templates/*.html executed by
// html/template, which escapes every text of the input; only the SVG plots
// this package draws and the embedded style sheet are inserted as trusted
// markup.
//
// The numbers of the tail tables are formatted from the same sim.Row values
// as SimJSON and SimCSV, with a fixed number of decimals, and every number
// cell carries data-scen, data-period, data-index and data-stat attributes
// (statistic keys as in SimCSV) so that scripts can read them back.
//
// Write builds the page in memory and writes it with one Write, so a
// plotting error leaves w untouched. It panics if in or its model is nil.
func Write(w io.Writer, in *Input) error {
	if in == nil || in.Model == nil {
		panic("report: Write needs an input with a model")
	}
	p, err := newBuilder(in).page()
	if err != nil {
		return err
	}
	var b bytes.Buffer
	if err := templates.ExecuteTemplate(&b, "page", p); err != nil {
		return err
	}
	_, err = w.Write(b.Bytes())
	return err
}

// The page's templates and style sheet, embedded in the binary.
var (
	//go:embed templates/*.html
	templateFiles embed.FS
	//go:embed templates/style.css
	styleSheet string

	templates = template.Must(template.ParseFS(templateFiles, "templates/*.html"))
)

// builder turns a Input into the page's view: the values the
// templates show, in the order the page shows them (ids are numbered in
// that order).
type builder struct {
	in    *Input
	units string // "C", "F" or ""
	ids   map[string]int
}

func newBuilder(in *Input) *builder {
	b := &builder{in: in, ids: map[string]int{}}
	switch {
	case in.Model != nil:
		b.units = in.Model.Data.Units
	case in.Sim != nil:
		b.units = in.Sim.Manifest.Units
	}
	return b
}

// uniqueID returns s made into an id, with a suffix if it was used before.
func (b *builder) uniqueID(s string) string {
	var sb strings.Builder
	for _, c := range strings.ToLower(s) {
		switch {
		case c >= 'a' && c <= 'z', c >= '0' && c <= '9', c == '-':
			sb.WriteRune(c)
		default:
			sb.WriteByte('-')
		}
	}
	id := sb.String()
	b.ids[id]++
	if k := b.ids[id]; k > 1 {
		id += "-" + strconv.Itoa(k)
	}
	return id
}

// page is what the template "page" shows.
type page struct {
	Title, Subtitle, Caution string
	CSS                      template.CSS
	Facts                    [][2]string   // label, value
	Sections                 []pageSection // the present ones, in order
	// Summary is the one-page summary of a simulation, the same as the
	// terminal's; nil for a report without one.
	Summary *render.Summary
}

// pageSection is one numbered top-level section; Body is the value of the
// template named like its ID.
type pageSection struct {
	ID, Title string
	Number    int
	Body      any
}

func (b *builder) page() (*page, error) {
	in := b.in
	title := in.Title
	if title == "" {
		title = "wxstress report"
		if in.Model != nil && in.Model.Data.Description != "" {
			title += ": " + in.Model.Data.Description
		}
	}
	p := &page{Title: title, Subtitle: b.subtitle(), Caution: render.Caution, CSS: template.CSS(styleSheet),
		Facts: b.facts()}
	if in.Sim != nil {
		p.Summary = render.NewSummary(in.Sim, in.Model)
	}
	for _, s := range []struct {
		id, title string
		present   bool
		body      func() (any, error)
	}{
		{"data", "Data", in.Series != nil || in.Model != nil, b.dataSection},
		{"fit", "Fit", in.Model != nil, b.fitSection},
		{"simulation", "Simulation", in.Sim != nil && len(temperatureRows(in.Sim.Rows)) > 0 || in.Fan != nil, b.simulationSection},
		{"scenarios", "Scenarios", in.Sim != nil && len(in.Sim.Scenarios) > 0, b.scenariosSection},
		{"demand", "Demand", in.Demand != nil || in.Sim != nil && len(demandRows(in.Sim.Rows)) > 0, b.demandSection},
		{"manifest", "Manifest and cautions", true, b.manifestSection},
	} {
		if !s.present {
			continue
		}
		body, err := s.body()
		if err != nil {
			return nil, err
		}
		p.Sections = append(p.Sections, pageSection{ID: s.id, Title: s.title, Number: len(p.Sections) + 1, Body: body})
	}
	return p, nil
}

func (b *builder) subtitle() string {
	in := b.in
	var parts []string
	if m := in.Model; m != nil {
		if m.Data.Description != "" {
			parts = append(parts, m.Data.Description)
		}
		parts = append(parts, fmt.Sprintf("record %s to %s", m.Data.FirstDate, m.Data.LastDate))
	}
	if in.Sim != nil {
		parts = append(parts, fmt.Sprintf("%s synthetic years for %d", numfmt.Number(float64(in.Sim.Manifest.Paths)), in.Sim.Manifest.Year))
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

// facts are the key facts of this run, below the page's introduction for a
// reader who never ran the tool.
func (b *builder) facts() [][2]string {
	in := b.in
	var facts [][2]string
	fact := func(k, v string) { facts = append(facts, [2]string{k, v}) }
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
		fact("Simulation", fmt.Sprintf("%s synthetic years for %d (%s start), seed %d; periods %s", numfmt.Number(float64(mf.Paths)), mf.Year,
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
	return facts
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
	return fmt.Sprintf("%s, %s, fast AR(%d), %s, monthly σ %s–%s %s, %s shocks", trend,
		render.Plural(len(m.Seasonal.Harmonics), "seasonal harmonic"), len(m.AR.Phi), slow, render.Num(minOf(m.Volatility.Monthly[:]), 2),
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

func familyName(f string) string { return model.FamilyLabel(f) }

// figView is a plot as the template "figure" shows it.
type figView struct {
	ID      string
	SVG     template.HTML // drawn by this package, not text of the input
	Key     []keyView
	Caption string
}

// keyView is one entry of a figure's colour key.
type keyView struct {
	Label, Style string
	Swatch       template.CSS // made by swatchStyle from a colour
}

// figure gives f its unique id and makes it a figView.
func (b *builder) figure(f figure) *figView {
	v := &figView{ID: b.uniqueID(f.ID), SVG: template.HTML(f.SVG), Caption: f.Caption}
	for _, k := range f.Key {
		v.Key = append(v.Key, keyView{Label: k.Label, Style: k.Style, Swatch: template.CSS(swatchStyle(k))})
	}
	return v
}

// figGroup is what the template "figures" shows: plots in a grid, inside a
// closed <details> headed by Summary unless Open, and notes below.
type figGroup struct {
	Figures []*figView
	Notes   []string
	Open    bool
	Summary string
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

// kvTable is what the template "kv" shows: a two-column table of label
// and value.
type kvTable struct {
	Class, Caption string
	Rows           [][2]string
}

// textTable is what the template "table" shows: a table of text cells.
type textTable struct {
	Class, Caption string
	Header         []textCell
	Rows           [][]textCell
}

// textCell is a cell of a textTable; Num cells are right-aligned.
type textCell struct {
	Text string
	Num  bool
}

// newTextTable lays out a table of text cells; columns listed in numeric
// are right-aligned.
func newTextTable(class, caption string, header []string, rows [][]string, numeric ...int) textTable {
	cells := func(texts []string) []textCell {
		out := make([]textCell, len(texts))
		for k, t := range texts {
			out[k] = textCell{Text: t, Num: slices.Contains(numeric, k)}
		}
		return out
	}
	t := textTable{Class: class, Caption: caption, Header: cells(header)}
	for _, row := range rows {
		t.Rows = append(t.Rows, cells(row))
	}
	return t
}

// dataView is section 1: the record and its quality.
type dataView struct {
	Record  *figView // nil without the observed series
	Quality kvTable
}

func (b *builder) dataSection() (any, error) {
	in := b.in
	v := &dataView{Quality: kvTable{"quality", "Data quality", b.dataRows()}}
	if in.Series != nil && len(in.Series.Dates) == len(in.Series.Temps) && len(in.Series.Dates) > 0 {
		f, ok, err := seriesFigure(in.Series, in.Model)
		if err != nil {
			return nil, err
		}
		if ok {
			v.Record = b.figure(f)
		}
	}
	return v, nil
}

func (b *builder) dataRows() [][2]string {
	in := b.in
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
			[2]string{"longest gap", render.Plural(d.LongestGap, "day")},
			[2]string{"daily mean", d.MeanFrom},
			[2]string{"units", degrees(d.Units)},
		)
		if m.Diagnostics != nil {
			rows = append(rows, [2]string{"days used in the mean model", strconv.Itoa(m.Diagnostics.Observations)},
				[2]string{"days used in the AR fit", strconv.Itoa(m.Diagnostics.ARPairs)})
		}
		warn := "none"
		var checks []stress.ExtremeCheck
		if in.Sim != nil {
			checks = in.Sim.Extremes
		}
		if ws := render.FitWarnings(m, checks); len(ws) > 0 {
			warn = strings.Join(ws, "; ")
		}
		return append(rows, [2]string{"warnings", warn})
	}
	return nil
}

// paramRows is the compact table of a model's parameters.
func paramRows(m *model.File) [][2]string {
	u := degrees(m.Data.Units)
	rows := [][2]string{
		{"mean model S(t)", fmt.Sprintf("a + b·t + %s, period %.2f days, t in days since %s",
			render.Plural(len(m.Seasonal.Harmonics), "harmonic"), m.Seasonal.PeriodDays, m.Trend.Epoch)},
		{"level a", fmt.Sprintf("%.3f %s", m.Trend.Intercept, u)},
	}
	est := m.Trend.Estimate
	if m.Trend.Kind == "linear" {
		rows = append(rows, [2]string{"trend b", fmt.Sprintf("%+.3f %s/decade (s.e. %.3f allowing for day-to-day autocorrelation%s)",
			10*m.Trend.SlopePerYear, u, est.SEAdjusted, render.AnnualSEText(est))})
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
		gain := ""
		if g := c.SlowChoice.AnnualSpreadGain; g != 0 { // 0: not computed
			gain = "; with it the model's sd of 365-day means is " + numfmt.Percent(g) + " wider"
		}
		rows = append(rows, [2]string{"slow part: choice", fmt.Sprintf("%s (likelihood ratio %.2f, p-value %s against ½χ²₁ + ½χ²₂; "+
			"BIC %s with, %s without%s)", c.SlowChoice.Rule, c.SlowChoice.LR,
			render.PValue(c.SlowChoice.P), render.Num(c.SlowChoice.BICWith, 1), render.Num(c.SlowChoice.BICWithout, 1), gain)})
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

// fitView is section 2: the fitted model and its diagnostics.
type fitView struct {
	OneLine   string
	R2Percent float64
	Params    kvTable
	TrendRule string

	Seasonal  *figView // nil when it cannot be drawn
	Sigma     *figView
	AROrder   int
	ACF, PACF *figView // nil without a correlogram

	ShockBlock bool       // the shocks have a QQ plot or observed values
	Family     string     // the shock family's name
	Shocks     []*figView // QQ plot and histogram, those there are

	Diagnostics *diagnosticsView // nil when the model file carries none
}

// diagnosticsView is the model choice, the tests and the window spread.
type diagnosticsView struct {
	Choice   []textTable
	ARAdvice string
	Tests    textTable
	Spread   *spreadView // nil without window spreads
}

// spreadView compares the spread of window means with the model's.
type spreadView struct {
	Table    textTable
	Verdicts []string
}

func (b *builder) fitSection() (any, error) {
	m := b.in.Model
	dg := m.Diagnostics
	v := &fitView{OneLine: modelOneLine(m), R2Percent: 100 * m.Seasonal.R2,
		Params: kvTable{"params", "Fitted parameters", paramRows(m)}, TrendRule: m.Trend.Rule, AROrder: len(m.AR.Phi)}
	f, ok, err := seasonalFigure(m, b.in.Series)
	if err != nil {
		return nil, err
	}
	if ok {
		v.Seasonal = b.figure(f)
	}
	sf, err := sigmaFigure(m)
	if err != nil {
		return nil, err
	}
	v.Sigma = b.figure(sf)
	if dg != nil && len(dg.ACF) > 0 && len(dg.PACF) > 0 {
		acf, err := correlogramFigure("fig-acf", "ACF of the anomaly X", "autocorrelation", dg.ACF, dg.ACFBound)
		if err != nil {
			return nil, err
		}
		v.ACF = b.figure(acf)
		pacf, err := correlogramFigure("fig-pacf", "PACF of the anomaly X", "partial autocorrelation", dg.PACF, dg.ACFBound)
		if err != nil {
			return nil, err
		}
		v.PACF = b.figure(pacf)
	}

	_, v.Family = shockDist(m)
	hasQQ := dg != nil && len(dg.QQTheoretical) > 1 && len(dg.QQTheoretical) == len(dg.QQSample)
	hasZ := b.in.Series != nil && len(b.in.Series.Z) > 0
	v.ShockBlock = hasQQ || hasZ
	if hasQQ {
		qq, err := qqFigure(dg.QQTheoretical, dg.QQSample, v.Family)
		if err != nil {
			return nil, err
		}
		v.Shocks = append(v.Shocks, b.figure(qq))
	}
	if hasZ {
		h, ok, err := shockHistFigure(b.in.Series.Z, m)
		if err != nil {
			return nil, err
		}
		if ok {
			v.Shocks = append(v.Shocks, b.figure(h))
		}
	}
	if dg != nil {
		v.Diagnostics = &diagnosticsView{Choice: orderTables(m), ARAdvice: dg.ARAdvice, Tests: testsTable(m),
			Spread: spread(m)}
	}
	return v, nil
}

// orderTables are the harmonics and AR-order BIC tables and the
// shock-family AIC table, those the diagnostics have.
func orderTables(m *model.File) []textTable {
	dg := m.Diagnostics
	var tables []textTable
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
		tables = append(tables, newTextTable("order", caption, []string{col, "BIC", "Δ BIC", ""}, rows, 1, 2))
	}
	if dg.HarmonicsRho != 0 {
		title, head, rows := render.HarmonicsTable(dg)
		head[0] = "harmonics K"
		tables = append(tables, newTextTable("order", title, head, rows, 1, 2))
	} else {
		orderTable("Seasonal harmonics by BIC", "harmonics K", dg.HarmonicsTable)
	}
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
		tables = append(tables, newTextTable("order", "Shock family by AIC", []string{"family", "log-likelihood",
			"shape parameters", "AIC", "Δ AIC", "shape", ""}, rows, 1, 2, 3, 4))
	}
	return tables
}

// testsTable is the diagnostic tests with plain-language verdicts.
func testsTable(m *model.File) textTable {
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
	return newTextTable("tests", "", []string{"test", "statistic", "df", "p-value", "what it means"}, rows, 1, 2, 3)
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

// spread is the window-spread comparison and what it means for seasonal
// degree-day tails; nil without window spreads.
func spread(m *model.File) *spreadView {
	dg := m.Diagnostics
	if len(dg.Spread) == 0 {
		return nil
	}
	u := degrees(m.Data.Units)
	var rows [][]string
	v := &spreadView{}
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
		v.Verdicts = append(v.Verdicts, spreadSentence(s, m.Slow != nil))
	}
	v.Table = newTextTable("spread", "", []string{"window", "windows", "observed sd (" + u + ")", "model sd (" + u + ")",
		"90 % band (" + u + ")", "observed", "band without the slow part"}, rows, 1, 2, 3)
	return v
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

// manifestView is section 6: provenance of the run and the cautions.
type manifestView struct {
	Run      kvTable
	Inputs   *textTable // nil without input files
	Params   *kvTable   // nil without a model
	Cautions []string
}

func (b *builder) manifestSection() (any, error) {
	in := b.in
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
		if mf.RunID != "" { // ties the page to the tails files written with it
			rows = append(rows, [2]string{"run id", mf.RunID})
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
			rows = append(rows, [2]string{"capacity", strings.TrimSpace(numfmt.Number(mf.Capacity) + " " + b.demandUnit())})
		}
		rows = append(rows, [2]string{"quantile convention", mf.Quantiles})
	}
	v := &manifestView{Run: kvTable{"manifest", "Run", rows}, Cautions: b.cautions()}
	if len(in.Inputs) > 0 {
		var files [][]string
		for _, f := range in.Inputs {
			files = append(files, []string{f.Role, f.Name, f.SHA256})
		}
		t := newTextTable("inputs", "Input files", []string{"role", "file", "SHA-256"}, files)
		v.Inputs = &t
	}
	if in.Model != nil {
		v.Params = &kvTable{"params", "Model parameters", paramRows(in.Model)}
	}
	return v, nil
}

func runTimeText(d time.Duration) string {
	if d <= 0 {
		return "—"
	}
	return d.Round(time.Millisecond).String()
}

// cautions lists what a reader must keep in mind, the statement every
// output carries first.
func (b *builder) cautions() []string {
	out := []string{render.Caution}
	if s := b.in.Sim; s != nil && s.Manifest.Paths > 0 {
		n := s.Manifest.Paths
		out = append(out, fmt.Sprintf("Tail numbers are Monte Carlo estimates from %s synthetic years: the 1-in-100 "+
			"level rests on about %s years beyond it and the 99 %% expected shortfall on the worst %s, so they carry "+
			"sampling error; more paths narrow it.", numfmt.Number(float64(n)), numfmt.Number(float64(n/100)),
			numfmt.Number(math.Ceil(0.01*float64(n)))))
	}
	if s := b.in.Sim; s != nil && len(s.Scenarios) > 0 {
		out = append(out, "Scenarios are what-if changes to the fitted model (level, trend, volatility, persistence, "+
			"tails or injected events), not projections of what will happen.")
	}
	out = append(out, "The model is only as good as the record and the fit: read the diagnostics before relying on "+
		"the tails, in particular the spread of window means for seasonal degree days.")
	return out
}
