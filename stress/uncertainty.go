package stress

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/stat"

	"wxstress/calibrate"
	"wxstress/model"
	"wxstress/sim"
)

// Uncertainty modes.
const (
	// UncertaintyBand gives each tail number a 90 % confidence band from
	// the spread of its value across the refitted models.
	UncertaintyBand = "band"
	// UncertaintyMix spreads the paths over the refitted models, so the
	// tail table is the predictive distribution that includes parameter
	// uncertainty.
	UncertaintyMix = "mix"
)

// Uncertainty asks for parameter uncertainty by a parametric bootstrap:
// Refits synthetic records of the fitted model, each of the record's length
// with its gaps, are refitted with the model's structure (calibrate's lean
// path), and the simulation is repeated with each refitted model.
type Uncertainty struct {
	Refits int
	Mode   string // UncertaintyBand (default) or UncertaintyMix
}

// bootstrapSalt separates the synthetic records' random streams from the
// simulation's.
const bootstrapSalt = 0xb007_57a9

// BandLevel is the confidence level of the bands.
const BandLevel = 0.90

// Band is a confidence band of one tail number across the refits.
type Band struct{ Lo, Hi float64 }

// RowBands are the bands of the main tail numbers of one row of the
// baseline.
type RowBands struct {
	Period                        string
	Index                         sim.Index
	Mean, VaR95, ES95, RL20, RL50 Band
	// Design are the bands of the 1-in-T levels of the design standards
	// (Job.Design), in order.
	Design []Band
}

// Refits returns n models refitted to synthetic records drawn from m over
// the days of s (its gaps kept), in order; refit r uses stream r of seed.
func Refits(ctx context.Context, s *calibrate.Series, m *model.File, n int, seed uint64) ([]*model.File, error) {
	lean := calibrate.Settings{Harmonics: len(m.Seasonal.Harmonics), AROrder: len(m.AR.Phi), Slow: calibrate.SlowNone,
		Trend: m.Trend.Kind, Shocks: m.Shocks.Family, Lean: true, Start: m}
	if m.Slow != nil {
		lean.Slow = calibrate.SlowOn
	}
	if f, _ := model.LookupFamily(lean.Shocks); !f.Parametric() {
		lean.Shocks = model.FamilyNormal
		if m.Diagnostics != nil && m.Diagnostics.KSFamily != "" {
			lean.Shocks = m.Diagnostics.KSFamily
		}
	}
	out := make([]*model.File, n)
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(runtime.GOMAXPROCS(0))
	for r := range n {
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			rec, err := sim.Record(m, s.Start, s.End(), seed^bootstrapSalt, r)
			if err != nil {
				return err
			}
			for i, v := range s.Temps {
				if math.IsNaN(v) {
					rec[i] = math.NaN()
				}
			}
			syn := *s
			syn.Temps = rec
			fit, err := calibrate.Fit(&syn, &lean)
			if err != nil {
				return fmt.Errorf("stress: refit %d of the parametric bootstrap: %w", r+1, err)
			}
			// A refit describes the parameters, not the synthetic record's
			// last days: a conditional start keeps the real record's state.
			fm := fit.Model
			fm.ToolVersion = m.ToolVersion
			fm.AR.Last = slices.Clone(m.AR.Last)
			if fm.Slow != nil && m.Slow != nil {
				fm.Slow.State, fm.Slow.StateSD = m.Slow.State, min(m.Slow.StateSD, fm.Slow.SD)
			}
			out[r] = fm
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	return out, ctx.Err()
}

// bands simulates each refitted model with cfg (the same seed: common random
// numbers, so the spread is the parameters', not Monte Carlo noise) and
// returns, for every row of the baseline, the 90 % range of its tail numbers.
func bands(ctx context.Context, models []*model.File, cfg sim.Config, base []sim.Row, design []float64) ([]RowBands, error) {
	stats := func(t sim.Tail) []float64 {
		v := []float64{t.Mean, t.VaR95, t.ES95, t.ReturnLevel(20), t.ReturnLevel(50)}
		for _, T := range design {
			v = append(v, t.ReturnLevel(T))
		}
		return v
	}
	vals := make([][][]float64, len(base)) // [row][refit]{mean, VaR95, ES95, RL20, RL50, design…}
	for _, m := range models {
		res, err := sim.Run(ctx, m, cfg)
		if err != nil {
			return nil, err
		}
		rows := res.Summarize(model.Units(m.Data.Units), nil)
		if len(rows) != len(base) {
			panic("stress: a refit's run has other rows than the baseline")
		}
		for k, r := range rows {
			t := r.Tail
			vals[k] = append(vals[k], stats(t))
		}
	}
	// The basic (reverse-percentile) bootstrap interval, [2θ̂ − q₉₅, 2θ̂ − q₅]
	// with θ̂ the fitted model's value and q the refits' quantiles (Davison &
	// Hinkley 1997, Bootstrap Methods and their Application, §5.2 — from
	// memory): it corrects the refits' shared bias, which on short records
	// pulls the percentile band below the truth (stress/bandstudy).
	lo, hi := (1-BandLevel)/2, (1+BandLevel)/2
	out := make([]RowBands, len(base))
	for k, r := range base {
		t := r.Tail
		fitted := stats(t)
		b := RowBands{Period: r.Period, Index: r.Index, Design: make([]Band, len(design))}
		dsts := []*Band{&b.Mean, &b.VaR95, &b.ES95, &b.RL20, &b.RL50}
		for j := range design {
			dsts = append(dsts, &b.Design[j])
		}
		for j, dst := range dsts {
			col := make([]float64, len(vals[k]))
			for i, v := range vals[k] {
				col[i] = v[j]
			}
			slices.Sort(col)
			qlo, qhi := stat.Quantile(lo, stat.LinInterp, col, nil), stat.Quantile(hi, stat.LinInterp, col, nil)
			*dst = Band{2*fitted[j] - qhi, 2*fitted[j] - qlo}
		}
		out[k] = b
	}
	return out, nil
}

// mixed runs m's configuration spread over the models: path i is simulated
// by models[i mod n] (with its own path number, so every path keeps its
// own stream), and the aggregates are laid out in path order as one run's.
func mixed(ctx context.Context, models []*model.File, cfg sim.Config) (*sim.Result, error) {
	n := len(models)
	var out *sim.Result
	for r, m := range models {
		c := cfg
		c.Paths = (cfg.Paths - r + n - 1) / n // paths r, r+n, r+2n, …
		if c.Paths == 0 {
			continue
		}
		c.Seed = cfg.Seed ^ uint64(r+1)*0x9e3779b97f4a7c15
		res, err := sim.Run(ctx, m, c)
		if err != nil {
			return nil, err
		}
		if out == nil {
			out = &sim.Result{Config: res.Config, Periods: res.Periods, SimulatedDays: res.SimulatedDays}
			out.Config.Paths = cfg.Paths
			out.Config.Seed = cfg.Seed
			for _, a := range res.Aggregates {
				out.Aggregates = append(out.Aggregates, sim.Aggregate{Index: a.Index, Period: a.Period, Values: make([]float64, cfg.Paths)})
			}
		}
		for k, a := range res.Aggregates {
			for j, v := range a.Values {
				out.Aggregates[k].Values[r+j*n] = v
			}
		}
	}
	return out, nil
}
