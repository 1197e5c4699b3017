package hedge

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/stat"

	"wxstress/internal/numfmt"
	"wxstress/sim"
)

// Options tune Evaluate; a nil *Options means DefaultOptions.
type Options struct {
	// Loading is λ of the standard-deviation principle, price = μ + λ·σ.
	Loading float64
	// Level is the level α of the quantile principle, price = the
	// α-quantile of the payout.
	Level float64
	// History holds the historical seasons' index values, moved to the target
	// year, for the burn price; a key may be missing or empty.
	History map[Key][]float64
}

// DefaultOptions returns λ = 0.2, α = 0.95 and no history.
func DefaultOptions() Options { return Options{Loading: 0.2, Level: 0.95} }

// Risk summarises a net cost across paths (currency; high is adverse), with
// the conventions of the project's tail tables (sim.Summarize): VaR95 is the
// type-4 (Hyndman–Fan) 95 % quantile, ES95 and ES99 the means of the worst
// ⌈0.05·N⌉ and ⌈0.01·N⌉ paths.
type Risk struct {
	Mean, SD, MeanSE  float64
	VaR95, ES95, ES99 float64
}

func riskOf(x []float64) Risk {
	t := sim.Summarize(x, true, nil)
	return Risk{t.Mean, t.SD, t.MeanSE, t.VaR95, t.ES95, t.ES99}
}

// MinVariance is a contract held alone at the quantity that minimises the
// variance of the net cost C − q·(P − premium):
//
//	q* = Cov(C, P) / Var(P)
//
// (C the exposure cost, P one contract's payout; a positive q* means buying,
// since payouts reduce the cost). The other contracts of the file are not
// held.
type MinVariance struct {
	Quantity float64 // q*; NaN when the payout does not vary across paths
	Net      Risk    // of C − q*·(P − premium); zero when Quantity is NaN
	// VarianceReduction is 1 − Var(net)/Var(C); NaN when C does not vary.
	VarianceReduction float64
}

// ContractResult is the evaluation of one contract. The payout statistics
// and prices are for one contract bought (quantity 1), before its premium;
// the position's payout on a path is Quantity·Payoffs[path].
type ContractResult struct {
	Contract Contract
	Payoffs  []float64 // per path
	// Mean is the expected payout (the expected-value price), MeanSE its
	// Monte Carlo standard error SD/√N.
	Mean, SD, MeanSE      float64
	P1, P5, P50, P95, P99 float64 // type-4 quantiles, as in the tail tables
	ProbPayout            float64 // fraction of paths with a payout > 0
	LoadedPrice           float64 // Mean + λ·SD
	QuantilePrice         float64 // the α-quantile of the payout
	// Burn is the mean payout over the historical seasons (NaN without
	// any), Seasons their count and BurnSE the mean's standard error from
	// the seasons' own payouts, sd/√n (NaN from fewer than two, or when they
	// all paid the same).
	Burn    float64
	Seasons int
	BurnSE  float64
	MinVar  MinVariance
}

// Result is the evaluation of a hedge file over simulated paths.
type Result struct {
	Paths   int
	Options Options   // as used, defaults filled in
	Cost    []float64 // the exposure cost per path (0 without an exposure)
	Net     []float64 // the net cost per path: Cost − Σ quantity·(payout − premium)
	// Unhedged and Hedged summarise Cost and Net.
	Unhedged, Hedged Risk
	// VarianceReduction is 1 − Var(Net)/Var(Cost); NaN when Cost does not
	// vary.
	VarianceReduction float64
	Contracts         []ContractResult
	// Warnings name a strike or a plan outside the simulated range of its
	// index (every path pays, or none does): often a file written for
	// another station, unit scale or season.
	Warnings []string
}

// Evaluate prices f's contracts and measures the position over simulated
// paths: values[k][p] is index value k on path p, for every key f.Needs(),
// all of one length. Bad values (missing keys, unequal lengths, non-finite
// numbers) and bad options are errors, as is a File that fails Validate.
// Evaluate does not modify its arguments; the Result shares no memory with
// them; the Result's slices are its own (Options.History is the caller's map).
func Evaluate(f *File, values map[Key][]float64, opt *Options) (*Result, error) {
	if err := f.Validate(); err != nil {
		return nil, err
	}
	o := DefaultOptions()
	if opt != nil {
		o = *opt
	}
	if !finite(o.Loading) || o.Loading < 0 {
		return nil, fmt.Errorf("hedge: loading λ = %v: want a finite number ≥ 0", o.Loading)
	}
	if !(o.Level > 0 && o.Level < 1) {
		return nil, fmt.Errorf("hedge: quantile level %v: want 0 < α < 1", o.Level)
	}
	n := -1
	var first Key
	for _, k := range f.Needs() {
		v, ok := values[k]
		if !ok || len(v) == 0 {
			return nil, fmt.Errorf("hedge: no simulated values for %s", k)
		}
		if n < 0 {
			n, first = len(v), k
		} else if len(v) != n {
			return nil, fmt.Errorf("hedge: %s has %d paths but %s has %d", k, len(v), first, n)
		}
		if err := allFinite(v, k, "path"); err != nil {
			return nil, err
		}
	}
	r := &Result{Paths: n, Options: o, Cost: make([]float64, n), Net: make([]float64, n)}
	r.Warnings = rangeWarnings(f, values)
	if e := f.Exposure; e != nil {
		for p, v := range values[e.Key()] {
			r.Cost[p] = e.Cost(v)
		}
	}
	copy(r.Net, r.Cost)
	r.Unhedged = riskOf(r.Cost)
	varCost := r.Unhedged.SD * r.Unhedged.SD
	reduction := func(sd float64) float64 {
		if varCost == 0 {
			return math.NaN()
		}
		return 1 - sd*sd/varCost
	}
	for _, c := range f.Contracts {
		cr := ContractResult{Contract: c, Payoffs: make([]float64, n), Burn: math.NaN(), BurnSE: math.NaN()}
		paid := 0
		for p, v := range values[c.Key()] {
			x := c.Payoff(v)
			cr.Payoffs[p] = x
			r.Net[p] -= c.Quantity * (x - c.Premium)
			if x > 0 {
				paid++
			}
		}
		t := sim.Summarize(cr.Payoffs, true, nil)
		cr.Mean, cr.SD, cr.MeanSE = t.Mean, t.SD, t.MeanSE
		cr.P1, cr.P5, cr.P50, cr.P95, cr.P99 = t.Quantile(0.01), t.Quantile(0.05), t.Quantile(0.50), t.Quantile(0.95), t.Quantile(0.99)
		cr.ProbPayout = float64(paid) / float64(n)
		cr.LoadedPrice = cr.Mean + o.Loading*cr.SD
		sorted := slices.Clone(cr.Payoffs)
		slices.Sort(sorted)
		// The tail tables' convention (sim.Summarize): type 4 of Hyndman and Fan.
		cr.QuantilePrice = stat.Quantile(o.Level, stat.LinInterp, sorted, nil)

		if h := o.History[c.Key()]; len(h) > 0 {
			if err := allFinite(h, c.Key(), "historical season"); err != nil {
				return nil, err
			}
			pays := make([]float64, len(h))
			for i, v := range h {
				pays[i] = c.Payoff(v)
			}
			cr.Burn, cr.Seasons, cr.BurnSE = stat.Mean(pays, nil), len(h), math.NaN()
			if sd := stat.StdDev(pays, nil); len(h) > 1 && sd > 0 {
				// The standard error of a mean of n seasons, from their own
				// spread: whole past seasons, whatever the run's start.
				// Seasons that all paid the same give none (NaN), not ± 0.
				cr.BurnSE = sd / math.Sqrt(float64(len(h)))
			}
		}

		cr.MinVar = MinVariance{Quantity: math.NaN(), VarianceReduction: math.NaN()}
		if vp := stat.Variance(cr.Payoffs, nil); vp > 0 && n > 1 {
			qs := stat.Covariance(r.Cost, cr.Payoffs, nil) / vp
			net := make([]float64, n)
			for p := range net {
				net[p] = r.Cost[p] - qs*(cr.Payoffs[p]-c.Premium)
			}
			cr.MinVar.Quantity = qs
			cr.MinVar.Net = riskOf(net)
			cr.MinVar.VarianceReduction = reduction(cr.MinVar.Net.SD)
		}
		r.Contracts = append(r.Contracts, cr)
	}
	r.Hedged = riskOf(r.Net)
	r.VarianceReduction = reduction(r.Hedged.SD)
	return r, nil
}

// rangeWarnings names the exposure's plan and the contracts' strikes that
// lie outside the simulated range of their index.
func rangeWarnings(f *File, values map[Key][]float64) []string {
	var out []string
	outside := func(what string, k Key, x float64) {
		lo, hi := floats.Min(values[k]), floats.Max(values[k])
		side := ""
		switch {
		case x < lo:
			side = "below"
		case x > hi:
			side = "above"
		default:
			return
		}
		out = append(out, fmt.Sprintf("%s %s lies %s every simulated %s (%s to %s): check the file's units, "+
			"station and period", what, numfmt.Number(x), side, k.Index+" of the "+k.Period+" period", numfmt.Number(lo), numfmt.Number(hi)))
	}
	if e := f.Exposure; e != nil {
		outside("the exposure's plan", e.Key(), e.Plan)
	}
	for _, c := range f.Contracts {
		if c.Kind == Collar {
			outside(fmt.Sprintf("contract %q's strike_low", c.Name), c.Key(), c.StrikeLow)
			outside(fmt.Sprintf("contract %q's strike_high", c.Name), c.Key(), c.StrikeHigh)
		} else {
			outside(fmt.Sprintf("contract %q's strike", c.Name), c.Key(), c.Strike)
		}
	}
	return out
}

func allFinite(v []float64, k Key, what string) error {
	for i, x := range v {
		if !finite(x) {
			return fmt.Errorf("hedge: %s: %s %d is %v", k, what, i+1, x)
		}
	}
	return nil
}
