package evidence

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// IntervalLevel is the least confidence level of the order-statistic
// interval of Quantile.
const IntervalLevel = 0.95

// QuantileEstimate is a sample quantile with its Monte Carlo error.
type QuantileEstimate struct {
	P     float64
	Value float64 // type 4 quantile (gonum stat.LinInterp), as sim.Summarize
	// Lo and Hi are the order statistics X₍J₎ and X₍K₎ (ranks from 1) that
	// cover the true quantile with probability Coverage ≥ IntervalLevel
	// whatever the continuous distribution. J = 0 and Lo = −∞, or
	// K = N + 1 and Hi = +∞, when N is too small for a bound on that side.
	Lo, Hi   float64
	J, K     int
	Coverage float64
	// SE is (Hi − Lo)/(2·z) with z = Φ⁻¹(½ + ½Coverage), which is 1.96 when
	// Coverage is exactly 0.95; using the coverage reached keeps the
	// discreteness of the ranks from inflating it. +∞ when a bound is
	// missing. It describes the error well when N·min(p, 1 − p) is about 20
	// or more; with fewer paths beyond the quantile the interval is lopsided
	// and SE overstates the error (by about a third for N = 500, p = 0.99 in
	// simulation).
	SE float64
}

// Quantile returns the quantile p of the values x with a distribution-free
// confidence interval from order statistics. The number B of values at or
// below the true quantile q_p is Binomial(N, p), and
//
//	P(X₍J₎ ≤ q_p ≤ X₍K₎) = P(J ≤ B ≤ K − 1),
//
// (David and Nagaraja 2003, Order Statistics, 3rd ed., §7.1, from memory);
// J is the largest rank with P(B ≤ J − 1) ≤ 0.025 and K the smallest with
// P(B ≥ K) ≤ 0.025, so each side misses with probability at most 2.5 %. For
// the adverse quantile of a low-is-adverse aggregate pass 1 − p, as
// sim.Summarize does. x is not modified. It panics if x is empty or p is not
// in (0, 1).
func Quantile(x []float64, p float64) QuantileEstimate {
	return QuantileSorted(sortedCopy(x), p)
}

// QuantileSorted is Quantile for values already sorted ascending, or with
// the order statistics EstimateRanks(len(s), p) selected into place
// (SelectRanks), not checked, without the copy: for callers that summarise
// many quantiles of one column.
func QuantileSorted(s []float64, p float64) QuantileEstimate {
	n := len(s)
	if n == 0 {
		panic("evidence: quantile of no values")
	}
	if !(p > 0 && p < 1) {
		panic("evidence: quantile probability outside (0, 1)")
	}
	b := distuv.Binomial{N: float64(n), P: p}
	j, k := intervalRanks(n, p)
	q := QuantileEstimate{
		P:     p,
		Value: SortedQuantile(p, s),
		Lo:    math.Inf(-1),
		Hi:    math.Inf(1),
		J:     j,
		K:     k,
	}
	if j >= 1 {
		q.Lo = s[j-1]
	}
	if k <= n {
		q.Hi = s[k-1]
	}
	q.Coverage = b.CDF(float64(k-1)) - b.CDF(float64(j-1))
	q.SE = (q.Hi - q.Lo) / (2 * distuv.UnitNormal.Quantile(0.5+q.Coverage/2))
	return q
}

// intervalRanks returns J and K of the order-statistic interval of the
// p-quantile of n values (1-based; 0 and n + 1 when the interval is open).
func intervalRanks(n int, p float64) (j, k int) {
	tail := (1 - IntervalLevel) / 2
	b := distuv.Binomial{N: float64(n), P: p}
	// CDF(m) rises with m: J is the first m in [0, n] with CDF(m) > tail.
	j = sort.Search(n+1, func(m int) bool { return b.CDF(float64(m)) > tail })
	// The upper tail falls with k: K is the first k with P(B ≥ k) ≤ tail.
	k = sort.Search(n+1, func(k int) bool { return upperTail(n, p, k) <= tail })
	return j, k
}

// EstimateRanks returns the 0-based ranks of the order statistics
// QuantileSorted(s, p) reads for len(s) = n: the quantile's own
// (QuantileRanks) and its interval's ends. After SelectRanks with them,
// QuantileSorted gives what it gives on the sorted values.
func EstimateRanks(n int, p float64) []int {
	r := QuantileRanks(p, n)
	j, k := intervalRanks(n, p)
	if j >= 1 {
		r = append(r, j-1)
	}
	if k <= n {
		r = append(r, k-1)
	}
	return r
}

// ShortfallEstimate is an expected shortfall with its Monte Carlo error.
type ShortfallEstimate struct {
	Alpha float64
	K     int     // tail size ⌈α·N⌉, at least 1
	Value float64 // mean of the worst K values, as sim.Summarize
	// Threshold is the least adverse of the worst K values (the estimate of
	// the value at risk at the tail boundary) and TailSD the sample standard
	// deviation (divisor K − 1) of the worst K values.
	Threshold, TailSD float64
	SE                float64 // asymptotic standard error; NaN when K < 2
}

// Shortfall returns the expected shortfall of the values x, the mean of the
// worst K = ⌈α·N⌉ of them (the highest when highIsAdverse, else the lowest),
// and its asymptotic standard error
//
//	SE = √{[s²_tail + (1 − a)(ES − v)²] / K},  a = K/N,
//
// with s²_tail the variance of the tail values and v the tail boundary
// (Threshold). This is σ²/N for the asymptotic variance
// σ² = [Var(X | X > v) + (1 − a)(ES − v)²]/a of the empirical conditional
// tail expectation (Brazauskas, Jones, Puri and Zitikis 2008, J. Stat. Plan.
// Inference 138, 3590–3604, from memory; it follows from the influence
// function (x − v)₊/a + v − ES). The variance needs a finite second moment.
// x is not modified. It panics if x is empty or α is not in (0, 1].
func Shortfall(x []float64, alpha float64, highIsAdverse bool) ShortfallEstimate {
	return ShortfallSorted(sortedCopy(x), alpha, highIsAdverse)
}

// ShortfallSorted is Shortfall for values already sorted ascending, or with
// the boundary of the worst ⌈α·n⌉ selected into place (SelectRanks; the
// worst values are then a set at that end), not checked, without the copy.
func ShortfallSorted(s []float64, alpha float64, highIsAdverse bool) ShortfallEstimate {
	n := len(s)
	if n == 0 {
		panic("evidence: shortfall of no values")
	}
	if !(alpha > 0 && alpha <= 1) {
		panic("evidence: shortfall tail fraction outside (0, 1]")
	}
	k := min(max(int(math.Ceil(alpha*float64(n)-1e-9)), 1), n) // as sim's shortfall
	tail, v := s[:k], s[k-1]
	if highIsAdverse {
		tail, v = s[n-k:], s[n-k]
	}
	e := ShortfallEstimate{Alpha: alpha, K: k, Threshold: v, TailSD: math.NaN(), SE: math.NaN()}
	e.Value = stat.Mean(tail, nil)
	if k >= 2 {
		e.TailSD = stat.StdDev(tail, nil)
		a := float64(k) / float64(n)
		d := e.Value - v
		e.SE = math.Sqrt((e.TailSD*e.TailSD + (1-a)*d*d) / float64(k))
	}
	return e
}

// PathsNeeded returns the number of paths that brings a standard error of se,
// observed with n paths, down to target, using SE ∝ 1/√N:
//
//	N = ⌈n·(se/target)²⌉.
//
// It is the total count, not the extra paths, and may be below n when se is
// already below target. An infinite se gives math.MaxInt, as does a count
// beyond it. It panics if n < 1, target ≤ 0, or se is negative or NaN.
func PathsNeeded(se float64, n int, target float64) int {
	if n < 1 || !(target > 0) || !(se >= 0) {
		panic("evidence: PathsNeeded needs n ≥ 1, target > 0 and se ≥ 0")
	}
	r := se / target
	v := float64(n) * r * r
	if math.IsInf(v, 1) {
		return math.MaxInt
	}
	// Ignore rounding noise just above an integer (e.g. a ratio of exactly 2).
	v = math.Ceil(v - 1e-12*v)
	if v >= math.MaxInt {
		return math.MaxInt
	}
	return int(v)
}
