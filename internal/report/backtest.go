package report

import (
	"bytes"
	"fmt"
	"html/template"
	"io"
	"time"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"wxstress/backtest"
	"wxstress/internal/numfmt"
	"wxstress/internal/render"
)

// BacktestMeta is what a backtest report says about its run.
type BacktestMeta struct {
	Title   string
	Created time.Time
	Inputs  []InputFile
	Units   string // "C" or "F"
}

// backtestPage is the view the template "backtest" shows.
type backtestPage struct {
	Title, Subtitle, Caution string
	CSS                      template.CSS
	Facts                    [][2]string
	Summary                  textTable
	Verdicts                 []string
	Rows                     []backtestRowView
}

type backtestRowView struct {
	Title   string
	Figures []*figView
}

// WriteBacktest renders the self-contained HTML report of a backtest: the
// summary table, and for each index and period the histogram of the PITs
// and the realised values over the model's 5–95 % band by year.
func WriteBacktest(w io.Writer, r *backtest.Result, meta BacktestMeta) error {
	b := newBuilder(&Input{})
	p := backtestPage{Title: meta.Title, Caution: render.Caution, CSS: template.CSS(styleSheet),
		Subtitle: fmt.Sprintf("Out-of-sample check, made %s", meta.Created.UTC().Format("2006-01-02 15:04 MST"))}
	o := r.Options
	p.Facts = append(p.Facts,
		[2]string{"origins", fmt.Sprintf("the last %d complete periods of each kind, each fitted on the data to the day before it", o.Origins)},
		[2]string{"simulation", fmt.Sprintf("%s synthetic periods per origin from the state at that day (conditional start), seed %d",
			numfmt.Number(float64(o.Paths)), o.Seed)},
		[2]string{"bases", fmt.Sprintf("HDD %s °%s, CDD %s °%s", numfmt.Number(o.Bases.HDD), meta.Units, numfmt.Number(o.Bases.CDD), meta.Units)})
	for _, in := range meta.Inputs {
		p.Facts = append(p.Facts, [2]string{in.Role, in.Name + " (SHA-256 " + in.SHA256 + ")"})
	}
	var rows [][]string
	for _, row := range r.Rows {
		ev := row.Evidence
		rows = append(rows, []string{row.Index.Info().Name, row.Period, fmt.Sprint(len(row.Origins)),
			fmt.Sprintf("%d/%d (p %s)", ev.Central50.Inside, ev.Cases, render.PValue(ev.Central50.P)),
			fmt.Sprintf("%d/%d (p %s)", ev.Central90.Inside, ev.Cases, render.PValue(ev.Central90.P)),
			render.PValue(ev.KS.P), render.Num(ev.ProbitSD, 2), numfmt.Fixed(ev.MeanCRPS, 1), numfmt.Fixed(ev.MeanRefCRPS, 1)})
		p.Verdicts = append(p.Verdicts, fmt.Sprintf("%s, %s: %s", row.Index.Info().Name, row.Period, ev.Verdict))
		pit, err := pitFigure(row)
		if err != nil {
			return err
		}
		bandFig, err := originsFigure(row, meta.Units)
		if err != nil {
			return err
		}
		p.Rows = append(p.Rows, backtestRowView{Title: fmt.Sprintf("%s, %s", row.Index.Info().Name, row.Period),
			Figures: []*figView{b.figure(pit), b.figure(bandFig)}})
	}
	p.Summary = newTextTable("backtest", "", []string{"index", "period", "origins", "inside 50% band", "inside 90% band",
		"KS p (PIT)", "sd of probit(PIT)", "CRPS model", "CRPS climatology"}, rows, 2, 3, 4, 5, 6, 7, 8)
	var buf bytes.Buffer
	if err := templates.ExecuteTemplate(&buf, "backtest", p); err != nil {
		return err
	}
	_, err := w.Write(buf.Bytes())
	return err
}

// pitFigure is the histogram of a row's PITs in ten bins, with the count a
// calibrated model gives on average.
func pitFigure(row backtest.Row) (figure, error) {
	const bins = 10
	counts := make(plotter.Values, bins)
	for _, o := range row.Origins {
		counts[min(int(o.PIT*bins), bins-1)]++
	}
	p := newPlot("PIT of the realised values", "PIT (probability integral transform)", "origins", true)
	bars, err := plotter.NewBarChart(counts, vg.Points(18))
	if err != nil {
		return figure{}, err
	}
	bars.Color, bars.LineStyle.Width = withAlpha(okBlue, 200), 0
	bars.Offset = vg.Points(0)
	p.Add(bars)
	flat := float64(len(row.Origins)) / bins
	l, err := line(plotter.XYs{{X: -0.5, Y: flat}, {X: bins - 0.5, Y: flat}}, okBlack, 1, dash)
	if err != nil {
		return figure{}, err
	}
	p.Add(l)
	labels := make([]string, bins)
	for i := range labels {
		labels[i] = fmt.Sprintf("%.1f", (float64(i)+0.5)/bins)
	}
	p.NominalX(labels...)
	svg, err := toSVG(p, 9*vg.Centimeter, 6*vg.Centimeter, "PIT histogram, "+row.Index.Info().Name+" "+row.Period)
	if err != nil {
		return figure{}, err
	}
	return figure{ID: "pit-" + row.Index.Info().Key + "-" + row.Period, SVG: svg,
		Caption: "A calibrated model gives about the same count in every bin (dashed line); a U shape means too narrow, a hump too wide, a slope a bias.",
		Key:     []keyItem{{Label: "origins per bin", Color: withAlpha(okBlue, 200), Style: "bar"}, {Label: "calibrated", Color: okBlack, Style: "dash"}}}, nil
}

// originsFigure plots each origin's realised value over the model's 5–95 %
// band and median, by the year the period ends in.
func originsFigure(row backtest.Row, units string) (figure, error) {
	xs, lo, hi := []float64{}, []float64{}, []float64{}
	var med, real plotter.XYs
	for _, o := range row.Origins {
		x := float64(o.Year)
		xs, lo, hi = append(xs, x), append(lo, o.P05), append(hi, o.P95)
		med = append(med, plotter.XY{X: x, Y: o.P50})
		real = append(real, plotter.XY{X: x, Y: o.Realized})
	}
	p := newPlot(row.Index.Info().Name+", "+row.Period+": realised and forecast", "year the period ends", "°"+units+"·day", true)
	bandPoly, err := band(xs, lo, hi, withAlpha(okSkyBlue, 90))
	if err != nil {
		return figure{}, err
	}
	p.Add(bandPoly)
	l, err := line(med, okBlue, 1, nil)
	if err != nil {
		return figure{}, err
	}
	d, err := dots(real, okVermillion, 2.2)
	if err != nil {
		return figure{}, err
	}
	p.Add(l, d)
	svg, err := toSVG(p, 12*vg.Centimeter, 6*vg.Centimeter, "realised values over the forecast band, "+row.Index.Info().Name+" "+row.Period)
	if err != nil {
		return figure{}, err
	}
	return figure{ID: "band-" + row.Index.Info().Key + "-" + row.Period, SVG: svg,
		Key: []keyItem{{Label: "5–95 % of the simulated", Color: withAlpha(okSkyBlue, 90), Style: "band"},
			{Label: "simulated median", Color: okBlue, Style: "line"}, {Label: "realised", Color: okVermillion, Style: "dot"}}}, nil
}
