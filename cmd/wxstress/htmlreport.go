package main

import (
	"io"

	"wxstress/calibrate"
	"wxstress/cmd/wxstress/render"
	"wxstress/internal/atomicfile"
)

// writeReport renders the HTML report into path, atomically.
func writeReport(path string, in *render.ReportInput) error {
	return atomicfile.Write(path, func(w io.Writer) error { return render.HTMLReport(w, in) })
}

// seriesView is the observed record of a fit, for the report.
func seriesView(res *calibrate.Result) *render.SeriesView {
	v := &render.SeriesView{Temps: res.Series.Temps, Fitted: res.Fitted, Z: res.Z}
	for i := range res.Series.Temps {
		v.Dates = append(v.Dates, res.Series.Date(i))
	}
	return v
}
