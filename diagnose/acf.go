package diagnose

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// ACF returns the sample autocorrelations r_1 … r_maxLag of x.
//
// x may contain NaN for missing days. The result is exactly that of R's
// acf(x, lag.max = maxLag, na.action = na.pass): the mean x̄ and the lag-0
// autocovariance c_0 = Σ (x_t − x̄)² / n use the n present values; the lag-k
// sum Σ (x_t − x̄)(x_{t+k} − x̄) runs over the m_k pairs where both days are
// present and is divided by m_k + k, so c_k is the usual Σ/n when nothing is
// missing; r_k = c_k / c_0, kept within [−1, 1].
//
// A lag with no complete pair — in particular every lag ≥ len(x) — gives NaN
// rather than a panic, since how long the series is belongs to the data, not to
// the caller. A constant series or one with no present value gives NaN at every
// lag. ACF panics if maxLag is negative.
func ACF(x []float64, maxLag int) []float64 {
	if maxLag < 0 {
		panic("diagnose: negative maxLag")
	}
	r := make([]float64, maxLag)
	values := present(x)
	if len(values) == 0 || constant(values) {
		fill(r, math.NaN())
		return r
	}
	mean := mean(values)
	d := make([]float64, len(x))
	var sumSq float64
	for i, v := range x {
		d[i] = v - mean // NaN stays NaN
		if !math.IsNaN(v) {
			sumSq += d[i] * d[i]
		}
	}
	c0 := sumSq / float64(len(values))
	for k := 1; k <= maxLag; k++ {
		var sum float64
		pairs := 0
		for t := 0; t+k < len(d); t++ {
			if math.IsNaN(d[t]) || math.IsNaN(d[t+k]) {
				continue
			}
			sum += d[t] * d[t+k]
			pairs++
		}
		if pairs == 0 {
			r[k-1] = math.NaN()
			continue
		}
		ck := sum / float64(pairs+k)
		r[k-1] = max(-1, min(1, ck/c0))
	}
	return r
}

// PACF returns the partial autocorrelations φ_11 … φ_hh, h = len(acf), from the
// autocorrelations acf[k−1] = r_k by the Durbin–Levinson recursion
//
//	φ_kk = (r_k − Σ_{j<k} φ_{k−1,j} r_{k−j}) / (1 − Σ_{j<k} φ_{k−1,j} r_j)
//	φ_kj = φ_{k−1,j} − φ_kk φ_{k−1,k−j},  j < k
//
// as R's pacf does. NaN in acf propagates to every later lag. An
// autocorrelation sequence that is not positive definite (|r_1| = 1, say) can
// make the denominator vanish and give ±Inf or NaN; no sample ACF of a
// non-constant series does.
func PACF(acf []float64) []float64 {
	h := len(acf)
	pacf := make([]float64, h)
	if h == 0 {
		return pacf
	}
	// prev holds φ_{k−1,1..k−1}, next φ_{k,1..k}.
	prev := make([]float64, h)
	next := make([]float64, h)
	pacf[0] = acf[0]
	prev[0] = acf[0]
	for k := 2; k <= h; k++ {
		num := acf[k-1]
		den := 1.0
		for j := 1; j < k; j++ {
			num -= prev[j-1] * acf[k-j-1]
			den -= prev[j-1] * acf[j-1]
		}
		phi := num / den
		pacf[k-1] = phi
		for j := 1; j < k; j++ {
			next[j-1] = prev[j-1] - phi*prev[k-j-1]
		}
		next[k-1] = phi
		prev, next = next, prev
	}
	return pacf
}

// z975 is the standard normal 0.975 quantile, ≈ 1.959964.
var z975 = distuv.UnitNormal.Quantile(0.975)

// ConfidenceBound returns the half-width z_{0.975}/√n ≈ 1.96/√n of the
// approximate 95 % band for sample autocorrelations and partial
// autocorrelations of white noise of length n, as drawn on ACF and PACF bar
// charts (R's plot.acf with ci = 0.95 uses the same quantile). For a series
// with missing days pass the number of present values; R passes the full
// length. n = 0 gives NaN; a negative n panics.
func ConfidenceBound(n int) float64 {
	if n < 0 {
		panic("diagnose: negative sample size")
	}
	if n == 0 {
		return math.NaN()
	}
	return z975 / math.Sqrt(float64(n))
}
