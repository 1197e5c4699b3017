// Package stress runs a stress test: the baseline model and each scenario
// with the same configuration, so that path i of every run has the same
// shocks (common random numbers), with their tail tables and their changes
// against the baseline. It also turns a demand history into what the
// simulator's weather normalization and holiday calendar take.
//
// Functions here never print; they are safe for concurrent use on distinct
// inputs.
package stress

import (
	"context"
	"errors"
	"fmt"
	"strings"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/model"
	"wxstress/scenarios"
	"wxstress/sim"
)

// ScenarioRun is one scenario's simulation.
type ScenarioRun struct {
	Scenario *scenarios.Scenario
	Result   *sim.Result
	Rows     []sim.Row
	Changes  []sim.Change // Changes[i] is Rows[i] against the baseline's Rows[i]
	What     []string     // what the scenario changes, worked out for the model
}

// Set is a baseline run with its scenarios.
type Set struct {
	Config    sim.Config // as run, defaults filled in
	Base      *sim.Result
	Rows      []sim.Row
	Scenarios []ScenarioRun
	// Fan holds the first detail paths of the baseline whole (fan chart,
	// load-duration curve); nil when Simulate was asked for none.
	Fan *sim.Fan
}

// Simulate runs m and each scenario applied to m with cfg, summarizes every
// run with thresholds, and compares each scenario with the baseline. With
// detail > 0 it also keeps the first detail paths (at most cfg.Paths) of
// the baseline whole.
func Simulate(ctx context.Context, m *model.File, cfg sim.Config, scens []*scenarios.Scenario,
	thresholds []sim.Threshold, detail int) (*Set, error) {
	return simulate(ctx, m, nil, cfg, scens, thresholds, detail)
}

// simulate is Simulate; with mix set, every run (baseline and scenarios,
// each scenario applied to every model) spreads its paths over the models
// in mix (the predictive distribution with parameter uncertainty), while m
// still gives the scenario descriptions and the detail paths.
func simulate(ctx context.Context, m *model.File, mix []*model.File, cfg sim.Config, scens []*scenarios.Scenario,
	thresholds []sim.Threshold, detail int) (*Set, error) {
	cfg.Year = sim.TargetYear(m, cfg.Year, cfg.Periods)
	run := func(ms []*model.File) (*sim.Result, error) {
		if ms == nil {
			return nil, nil
		}
		return mixed(ctx, ms, cfg)
	}
	apply := func(sc *scenarios.Scenario, ms []*model.File) ([]*model.File, error) {
		var out []*model.File
		for _, x := range ms {
			sm, err := sc.Apply(x, cfg.Year)
			if err != nil {
				return nil, err
			}
			out = append(out, sm)
		}
		return out, nil
	}
	models := make([]*model.File, len(scens))
	mixes := make([][]*model.File, len(scens))
	for i, sc := range scens {
		sm, err := sc.Apply(m, cfg.Year)
		if errors.Is(err, scenarios.ErrUnsuited) {
			return nil, fmt.Errorf("%w: %s", ErrJob, strings.TrimPrefix(err.Error(), scenarios.ErrUnsuited.Error()+": "))
		}
		if err != nil {
			return nil, err
		}
		models[i] = sm
		if mixes[i], err = apply(sc, mix); err != nil {
			return nil, err
		}
	}
	base, err := run(mix)
	if base == nil && err == nil {
		base, err = sim.Run(ctx, m, cfg)
	}
	if err != nil {
		return nil, err
	}
	set := &Set{Config: base.Config, Base: base, Rows: base.Summarize(model.Units(m.Data.Units), thresholds)}
	for i, sm := range models {
		res, err := run(mixes[i])
		if res == nil && err == nil {
			res, err = sim.Run(ctx, sm, cfg)
		}
		if err != nil {
			return nil, err
		}
		rows := res.Summarize(model.Units(m.Data.Units), thresholds)
		set.Scenarios = append(set.Scenarios, ScenarioRun{Scenario: scens[i], Result: res, Rows: rows,
			Changes: sim.Compare(base, res, set.Rows, rows), What: scens[i].DescribeFor(m, cfg.Year)})
	}
	if detail > 0 {
		if set.Fan, err = sim.RunFan(ctx, m, cfg, min(detail, cfg.Paths)); err != nil {
			return nil, err
		}
	}
	return set, nil
}

// Results returns the scenarios' simulation results, in order.
func (s *Set) Results() []*sim.Result {
	out := make([]*sim.Result, len(s.Scenarios))
	for i, r := range s.Scenarios {
		out[i] = r.Result
	}
	return out
}

// History is the demand history as the simulator's weather normalization
// takes it.
func History(days *calibrate.DemandDays) []sim.HistoryDay {
	hist := make([]sim.HistoryDay, len(days.Dates))
	for i := range hist {
		hist[i] = sim.HistoryDay{Date: days.Dates[i], Temp: days.Temp[i], Load: days.Load[i], Holiday: days.Holiday[i]}
	}
	return hist
}

// Holidays lists the holidays of a demand history.
func Holidays(days *calibrate.DemandDays) []calendar.Date {
	var out []calendar.Date
	for i, h := range days.Holiday {
		if h {
			out = append(out, days.Dates[i])
		}
	}
	return out
}
