package sim

import (
	"fmt"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/stat"

	"wxstress/evidence"
)

// The probabilities of a tail table's quantiles, and the T of its 1-in-T
// return levels (years).
var (
	tailProbs         = [...]float64{0.01, 0.05, 0.10, 0.25, 0.50, 0.75, 0.90, 0.95, 0.99}
	tailReturnPeriods = [...]int{2, 5, 10, 20, 50, 100}
)

// TailQuantileProbs returns the probabilities at which a Tail holds
// quantiles, in increasing order (a copy).
func TailQuantileProbs() []float64 { return slices.Clone(tailProbs[:]) }

// TailReturnPeriods returns the default T, in years, of the 1-in-T return
// levels a Tail lists, in increasing order (a copy); a run may list others
// (Config.ReturnPeriods).
func TailReturnPeriods() []float64 {
	out := make([]float64, len(tailReturnPeriods))
	for i, T := range tailReturnPeriods {
		out[i] = float64(T)
	}
	return out
}

// coreReturnPeriods are computed whatever a run lists: the planning tables
// and the scenario comparisons read the 1-in-20, 1-in-50 and 1-in-100 levels.
var coreReturnPeriods = [...]float64{20, 50, 100}

// MaxReturnPeriod is the longest return period a run takes: a million
// years, already ten times what 10⁷ paths can estimate. Beyond about 10¹⁶
// the probability 1 − 1/T is 1 in floating point.
const MaxReturnPeriod = 1e6

// CheckReturnPeriods checks a list of return periods: each above 1 year and
// at most MaxReturnPeriod, no repeats.
func CheckReturnPeriods(ts []float64) error {
	for i, T := range ts {
		if !(T > 1) || T > MaxReturnPeriod {
			return fmt.Errorf("sim: return period %v: want a number of years above 1 and at most 1,000,000", T)
		}
		if slices.Contains(ts[:i], T) {
			return fmt.Errorf("sim: return period %v listed twice", T)
		}
	}
	return nil
}

// Tail summarises the distribution of one aggregate across paths.
//
// Quantiles use gonum's stat.LinInterp: linear interpolation of the
// empirical CDF, type 4 of Hyndman and Fan (1996), R's quantile(type = 4).
// "Adverse" is the high side for every index but the coldest day, where it is
// the low side.
type Tail struct {
	N         int
	Mean      float64
	SD        float64
	MeanSE    float64   // Monte Carlo standard error of the mean, SD/√N
	Quantiles []float64 // at TailQuantileProbs; read them with Quantile
	// VaR95 and VaR99 are the adverse 95 % and 99 % quantiles (P95 and P99,
	// or P5 and P1 when low is adverse); ES95 and ES99 are the means of the
	// worst ⌈0.05·N⌉ and ⌈0.01·N⌉ paths (expected shortfall).
	VaR95, VaR99 float64
	ES95, ES99   float64
	// ReturnPeriods are the T a table lists (the run's, or
	// TailReturnPeriods), ascending; ReturnLevels[i] is the level reached or
	// passed on the adverse side once in ReturnPeriods[i] years on average:
	// the quantile 1 − 1/T (1/T when low is adverse) of the per-year value.
	// Read a level with ReturnLevel, which also knows the 1-in-20, 1-in-50
	// and 1-in-100 levels a run does not list.
	ReturnPeriods []float64
	ReturnLevels  []float64
	levelT        []float64 // every T computed: ReturnPeriods ∪ coreReturnPeriods
	level         []float64
	levelSE       []float64
	Exceedances   []Exceedance

	// Monte Carlo standard errors: of each quantile and return level from
	// the distribution-free order-statistic interval (evidence.Quantile), of
	// the expected shortfalls from their asymptotic variance
	// (evidence.Shortfall). +Inf where the paths cannot bound a quantile.
	QuantileSE    []float64 // at TailQuantileProbs
	ReturnLevelSE []float64 // at ReturnPeriods
	VaR95SE       float64
	VaR99SE       float64
	ES95SE        float64
	ES99SE        float64
}

// Quantile returns the quantile at probability p, one of
// TailQuantileProbs (compared exactly with the listed values). It panics for
// any other p, or if t holds no quantiles: asking a table for a column it
// does not have is a programming error, and a NaN would travel silently
// into a report.
func (t Tail) Quantile(p float64) float64 {
	i := slices.Index(tailProbs[:], p)
	if i < 0 || i >= len(t.Quantiles) {
		panic(fmt.Sprintf("sim: a tail table has no quantile at %v (it has %v)", p, tailProbs))
	}
	return t.Quantiles[i]
}

// ReturnLevel returns the 1-in-T-year return level, T one of the table's
// ReturnPeriods or 20, 50 or 100. Like Quantile, it panics for any other T.
func (t Tail) ReturnLevel(T float64) float64 {
	i := slices.Index(t.levelT, T)
	if i < 0 {
		panic(fmt.Sprintf("sim: a tail table has no %v-year return level (it has %v)", T, t.levelT))
	}
	return t.level[i]
}

// ReturnLevelError returns the Monte Carlo standard error of ReturnLevel(T)
// (NaN for a table of one path).
func (t Tail) ReturnLevelError(T float64) float64 {
	i := slices.Index(t.levelT, T)
	if i < 0 {
		panic(fmt.Sprintf("sim: a tail table has no %v-year return level (it has %v)", T, t.levelT))
	}
	if i >= len(t.levelSE) {
		return math.NaN()
	}
	return t.levelSE[i]
}

// Exceedance is the probability that a year is worse than a threshold: above
// it when high is adverse, below it otherwise.
type Exceedance struct {
	Threshold float64
	Prob      float64
	SE        float64 // binomial Monte Carlo standard error √(p(1 − p)/N)
}

// scratch holds SummarizeWith's working copies for reuse.
var scratch = sync.Pool{New: func() any { return new([]float64) }}

// Summarize computes the tail table of values (which it does not modify),
// listing the default return periods.
func Summarize(values []float64, highIsAdverse bool, thresholds []float64) Tail {
	return SummarizeWith(values, highIsAdverse, thresholds, nil)
}

// SummarizeWith is Summarize listing the return periods periods (T > 1,
// checked by CheckReturnPeriods; nil for TailReturnPeriods).
func SummarizeWith(values []float64, highIsAdverse bool, thresholds []float64, periods []float64) Tail {
	if periods == nil {
		periods = TailReturnPeriods()
	}
	n := len(values)
	if n == 0 {
		panic("sim: Summarize of no values")
	}
	// A working copy from a pool: a fresh 8 MB slice for each of a run's
	// aggregates costs more in page faults than the copy itself.
	buf := scratch.Get().(*[]float64)
	defer scratch.Put(buf)
	x := append((*buf)[:0], values...)
	*buf = x
	if slices.ContainsFunc(x, math.IsNaN) {
		slices.Sort(x) // NaNs first: every quantile below is NaN, as stat.Quantile's
	} else {
		// Every statistic below reads a few order statistics, or the set
		// of the worst values, or none: select those instead of sorting
		// (quickselect, evidence.SelectRanks), several times faster on a
		// million paths and the same order statistics.
		evidence.SelectRanks(x, tailRanks(n, highIsAdverse, periods))
	}
	t := Tail{N: n}
	t.Mean, t.SD = stat.MeanStdDev(x, nil)
	if n < 2 {
		t.SD = 0
	}
	t.MeanSE = t.SD / math.Sqrt(float64(n))
	nan := math.IsNaN(x[0]) // slices.Sort puts NaNs first; stat.Quantile would give NaN
	q := func(p float64) float64 {
		if nan {
			return math.NaN()
		}
		return evidence.SortedQuantile(p, x)
	}
	for _, p := range tailProbs {
		t.Quantiles = append(t.Quantiles, q(p))
	}
	adverse := func(p float64) float64 { // quantile p on the adverse side
		if highIsAdverse {
			return q(p)
		}
		return q(1 - p)
	}
	t.VaR95, t.VaR99 = adverse(0.95), adverse(0.99)
	t.ES95, t.ES99 = shortfall(x, 0.05, highIsAdverse), shortfall(x, 0.01, highIsAdverse)
	t.ReturnPeriods = slices.Sorted(slices.Values(periods))
	t.levelT = slices.Clone(t.ReturnPeriods)
	for _, T := range coreReturnPeriods {
		if !slices.Contains(t.levelT, T) {
			t.levelT = append(t.levelT, T)
		}
	}
	for _, T := range t.levelT {
		t.level = append(t.level, adverse(1-1/T))
	}
	t.ReturnLevels = t.level[:len(t.ReturnPeriods):len(t.ReturnPeriods)]
	if n >= 2 {
		se := func(p float64) float64 { return evidence.QuantileSorted(x, p).SE }
		adverseSE := func(p float64) float64 {
			if highIsAdverse {
				return se(p)
			}
			return se(1 - p)
		}
		for _, p := range tailProbs {
			t.QuantileSE = append(t.QuantileSE, se(p))
		}
		for _, T := range t.levelT {
			t.levelSE = append(t.levelSE, adverseSE(1-1/T))
		}
		t.ReturnLevelSE = t.levelSE[:len(t.ReturnPeriods):len(t.ReturnPeriods)]
		t.VaR95SE, t.VaR99SE = adverseSE(0.95), adverseSE(0.99)
		t.ES95SE = evidence.ShortfallSorted(x, 0.05, highIsAdverse).SE
		t.ES99SE = evidence.ShortfallSorted(x, 0.01, highIsAdverse).SE
	}
	for _, th := range thresholds {
		k := 0
		for _, v := range x {
			if highIsAdverse && v > th || !highIsAdverse && v < th {
				k++
			}
		}
		p := float64(k) / float64(n)
		t.Exceedances = append(t.Exceedances, Exceedance{th, p, math.Sqrt(p * (1 - p) / float64(n))})
	}
	return t
}

// shortfall is the mean of the worst ⌈a·n⌉ values of x, sorted or with
// those values selected to its ends (tailRanks).
func shortfall(x []float64, a float64, highIsAdverse bool) float64 {
	k := max(int(math.Ceil(a*float64(len(x))-1e-9)), 1)
	tail := x[:k]
	if highIsAdverse {
		tail = x[len(x)-k:]
	}
	return stat.Mean(tail, nil)
}

// tailRanks lists the order statistics (0-based) SummarizeWith reads from
// n values: each quantile's and return level's own and its interval's
// (evidence.EstimateRanks), and the boundaries of the worst 5 % and 1 %.
func tailRanks(n int, highIsAdverse bool, periods []float64) []int {
	var ranks []int
	add := func(p float64) { ranks = append(ranks, evidence.EstimateRanks(n, p)...) }
	for _, p := range tailProbs {
		add(p)
	}
	for _, T := range slices.Concat(periods, coreReturnPeriods[:]) {
		p := 1 - 1/T
		if !highIsAdverse {
			p = 1 - p
		}
		add(p)
	}
	for _, a := range []float64{0.05, 0.01} {
		k := max(int(math.Ceil(a*float64(n)-1e-9)), 1)
		ranks = append(ranks, k-1, n-k)
	}
	return ranks
}
