// Package report writes a stress run as one self-contained HTML page: the
// record, the fit and its diagnostics, the simulated tail tables, the
// scenarios, the demand model with its planning tables, and the manifest
// with the cautions, with inline SVG plots drawn by gonum/plot and no
// script or external resource.
//
// Numbers keep the units of the data; the tail tables' cells are the
// float64 values of the JSON and CSV outputs (package render) rounded to
// a fixed number of decimals, and each carries data-scen, data-period,
// data-index and data-stat attributes so that scripts can read them back.
//
// HTMLReport builds the page in memory and writes it with one Write, so a
// failure leaves the writer untouched. It is safe for concurrent use on
// different inputs; a ReportInput is only read.
package report
