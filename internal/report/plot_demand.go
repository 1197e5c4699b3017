package report

import (
	"fmt"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"

	"wxstress/internal/numfmt"
	"wxstress/internal/render"
	"wxstress/sim"
)

// quantileBands draws the P5–P95 and P25–P75 bands and the median of
// q[k][i] (k over sim.FanQuantileProbs()) against xs, and returns their key.
func quantileBands(p *plot.Plot, xs []float64, q [][]float64, what string) ([]keyItem, error) {
	at := func(prob float64) []float64 {
		for k, v := range sim.FanQuantileProbs() {
			if v == prob {
				return q[k]
			}
		}
		panic(fmt.Sprintf("report: no fan quantile %v", prob))
	}
	outer, err := band(xs, at(0.05), at(0.95), withAlpha(okSkyBlue, 110))
	if err != nil {
		return nil, err
	}
	inner, err := band(xs, at(0.25), at(0.75), withAlpha(okBlue, 120))
	if err != nil {
		return nil, err
	}
	med := make(plotter.XYs, len(xs))
	for i := range xs {
		med[i] = plotter.XY{X: xs[i], Y: at(0.50)[i]}
	}
	ml, err := line(med, okBlue, 1.5, nil)
	if err != nil {
		return nil, err
	}
	p.Add(outer, inner, ml)
	return []keyItem{{"P5–P95 of " + what, withAlpha(okSkyBlue, 110), "band"},
		{"P25–P75", withAlpha(okBlue, 120), "band"}, {"median", okBlue, "line"}}, nil
}

// capacityLine draws a horizontal line at the capacity from x0 to x1.
func capacityLine(p *plot.Plot, capacity, x0, x1 float64, unit string) (keyItem, error) {
	l, err := line(plotter.XYs{{X: x0, Y: capacity}, {X: x1, Y: capacity}}, okVermillion, 1.2, dash)
	if err != nil {
		return keyItem{}, err
	}
	p.Add(l)
	return keyItem{fmt.Sprintf("capacity %s %s", numfmt.Number(capacity), unit), okVermillion, "dash"}, nil
}

// demandFanFigure plots the daily quantiles of simulated demand over the
// target year.
func demandFanFigure(f *sim.Fan, unit string, capacity float64) (figure, error) {
	xs := make([]float64, len(f.Dates))
	for d, date := range f.Dates {
		xs[d] = float64(date.DayOfYear())
	}
	year := f.Dates[0].Year()
	p := newPlot(fmt.Sprintf("Simulated daily demand in %d", year), "day of year", "daily demand ("+unit+")", true)
	p.X.Tick.Marker = monthTicks()
	p.X.Min, p.X.Max = 1, 366
	key, err := quantileBands(p, xs, f.DemandQ, "simulated days")
	if err != nil {
		return figure{}, err
	}
	if capacity > 0 {
		k, err := capacityLine(p, capacity, 1, 366, unit)
		if err != nil {
			return figure{}, err
		}
		key = append(key, k)
	}
	svg, err := toSVG(p, smallW, smallH, fmt.Sprintf("Fan chart of simulated daily demand in %d", year))
	return figure{ID: "fig-demand-fan", SVG: svg, Key: key,
		Caption: "Quantiles of each day's demand across the first synthetic years of the run."}, err
}

// loadDurationFigure plots the load-duration curve: the quantiles across
// synthetic years of the n-th highest day of the year.
func loadDurationFigure(pl *render.Planning, unit string, capacity float64, year int) (figure, error) {
	n := len(pl.LoadDuration[0])
	xs := make([]float64, n)
	for i := range xs {
		xs[i] = float64(i + 1)
	}
	p := newPlot(fmt.Sprintf("Load-duration curve of %d", year), "n-th highest day of the year (days)",
		"daily demand ("+unit+")", true)
	p.X.Min, p.X.Max = 1, float64(n)
	key, err := quantileBands(p, xs, pl.LoadDuration, "synthetic years")
	if err != nil {
		return figure{}, err
	}
	if capacity > 0 {
		k, err := capacityLine(p, capacity, 1, float64(n), unit)
		if err != nil {
			return figure{}, err
		}
		key = append(key, k)
	}
	svg, err := toSVG(p, smallW, smallH, fmt.Sprintf("Load-duration curve of %d", year))
	return figure{ID: "fig-load-duration", SVG: svg, Key: key, Caption: fmt.Sprintf("Each synthetic year's days "+
		"sorted from the highest demand down; the bands are across %s synthetic years. Where the curve crosses "+
		"the capacity is how many days a year exceed it.", numfmt.Number(float64(pl.LoadDurationPaths)))}, err
}
