package report

import (
	"bytes"
	"fmt"
	"html"
	"image/color"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"time"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"wxstress/calendar"
	"wxstress/internal/numfmt"
	"wxstress/internal/render"
	"wxstress/model"
	"wxstress/shocks"
	"wxstress/sim"
)

// Colours of the report: the Okabe–Ito palette (M. Okabe and K. Ito,
// "Color Universal Design", 2008), eight colours that stay distinct for the
// common forms of colour-vision deficiency. Lines that must be told apart
// also differ in dash pattern, so the plots survive greyscale printing.
var (
	okBlack      = color.RGBA{0x00, 0x00, 0x00, 0xff}
	okOrange     = color.RGBA{0xe6, 0x9f, 0x00, 0xff}
	okSkyBlue    = color.RGBA{0x56, 0xb4, 0xe9, 0xff}
	okGreen      = color.RGBA{0x00, 0x9e, 0x73, 0xff}
	okYellow     = color.RGBA{0xf0, 0xe4, 0x42, 0xff}
	okBlue       = color.RGBA{0x00, 0x72, 0xb2, 0xff}
	okVermillion = color.RGBA{0xd5, 0x5e, 0x00, 0xff}
	okPurple     = color.RGBA{0xcc, 0x79, 0xa7, 0xff}
)

// gridGrey draws the background grid only; it carries no data.
var gridGrey = color.RGBA{0xdd, 0xdd, 0xdd, 0xff}

// seriesColors are the colours of the baseline and the scenarios, in order;
// yellow comes last because it is faint on white.
var seriesColors = []color.RGBA{okBlack, okVermillion, okBlue, okGreen, okPurple, okOrange, okSkyBlue, okYellow}

// seriesDashes are the dash patterns that go with seriesColors.
var seriesDashes = [][]vg.Length{nil, {vg.Points(5), vg.Points(2)}, {vg.Points(2), vg.Points(2)},
	{vg.Points(7), vg.Points(2), vg.Points(2), vg.Points(2)}, {vg.Points(1), vg.Points(2)}, {vg.Points(9), vg.Points(3)}}

// Plot sizes are fixed so that the page lays out the same everywhere.
const (
	wideW  = 16 * vg.Centimeter
	wideH  = 8 * vg.Centimeter
	smallW = 12 * vg.Centimeter
	smallH = 7.5 * vg.Centimeter
)

// Limits that keep plots small: no SVG grows with the number of days or paths.
const (
	exceedancePoints = 240  // points of an exceedance curve
	scatterPoints    = 2000 // points of a scatter plot
	histogramBins    = 40   // bins of a histogram of a continuous index
	integerBinsMax   = 80   // integer-valued indices with a range up to this get one bin per value
)

// sansFont is the typeface of plot text; inline SVG falls back to Arial or
// any sans-serif face when the browser does not have it.
var sansFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

// figure is one plot of the report with its caption and colour key.
type figure struct {
	ID      string
	Caption string // plain text
	SVG     string // inline <svg> element
	Key     []keyItem
}

// keyItem is one entry of a figure's colour key, drawn in HTML below the plot.
type keyItem struct {
	Label string
	Color color.Color
	Style string // "line", "dash", "band", "dot" or "bar"
}

// newPlot returns a plot with the report's fonts and a light grid.
func newPlot(title, xLabel, yLabel string, small bool) *plot.Plot {
	titleSize, labelSize, tickSize := vg.Length(11), vg.Length(10), vg.Length(9)
	if small {
		titleSize, labelSize, tickSize = 10, 9, 8
	}
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = font.From(sansFont, titleSize)
	p.Title.Padding = vg.Points(6)
	p.X.Label.Text, p.Y.Label.Text = xLabel, yLabel
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sansFont, labelSize)
		a.Tick.Label.Font = font.From(sansFont, tickSize)
	}
	p.Legend.TextStyle.Font = font.From(sansFont, tickSize)
	p.X.Tick.Marker, p.Y.Tick.Marker = roundTicks{}, roundTicks{}
	g := plotter.NewGrid()
	g.Vertical.Color, g.Horizontal.Color = gridGrey, gridGrey
	g.Vertical.Width, g.Horizontal.Width = vg.Points(0.4), vg.Points(0.4)
	p.Add(g)
	return p
}

// roundTicks are gonum's default ticks labelled with the fewest decimals
// that show the value ("2250", not "2250.00").
type roundTicks struct{}

func (roundTicks) Ticks(lo, hi float64) []plot.Tick {
	ticks := plot.DefaultTicks{}.Ticks(lo, hi)
	for i, t := range ticks {
		if t.Label != "" {
			ticks[i].Label = tickLabel(t.Value)
		}
	}
	return ticks
}

// tickLabel formats a tick value without floating-point noise.
func tickLabel(v float64) string {
	v, _ = strconv.ParseFloat(strconv.FormatFloat(v, 'g', 10, 64), 64)
	if v == 0 {
		return "0"
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

var (
	svgPrologEnd = regexp.MustCompile(`(?s)^.*?<svg`)
	svgNamespace = regexp.MustCompile(`\s+xmlns(:\w+)?="[^"]*"`)
)

// toSVG draws p into an inline SVG element: without the XML prolog and the
// namespace declarations (HTML5 does not need them, and they are URLs), with
// a text alternative for screen readers.
func toSVG(p *plot.Plot, w, h vg.Length, label string) (s string, err error) {
	defer func() {
		if r := recover(); r != nil { // gonum/plot panics on some degenerate data
			err = fmt.Errorf("report: plot %q: %v", label, r)
		}
	}()
	c := vgsvg.New(w, h)
	p.Draw(draw.New(c))
	var b bytes.Buffer
	if _, err := c.WriteTo(&b); err != nil {
		return "", err
	}
	s = svgPrologEnd.ReplaceAllString(b.String(), "<svg")
	head, rest, _ := strings.Cut(s, ">")
	head = svgNamespace.ReplaceAllString(head, "")
	s = head + ` role="img" aria-label="` + html.EscapeString(label) + `">` + rest
	s = strings.ReplaceAll(s, "font-family:Liberation Sans;", "font-family:'Liberation Sans',Arial,Helvetica,sans-serif;")
	s = strings.ReplaceAll(s, "font-variant:normal;font-weight:normal;font-style:normal;", "")
	return strings.TrimSpace(s), nil
}

// line returns a line plotter of the given colour, width (points) and dashes.
func line(xys plotter.XYs, c color.Color, width float64, dashes []vg.Length) (*plotter.Line, error) {
	l, err := plotter.NewLine(xys)
	if err != nil {
		return nil, err
	}
	l.Color, l.Width, l.Dashes = c, vg.Points(width), dashes
	return l, nil
}

// dots returns a scatter plotter of small filled circles.
func dots(xys plotter.XYs, c color.Color, radius float64) (*plotter.Scatter, error) {
	s, err := plotter.NewScatter(xys)
	if err != nil {
		return nil, err
	}
	s.GlyphStyle = draw.GlyphStyle{Color: c, Radius: vg.Points(radius), Shape: draw.CircleGlyph{}}
	return s, nil
}

// band returns the filled area between lower and upper (same xs).
func band(xs, lower, upper []float64, c color.Color) (*plotter.Polygon, error) {
	pts := make(plotter.XYs, 0, 2*len(xs))
	for i := range xs {
		pts = append(pts, plotter.XY{X: xs[i], Y: upper[i]})
	}
	for i := len(xs) - 1; i >= 0; i-- {
		pts = append(pts, plotter.XY{X: xs[i], Y: lower[i]})
	}
	pg, err := plotter.NewPolygon(pts)
	if err != nil {
		return nil, err
	}
	pg.Color = c
	pg.LineStyle.Width = 0
	return pg, nil
}

// withAlpha returns c with opacity a (0..255), non-premultiplied.
func withAlpha(c color.RGBA, a uint8) color.NRGBA {
	return color.NRGBA{R: c.R, G: c.G, B: c.B, A: a}
}

var dash = []vg.Length{vg.Points(4), vg.Points(2.5)}

// monthTicks marks the first day of each month on a day-of-year axis.
func monthTicks() plot.ConstantTicks {
	var ticks plot.ConstantTicks
	for m := time.January; m <= time.December; m++ {
		doy := float64(time.Date(2001, m, 1, 0, 0, 0, 0, time.UTC).YearDay())
		ticks = append(ticks, plot.Tick{Value: doy, Label: m.String()[:3]})
	}
	return append(ticks, plot.Tick{Value: 366})
}

// decimalYear places a date on a year axis.
func decimalYear(d calendar.Date) float64 {
	y := d.Year()
	return float64(y) + (float64(d.DayOfYear())-0.5)/float64(calendar.DaysIn(y))
}

func degrees(units string) string {
	if units == "" {
		return "°"
	}
	return "°" + units
}

// seriesFigure plots the record as monthly and annual means (a daily line
// of decades would be unreadable and megabytes large), the fitted trend
// level a + b·t, and the months with missing days.
func seriesFigure(sv *SeriesView, m *model.File) (figure, bool, error) {
	type acc struct {
		sum float64
		n   int
	}
	monthly, annual := map[int]*acc{}, map[int]*acc{}
	gapMonths := map[int]bool{}
	missing := 0
	for i, d := range sv.Dates {
		y, mo, _ := d.YMD()
		key := 12*y + int(mo) - 1
		v := sv.Temps[i]
		if math.IsNaN(v) {
			gapMonths[key] = true
			missing++
			continue
		}
		for _, a := range []struct {
			m map[int]*acc
			k int
		}{{monthly, key}, {annual, y}} {
			if a.m[a.k] == nil {
				a.m[a.k] = &acc{}
			}
			a.m[a.k].sum += v
			a.m[a.k].n++
		}
	}
	if len(monthly) < 2 {
		return figure{}, false, nil
	}
	var mxy plotter.XYs
	low := math.Inf(1)
	for _, k := range sortedKeys(monthly) {
		a := monthly[k]
		v := a.sum / float64(a.n)
		low = min(low, v)
		mxy = append(mxy, plotter.XY{X: float64(k/12) + (float64(k%12)+0.5)/12, Y: v})
	}
	var axy plotter.XYs
	for _, y := range sortedKeys(annual) {
		if a := annual[y]; a.n >= 300 { // a year with most days present
			axy = append(axy, plotter.XY{X: float64(y) + 0.5, Y: a.sum / float64(a.n)})
		}
	}
	u := degrees(unitsOf(m))
	p := newPlot("Observed record: monthly and annual mean temperature", "year", "temperature ("+u+")", false)
	ml, err := line(mxy, okSkyBlue, 0.5, nil)
	if err != nil {
		return figure{}, false, err
	}
	p.Add(ml)
	key := []keyItem{{"monthly mean", okSkyBlue, "line"}}
	if len(axy) > 1 {
		al, err := line(axy, okBlue, 1.6, nil)
		if err != nil {
			return figure{}, false, err
		}
		p.Add(al)
		key = append(key, keyItem{"annual mean (years with ≥ 300 days)", okBlue, "line"})
	}
	if m != nil {
		first, last := sv.Dates[0], sv.Dates[len(sv.Dates)-1]
		level := func(d calendar.Date) float64 { return m.Trend.Intercept + m.Trend.Slope()*d.ModelTime() }
		tl, err := line(plotter.XYs{{X: decimalYear(first), Y: level(first)}, {X: decimalYear(last), Y: level(last)}},
			okVermillion, 1.6, dash)
		if err != nil {
			return figure{}, false, err
		}
		p.Add(tl)
		label := "fitted level a + b·t (the model's trend)"
		if m.Trend.Kind != "linear" {
			label = "fitted level a (the model has no trend)"
		}
		key = append(key, keyItem{label, okVermillion, "dash"})
	}
	if len(gapMonths) > 0 {
		var gxy plotter.XYs
		for _, k := range sortedKeys(gapMonths) {
			gxy = append(gxy, plotter.XY{X: float64(k/12) + (float64(k%12)+0.5)/12, Y: low - 1})
		}
		g, err := plotter.NewScatter(gxy)
		if err != nil {
			return figure{}, false, err
		}
		g.GlyphStyle = draw.GlyphStyle{Color: okOrange, Radius: vg.Points(3), Shape: draw.PyramidGlyph{}}
		p.Add(g)
		key = append(key, keyItem{fmt.Sprintf("month with missing days (%d days missing in all)", missing), okOrange, "dot"})
	}
	svg, err := toSVG(p, wideW, wideH, "Monthly and annual mean temperature of the record, with the fitted trend and the gaps")
	return figure{ID: "fig-series", SVG: svg, Key: key,
		Caption: "The daily record shown as monthly and annual means (a daily line over decades would hide everything). " +
			"Triangles at the bottom mark months with at least one missing day."}, true, err
}

func sortedKeys[V any](m map[int]V) []int {
	keys := make([]int, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	return keys
}

// unitsOf returns the temperature units of the report's data ("C" or "F"),
// "" when unknown.
func unitsOf(m *model.File) string {
	if m != nil {
		return m.Data.Units
	}
	return ""
}

// seasonalFigure plots observed mean temperature by day of year against
// the fitted mean S averaged over the same days; without the series it uses
// the model's climatology and S in the middle of the record.
func seasonalFigure(m *model.File, sv *SeriesView) (figure, bool, error) {
	obs, fit := make([]float64, 366), make([]float64, 366)
	var cap string
	switch {
	case sv != nil && len(sv.Fitted) == len(sv.Temps):
		n := make([]int, 366)
		for i, d := range sv.Dates {
			if v := sv.Temps[i]; !math.IsNaN(v) && !math.IsNaN(sv.Fitted[i]) {
				k := d.DayOfYear() - 1
				obs[k] += v
				fit[k] += sv.Fitted[i]
				n[k]++
			}
		}
		for k := range obs {
			if n[k] == 0 {
				obs[k], fit[k] = math.NaN(), math.NaN()
				continue
			}
			obs[k] /= float64(n[k])
			fit[k] /= float64(n[k])
		}
		cap = "Each dot is the mean of all observed values on that day of the year; the line is the fitted mean S(t) " +
			"averaged over the same days, so the trend enters both alike."
	case m != nil && m.Diagnostics != nil && len(m.Diagnostics.Climatology) == 366:
		copy(obs, m.Diagnostics.Climatology)
		mid := (m.Data.FirstDate.Year() + m.Data.LastDate.Year()) / 2
		for k := range fit {
			d := calendar.YearStart(mid) + calendar.Date(k)
			fit[k] = m.Mean(d.ModelTime())
		}
		cap = fmt.Sprintf("Each dot is the mean observed temperature of that day of the year over the record "+
			"(from the model file); the line is the fitted mean S(t) in %d, the middle of the record.", mid)
	default:
		return figure{}, false, nil
	}
	var oxy, fxy plotter.XYs
	for k := range obs {
		if !math.IsNaN(obs[k]) {
			oxy = append(oxy, plotter.XY{X: float64(k + 1), Y: obs[k]})
			fxy = append(fxy, plotter.XY{X: float64(k + 1), Y: fit[k]})
		}
	}
	u := degrees(m.Data.Units)
	p := newPlot("Seasonal cycle: observed mean by day of year and fitted S(t)", "day of year",
		"daily mean temperature ("+u+")", false)
	p.X.Tick.Marker = monthTicks()
	p.X.Min, p.X.Max = 1, 366
	d, err := dots(oxy, okBlue, 1.3)
	if err != nil {
		return figure{}, false, err
	}
	l, err := line(fxy, okVermillion, 1.8, nil)
	if err != nil {
		return figure{}, false, err
	}
	p.Add(d, l)
	svg, err := toSVG(p, wideW, wideH, "Observed mean temperature by day of year against the fitted seasonal cycle")
	return figure{ID: "fig-seasonal", SVG: svg, Caption: cap, Key: []keyItem{
		{"observed mean of the day of year", okBlue, "dot"}, {"fitted mean S(t)", okVermillion, "line"}}}, true, err
}

// errPoints are points with vertical error bars.
type errPoints struct {
	plotter.XYs
	plotter.YErrors
}

// sigmaFigure plots σ by calendar month with its 95 % band.
func sigmaFigure(m *model.File) (figure, error) {
	v := m.Volatility
	ep := errPoints{XYs: make(plotter.XYs, 12), YErrors: make(plotter.YErrors, 12)}
	for k := range 12 {
		ep.XYs[k] = plotter.XY{X: float64(k + 1), Y: v.Monthly[k]}
		ep.YErrors[k].Low = max(v.Monthly[k]-v.Band[k][0], 0)
		ep.YErrors[k].High = max(v.Band[k][1]-v.Monthly[k], 0)
	}
	u := degrees(m.Data.Units)
	p := newPlot("Innovation volatility σ by calendar month, with 95 % band", "month", "σ ("+u+")", true)
	var ticks plot.ConstantTicks
	for k := range 12 {
		ticks = append(ticks, plot.Tick{Value: float64(k + 1), Label: time.Month(k + 1).String()[:1]})
	}
	p.X.Tick.Marker = ticks
	p.X.Min, p.X.Max = 0.5, 12.5
	eb, err := plotter.NewYErrorBars(ep)
	if err != nil {
		return figure{}, err
	}
	eb.LineStyle.Color = okBlack
	eb.LineStyle.Width = vg.Points(0.8)
	eb.CapWidth = vg.Points(5)
	l, err := line(ep.XYs, okVermillion, 1, nil)
	if err != nil {
		return figure{}, err
	}
	d, err := dots(ep.XYs, okVermillion, 2.5)
	if err != nil {
		return figure{}, err
	}
	p.Add(eb, l, d)
	svg, err := toSVG(p, smallW, smallH, "Innovation standard deviation by month with its 95 % band")
	return figure{ID: "fig-sigma", SVG: svg, Key: []keyItem{{"σ of the month", okVermillion, "dot"},
		{"95 % band (chi-square interval)", okBlack, "line"}},
		Caption: "The day-to-day shock size σ(t) of each calendar month: the simulator scales its shocks by these values."}, err
}

// correlogramFigure plots ACF or PACF bars of lags 1..n with the ±bound.
func correlogramFigure(id, title, yLabel string, vals []float64, bound float64) (figure, error) {
	p := newPlot(title, "lag (days)", yLabel, true)
	bars, err := plotter.NewBarChart(plotter.Values(vals), vg.Points(5))
	if err != nil {
		return figure{}, err
	}
	bars.XMin = 1
	bars.Color = okBlue
	bars.LineStyle.Width = 0
	n := float64(len(vals))
	hi, err := line(plotter.XYs{{X: 0.5, Y: bound}, {X: n + 0.5, Y: bound}}, okVermillion, 1, dash)
	if err != nil {
		return figure{}, err
	}
	lo, err := line(plotter.XYs{{X: 0.5, Y: -bound}, {X: n + 0.5, Y: -bound}}, okVermillion, 1, dash)
	if err != nil {
		return figure{}, err
	}
	zero, err := line(plotter.XYs{{X: 0.5, Y: 0}, {X: n + 0.5, Y: 0}}, okBlack, 0.6, nil)
	if err != nil {
		return figure{}, err
	}
	p.Add(bars, zero, hi, lo)
	p.X.Min, p.X.Max = 0, n+1
	p.Y.Max = max(p.Y.Max, 1)
	p.Y.Min = min(p.Y.Min, -0.2)
	svg, err := toSVG(p, smallW, smallH, title)
	return figure{ID: id, SVG: svg, Key: []keyItem{{yLabel + " at each lag", okBlue, "bar"},
		{fmt.Sprintf("±%.3f: 95 %% bound for no correlation", bound), okVermillion, "dash"}}}, err
}

// qqFigure plots sample quantiles of z against the fitted family's.
func qqFigure(th, smp []float64, family string) (figure, error) {
	xys := make(plotter.XYs, 0, len(th))
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range th {
		if math.IsNaN(th[i]) || math.IsNaN(smp[i]) || math.IsInf(th[i], 0) || math.IsInf(smp[i], 0) {
			continue
		}
		xys = append(xys, plotter.XY{X: th[i], Y: smp[i]})
		lo, hi = min(lo, th[i], smp[i]), max(hi, th[i], smp[i])
	}
	p := newPlot("QQ plot of the standardized shocks z", "quantile of the fitted family (unit variance)",
		"quantile of z (unit variance)", true)
	ref, err := line(plotter.XYs{{X: lo, Y: lo}, {X: hi, Y: hi}}, okVermillion, 1, dash)
	if err != nil {
		return figure{}, err
	}
	d, err := dots(xys, okBlue, 1.6)
	if err != nil {
		return figure{}, err
	}
	p.Add(ref, d)
	svg, err := toSVG(p, smallW, smallH, "QQ plot of the standardized shocks against the fitted family")
	return figure{ID: "fig-qq", SVG: svg, Key: []keyItem{{"quantiles of z against the " + family, okBlue, "dot"},
		{"perfect agreement", okVermillion, "dash"}},
		Caption: "Points on the dashed line mean the fitted family reproduces the shocks' distribution, tails included; " +
			"points below it on the left mean colder extremes than the family allows."}, err
}

// shockDist returns the fitted shock distribution to draw, with its name:
// the chosen family, or for the bootstrap the parametric family the KS test
// used.
func shockDist(m *model.File) (shocks.Dist, string) {
	sh := m.Shocks
	if f, _ := model.LookupFamily(sh.Family); !f.Parametric() && m.Diagnostics != nil {
		for _, s := range m.Diagnostics.ShockTable {
			if s.Family == m.Diagnostics.KSFamily {
				sh = s.Shocks()
			}
		}
	}
	if d := sh.Dist(); d != nil && sh.Family != model.FamilyNormal {
		return d, model.FamilyLabel(sh.Family) + " (" + sh.ShapeText() + ")"
	}
	return shocks.Normal{}, "normal"
}

// shockHistFigure plots the density histogram of the standardized shocks z
// with the fitted density and the normal for reference.
func shockHistFigure(z []float64, m *model.File) (figure, bool, error) {
	const lim, width = 6.0, 0.2 // shocks beyond ±6 are counted in the end bins
	n := int(2 * lim / width)
	counts := make([]float64, n)
	total := 0
	for _, v := range z {
		if math.IsNaN(v) {
			continue
		}
		k := int(math.Floor((min(max(v, -lim), lim-1e-9) + lim) / width))
		counts[k]++
		total++
	}
	if total < 10 {
		return figure{}, false, nil
	}
	bins := make([]plotter.HistogramBin, n)
	for k := range bins {
		bins[k] = plotter.HistogramBin{Min: -lim + float64(k)*width, Max: -lim + float64(k+1)*width,
			Weight: counts[k] / (float64(total) * width)}
	}
	h := &plotter.Histogram{Bins: bins, Width: width, FillColor: withAlpha(okSkyBlue, 160), LineStyle: draw.LineStyle{}}
	dist, name := shockDist(m)
	var fxy, nxy plotter.XYs
	for i := 0; i <= 240; i++ {
		x := -lim + 2*lim*float64(i)/240
		fxy = append(fxy, plotter.XY{X: x, Y: math.Exp(dist.LogProb(x))})
		nxy = append(nxy, plotter.XY{X: x, Y: math.Exp(shocks.Normal{}.LogProb(x))})
	}
	fl, err := line(fxy, okVermillion, 1.6, nil)
	if err != nil {
		return figure{}, false, err
	}
	nl, err := line(nxy, okBlack, 0.9, dash)
	if err != nil {
		return figure{}, false, err
	}
	p := newPlot("Standardized shocks z: histogram and fitted density", "z (unit variance)", "density (per unit of z)", true)
	p.Add(h, nl, fl)
	p.X.Min, p.X.Max = -lim, lim
	svg, err := toSVG(p, smallW, smallH, "Histogram of the standardized shocks with the fitted density")
	return figure{ID: "fig-shock-hist", SVG: svg, Key: []keyItem{
		{fmt.Sprintf("%d standardized shocks", total), withAlpha(okSkyBlue, 160), "bar"},
		{"fitted " + name, okVermillion, "line"}, {"standard normal, for reference", okBlack, "dash"}}}, true, err
}

// fanFigure plots the daily quantiles of simulated temperature with the
// observed climatology.
func fanFigure(f *sim.Fan, m *model.File) (figure, bool, error) {
	if f == nil || len(f.Dates) < 2 || len(f.Q) != len(sim.FanQuantileProbs()) {
		return figure{}, false, nil
	}
	xs := make([]float64, len(f.Dates))
	for d, date := range f.Dates {
		xs[d] = float64(date.DayOfYear())
	}
	year := f.Dates[0].Year()
	units := ""
	if m != nil {
		units = m.Data.Units
	}
	p := newPlot(fmt.Sprintf("Simulated daily mean temperature in %d: median and 50 %% and 90 %% bands", year),
		"day of year", "daily mean temperature ("+degrees(units)+")", false)
	p.X.Tick.Marker = monthTicks()
	p.X.Min, p.X.Max = 1, 366
	key, err := quantileBands(p, xs, f.Q, "simulated days")
	if err != nil {
		return figure{}, false, err
	}
	if m != nil && m.Diagnostics != nil && len(m.Diagnostics.Climatology) >= 365 {
		var cxy plotter.XYs
		for d, date := range f.Dates {
			if k := date.DayOfYear() - 1; k < len(m.Diagnostics.Climatology) {
				cxy = append(cxy, plotter.XY{X: xs[d], Y: m.Diagnostics.Climatology[k]})
			}
		}
		cl, err := line(cxy, okVermillion, 1, dash)
		if err != nil {
			return figure{}, false, err
		}
		p.Add(cl)
		key = append(key, keyItem{fmt.Sprintf("observed mean of the day of year, %d–%d", m.Data.FirstDate.Year(),
			m.Data.LastDate.Year()), okVermillion, "dash"})
	}
	svg, err := toSVG(p, wideW, wideH, fmt.Sprintf("Fan chart of simulated daily mean temperature in %d", year))
	return figure{ID: "fig-fan", SVG: svg, Key: key, Caption: fmt.Sprintf("Quantiles of each day's mean temperature "+
		"across the first synthetic years of the run for %d (the same years as the first paths of the tail tables). "+
		"The observed line averages the whole record, so with a warming trend the simulated median lies above it.", year)}, true, err
}

// degenerate reports whether values are all equal (nothing to plot).
func degenerate(values []float64) bool {
	if len(values) == 0 {
		return true
	}
	lo, hi := slices.Min(values), slices.Max(values)
	return !(hi > lo)
}

// histBins bins the values in [lo, hi]: one bin per integer for
// integer-valued indices with a small range, histogramBins bins of a round
// width otherwise. Weights are shares of all values, those outside [lo, hi]
// included, so the bars show probabilities.
func histBins(values []float64, lo, hi float64) ([]plotter.HistogramBin, float64) {
	integer := hi-lo <= integerBinsMax
	for _, v := range values {
		if v != math.Trunc(v) {
			integer = false
			break
		}
	}
	var start, width float64
	var n int
	if integer {
		start, width, n = lo-0.5, 1, int(hi-lo)+1
	} else {
		width = niceStep((hi - lo) / histogramBins)
		start = math.Floor(lo/width) * width
		n = int(math.Floor((hi-start)/width)) + 1
	}
	bins := make([]plotter.HistogramBin, n)
	for k := range bins {
		bins[k] = plotter.HistogramBin{Min: start + float64(k)*width, Max: start + float64(k+1)*width}
	}
	share := 1 / float64(len(values))
	for _, v := range values {
		if v >= lo && v <= hi {
			k := min(max(int(math.Floor((v-start)/width)), 0), n-1)
			bins[k].Weight += share
		}
	}
	return bins, width
}

// histTail is the share of years a histogram may leave beyond each end of
// its axis, so that a handful of extreme years do not squeeze the rest into
// a few bars; the exceedance curve shows them.
const histTail = 0.0005

// histRange returns the range a histogram of values shows: all of it, or the
// central 1 − 2·histTail of it when the extremes would stretch the axis by
// more than half.
func histRange(values []float64) (lo, hi float64) {
	x := slices.Clone(values)
	slices.Sort(x)
	n := len(x)
	lo, hi = x[0], x[n-1]
	k := int(histTail * float64(n))
	if k == 0 {
		return lo, hi
	}
	qlo, qhi := x[k], x[n-1-k]
	if hi-lo > 1.5*(qhi-qlo) && qhi > qlo {
		return qlo, qhi
	}
	return lo, hi
}

// niceStep rounds a step up to 1, 2 or 5 times a power of ten.
func niceStep(x float64) float64 {
	if !(x > 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= x {
			return m * p
		}
	}
	return 10 * p
}

// quantileLabels names a row's P50, adverse 95 % and adverse 99 % levels.
func quantileMarks(r sim.Row) []struct {
	label string
	value float64
	color color.Color
	style string
} {
	l95, l99 := "P95", "P99"
	if !r.Info.HighIsAdverse {
		l95, l99 = "P5", "P1"
	}
	return []struct {
		label string
		value float64
		color color.Color
		style string
	}{
		{"P50", r.Tail.Quantile(0.50), okBlack, "line"},
		{l95, r.Tail.VaR95, okOrange, "dash"},
		{l99, r.Tail.VaR99, okVermillion, "line"},
	}
}

// indexHistFigure plots the distribution of one index over the paths with
// its median and adverse 95 % and 99 % levels marked.
func indexHistFigure(id string, r sim.Row, values []float64) (figure, error) {
	lo, hi := histRange(values)
	for _, mk := range quantileMarks(r) {
		lo, hi = min(lo, mk.value), max(hi, mk.value)
	}
	bins, width := histBins(values, lo, hi)
	top := 0.0
	for _, b := range bins {
		top = max(top, b.Weight)
	}
	h := &plotter.Histogram{Bins: bins, Width: width, FillColor: withAlpha(okSkyBlue, 170), LineStyle: draw.LineStyle{}}
	p := newPlot(fmt.Sprintf("%s, %s: distribution over %s synthetic years", r.Name, r.Period, numfmt.Number(float64(len(values)))),
		fmt.Sprintf("%s (%s)", r.Name, r.Unit), "share of years (probability)", true)
	p.Add(h)
	var key []keyItem
	for k, mk := range quantileMarks(r) {
		var dashes []vg.Length
		if mk.style == "dash" {
			dashes = dash
		}
		l, err := line(plotter.XYs{{X: mk.value, Y: 0}, {X: mk.value, Y: top * 1.08}}, mk.color, []float64{1.2, 1.4, 1.4}[k], dashes)
		if err != nil {
			return figure{}, err
		}
		p.Add(l)
		key = append(key, keyItem{fmt.Sprintf("%s = %s %s", mk.label, render.TableNum(mk.value), r.Unit), mk.color, mk.style})
	}
	p.Y.Min = 0
	below, above := 0, 0
	for _, v := range values {
		if v < lo {
			below++
		} else if v > hi {
			above++
		}
	}
	caption := ""
	if below+above > 0 {
		caption = fmt.Sprintf("Beyond the axis: %s below %s %s and %d above %s %s (see the exceedance curve).",
			render.Plural(below, "year"), render.TableNum(lo), r.Unit, above, render.TableNum(hi), r.Unit)
	}
	svg, err := toSVG(p, smallW, smallH, fmt.Sprintf("Histogram of %s, %s", r.Name, r.Period))
	return figure{ID: id, SVG: svg, Key: key, Caption: caption}, err
}

// exceedance returns a thinned exceedance curve of values: the probability
// that a year is at least as adverse as each value, evenly spaced in
// log-probability from 1 down to 1/N.
func exceedance(values []float64, highIsAdverse bool) plotter.XYs {
	x := slices.Clone(values)
	slices.Sort(x)
	n := len(x)
	var out plotter.XYs
	last := -1
	for k := 0; k <= exceedancePoints; k++ {
		c := int(math.Round(math.Pow(float64(n), 1-float64(k)/exceedancePoints))) // years at least this adverse
		c = min(max(c, 1), n)
		if c == last {
			continue
		}
		last = c
		i := c - 1 // low adverse: the c lowest values
		if highIsAdverse {
			i = n - c
		}
		out = append(out, plotter.XY{X: x[i], Y: float64(c) / float64(n)})
	}
	return out
}

// probAxis makes p's Y axis a log-probability axis from 1 down to the
// power of ten at or below 1/n. The axis is linear in log₁₀ p (plot
// log10Y(points)) with ticks labelled in probability: gonum's log scale
// misplaces a centred axis label and leaves a blank band above the plot.
func probAxis(p *plot.Plot, n int) {
	decades := max(int(math.Ceil(math.Log10(float64(n))-1e-9)), 1)
	p.Y.Max, p.Y.Min = 0, -float64(decades)
	var ticks plot.ConstantTicks
	for e := 0; e <= decades; e++ {
		v := math.Pow10(-e)
		ticks = append(ticks, plot.Tick{Value: -float64(e), Label: tickLabel(v)})
		if e < decades {
			ticks = append(ticks, plot.Tick{Value: math.Log10(v / 2)}, plot.Tick{Value: math.Log10(v / 5)})
		}
	}
	p.Y.Tick.Marker = ticks
}

// log10Y returns the points with Y replaced by log₁₀ Y, for a probAxis.
func log10Y(xys plotter.XYs) plotter.XYs {
	out := make(plotter.XYs, len(xys))
	for i, xy := range xys {
		out[i] = plotter.XY{X: xy.X, Y: math.Log10(xy.Y)}
	}
	return out
}

func adverseWord(r sim.Row) string {
	if r.Info.HighIsAdverse {
		return "at least this high"
	}
	return "at least this low"
}

// exceedanceFigure plots the probability of a year at least as adverse as
// each value, with the return levels 1-in-2 … 1-in-100 marked.
func exceedanceFigure(id string, r sim.Row, values []float64) (figure, error) {
	p := newPlot(fmt.Sprintf("%s, %s: probability of a year %s", r.Name, r.Period, adverseWord(r)),
		fmt.Sprintf("%s (%s)", r.Name, r.Unit), "probability (log scale)", true)
	probAxis(p, len(values))
	l, err := line(log10Y(exceedance(values, r.Info.HighIsAdverse)), okBlue, 1.5, nil)
	if err != nil {
		return figure{}, err
	}
	p.Add(l)
	var rl plotter.XYs
	var names []string
	for _, T := range r.Tail.ReturnPeriods {
		if T > float64(len(values)) {
			continue
		}
		rl = append(rl, plotter.XY{X: r.Tail.ReturnLevel(T), Y: -math.Log10(T)})
		names = append(names, "1-in-"+strconv.FormatFloat(T, 'f', -1, 64))
	}
	d, err := dots(rl, okVermillion, 2.6)
	if err != nil {
		return figure{}, err
	}
	labels, err := plotter.NewLabels(plotter.XYLabels{XYs: rl, Labels: names})
	if err != nil {
		return figure{}, err
	}
	labels.Offset = vg.Point{X: vg.Points(4)}
	for i := range labels.TextStyle {
		labels.TextStyle[i].Font = font.From(sansFont, 7.5)
		labels.TextStyle[i].Color = okVermillion
		labels.TextStyle[i].YAlign = draw.YCenter
		if !r.Info.HighIsAdverse { // the curve rises to the right: labels go on its left
			labels.TextStyle[i].XAlign = draw.XRight
			labels.Offset.X = -labels.Offset.X
		}
	}
	p.Add(d, labels)
	svg, err := toSVG(p, smallW, smallH, fmt.Sprintf("Exceedance curve of %s, %s", r.Name, r.Period))
	return figure{ID: id, SVG: svg, Key: []keyItem{{"simulated probability of a year " + adverseWord(r), okBlue, "line"},
		{"return levels 1-in-T (probability 1/T)", okVermillion, "dot"}}}, err
}

// overlayFigure plots the exceedance curves of the baseline and the
// scenarios of one index on one plot.
func overlayFigure(id string, r sim.Row, names []string, values [][]float64) (figure, error) {
	p := newPlot(fmt.Sprintf("%s, %s: probability of a year %s", r.Name, r.Period, adverseWord(r)),
		fmt.Sprintf("%s (%s)", r.Name, r.Unit), "probability (log scale)", true)
	probAxis(p, len(values[0]))
	var key []keyItem
	for i, v := range values {
		c, d := seriesColors[i%len(seriesColors)], seriesDashes[i%len(seriesDashes)]
		l, err := line(log10Y(exceedance(v, r.Info.HighIsAdverse)), c, 1.5, d)
		if err != nil {
			return figure{}, err
		}
		p.Add(l)
		style := "line"
		if d != nil {
			style = "dash"
		}
		key = append(key, keyItem{names[i], c, style})
	}
	svg, err := toSVG(p, smallW, smallH, fmt.Sprintf("Exceedance curves of %s, %s, baseline and scenarios", r.Name, r.Period))
	return figure{ID: id, SVG: svg, Key: key}, err
}

// demandFigure plots observed daily loads against temperature with the
// fitted weekday curve.
func demandFigure(dv *DemandView, units string) (figure, bool, error) {
	var pts plotter.XYs
	n := min(len(dv.Temps), len(dv.Loads))
	step := max(1, (n+scatterPoints-1)/scatterPoints)
	for i := 0; i < n; i += step {
		if t, l := dv.Temps[i], dv.Loads[i]; !math.IsNaN(t) && !math.IsNaN(l) && !math.IsInf(t, 0) && !math.IsInf(l, 0) {
			pts = append(pts, plotter.XY{X: t, Y: l})
		}
	}
	var curve plotter.XYs
	for i := range min(len(dv.CurveT), len(dv.CurveLoad)) {
		if !math.IsNaN(dv.CurveLoad[i]) {
			curve = append(curve, plotter.XY{X: dv.CurveT[i], Y: dv.CurveLoad[i]})
		}
	}
	if len(pts) == 0 && len(curve) < 2 {
		return figure{}, false, nil
	}
	who := dv.Retailer
	if who == "" {
		who = "Daily demand"
	}
	p := newPlot(who+": daily load against daily mean temperature", "daily mean temperature ("+degrees(units)+")",
		"load ("+dv.Unit+")", false)
	var key []keyItem
	if len(pts) > 0 {
		d, err := dots(pts, withAlpha(okBlue, 120), 1.4)
		if err != nil {
			return figure{}, false, err
		}
		p.Add(d)
		label := "observed day"
		if step > 1 {
			label = fmt.Sprintf("observed day (every %d-th of %d shown)", step, n)
		}
		key = append(key, keyItem{label, okBlue, "dot"})
	}
	if len(curve) >= 2 {
		l, err := line(curve, okVermillion, 2, nil)
		if err != nil {
			return figure{}, false, err
		}
		p.Add(l)
		form := ""
		if dv.Form != "" {
			form = " (" + dv.Form + " change-point model)"
		}
		key = append(key, keyItem{"fitted load of an ordinary weekday" + form, okVermillion, "line"})
	}
	svg, err := toSVG(p, wideW, wideH, "Daily load against temperature with the fitted change-point curve")
	return figure{ID: "fig-demand", SVG: svg, Key: key,
		Caption: "The curve is the fitted load of an ordinary weekday; weekends, holidays and noise move days off it. " +
			"Its kinks are the balance points beyond which heating or cooling load grows with temperature."}, true, err
}
