package report

import (
	"time"

	"wxstress/calendar"
	"wxstress/internal/render"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

// Input is everything the HTML report can show, as New lays out a stress
// run. Nil parts leave their section out (a report from "fit" has no
// simulation; one from "simulate" has no observed series).
type Input struct {
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

// Meta is what a report tells about a run beyond its result: the title, when
// it was made and how long the run took, the files it read, the simulation's
// manifest and whose demand it is.
type Meta struct {
	Title   string        // "" gives "wxstress report" and the station's description
	Created time.Time     // shown in the subtitle and the manifest section
	RunTime time.Duration // wall time of the run, shown in the manifest section
	Inputs  []InputFile   // files read, with their SHA-256
	// Manifest is the simulation's provenance, as in the JSON and CSV
	// outputs; unused when the run did not simulate.
	Manifest render.Manifest
	// Retailer names whose demand a fitted demand history is, e.g.
	// "Lanternfield Energy"; "" for "The demand series".
	Retailer string
}

// New lays out a stress run for the report: the fitted model (res.Model),
// the observed record with the fitted seasonal mean and the standardized
// innovations (when res.Fit has them), the tail tables of the baseline and
// the scenarios with their per-path values, the fan and the planning tables
// with the weather-normalized history (when res.Set has them), and the
// fitted demand model against its history (when res.DemandDays has it).
// res is only read and must outlive the Input. New panics if res has no
// model.
func New(res *stress.Result, meta Meta) *Input {
	if res == nil || res.Model == nil {
		panic("report: New needs a result with a model")
	}
	in := &Input{Title: meta.Title, Created: meta.Created, RunTime: meta.RunTime, Inputs: meta.Inputs, Model: res.Model}
	if f := res.Fit; f != nil && f.Series != nil {
		s := f.Series
		in.Series = &SeriesView{Temps: s.Temps, Fitted: f.Fitted, Z: f.Z}
		for i := range s.Temps {
			in.Series.Dates = append(in.Series.Dates, s.Date(i))
		}
	}
	if set := res.Set; set != nil {
		in.Sim = render.NewSimReport(res)
		in.Sim.Manifest = meta.Manifest
		in.Base, in.Scenarios, in.Fan = set.Base, set.Results(), set.Fan
	}
	if res.Demand != nil && res.DemandDays != nil {
		in.Demand = newDemandView(meta.Retailer, res.Demand, res.DemandDays.Temp, res.DemandDays.Load)
	}
	return in
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
	Form     string // change-point form, e.g. "heating-and-cooling-band"
	// Temps and Loads are the observed daily pairs; CurveT and CurveLoad the
	// fitted load of an ordinary weekday (no holiday) over a temperature grid.
	Temps, Loads      []float64
	CurveT, CurveLoad []float64
	Facts             [][2]string // label, value: balance points, slopes, R², CV(RMSE), NMBE, ...
	Warnings          []string
}
