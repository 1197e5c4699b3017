// Package report writes a stress run as one self-contained HTML page: the
// record, the fit and its diagnostics, the simulated tail tables, the
// scenarios, the demand model with its planning tables, and the manifest
// with the cautions, with inline SVG plots drawn by gonum/plot and no
// script or external resource.
//
// New lays out the pipeline's result (stress.Run) with a Meta (title,
// times, input files, the simulation's manifest) as an Input; Write
// renders an Input:
//
//	res, err := stress.Run(ctx, job)
//	...
//	err = report.Write(w, report.New(res, report.Meta{Title: "...", Manifest: m}))
//
// The page is made by html/template from the templates embedded from
// templates/*.html (go:embed): page.html lays out the page and each
// section's template fills it, from views that this package builds from
// the input (plain values and strings, no markup). The template engine
// escapes every text of the input (titles, file names, scenario names and
// descriptions, warnings); only the SVG plots, which this package draws,
// and the style sheet templates/style.css are inserted as trusted markup
// (template.HTML, template.CSS).
//
// Numbers keep the units of the data; the tail tables' cells are the
// float64 values of the JSON and CSV outputs (package render) rounded to
// a fixed number of decimals, and each carries data-scen, data-period,
// data-index and data-stat attributes so that scripts can read them back.
//
// Write builds the page in memory and writes it with one Write, so a
// failure leaves the writer untouched. New and Write are safe for
// concurrent use (the parsed templates are shared, read only); an Input and
// the result behind it are only read.
package report
