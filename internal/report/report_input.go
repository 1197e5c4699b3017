package report

import (
	"time"

	"wxstress/calendar"
	"wxstress/internal/render"
	"wxstress/model"
	"wxstress/sim"
)

// ReportInput is everything the HTML report can show. Nil parts leave their
// section out (a report from "fit" has no simulation; one from "simulate"
// has no observed series).
type ReportInput struct {
	Title   string
	Created time.Time     // shown in the manifest section
	RunTime time.Duration // wall time of the run, shown in the manifest section
	Inputs  []InputFile   // files read, with their SHA-256

	Model *model.File // the fitted model, with its diagnostics
	// Series is the observed record; nil when the report is made from a
	// model file alone.
	Series *SeriesView

	Sim       *render.SimReport // tail tables of the baseline and scenarios
	Base      *sim.Result       // per-path values of the baseline
	Scenarios []*sim.Result     // per-path values of each scenario, in Sim.Scenarios order
	Fan       *sim.Fan          // daily quantiles over the target year

	Demand *DemandView
}

// InputFile is a file a run read.
type InputFile struct {
	Role   string // "temperatures", "model", "demand", "scenario", ...
	Name   string
	SHA256 string
}

// SeriesView is the observed record with the fitted seasonal mean.
type SeriesView struct {
	Dates  []calendar.Date
	Temps  []float64 // NaN where missing
	Fitted []float64 // S(t)
	Z      []float64 // standardized innovations, NaN where undefined
}

// DemandView is what the demand section shows about the fitted load model.
type DemandView struct {
	Retailer string // whose demand, e.g. "Lanternfield Energy"
	Unit     string // e.g. "GJ/day"
	Form     string // change-point form, e.g. "5p"
	// Temps and Loads are the observed daily pairs; CurveT and CurveLoad the
	// fitted load of an ordinary weekday (no holiday) over a temperature grid.
	Temps, Loads      []float64
	CurveT, CurveLoad []float64
	Facts             [][2]string // label, value: balance points, slopes, R², CV(RMSE), NMBE, ...
	Warnings          []string
}
