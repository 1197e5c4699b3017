package diagnose

import (
	"math"
	"slices"

	"wxstress/model"
)

// KolmogorovSmirnov returns the one-sample Kolmogorov–Smirnov statistic
//
//	D = sup_x |F_n(x) − F(x)|
//
// of the present values of x against the continuous distribution function
// cdf, with DF set to n, the number of present values, and the two-sided
// asymptotic p-value P(K > √n·D) of the Kolmogorov distribution (no
// small-sample correction, as R's ks.test(x, F, exact = FALSE)). The p-value
// is summed to double precision, so it differs from R's, which truncates the
// series, by up to about 3e-5.
//
// Ties are allowed, but the p-value assumes a continuous distribution and is
// then only approximate. D is NaN for an empty series or if cdf
// returns NaN. It panics if cdf is nil.
func KolmogorovSmirnov(x []float64, cdf func(float64) float64) model.Test {
	if cdf == nil {
		panic("diagnose: nil distribution function")
	}
	values := present(x)
	n := len(values)
	if n == 0 {
		return nanTest(0)
	}
	slices.Sort(values)
	nf := float64(n)
	var d float64
	for i, v := range values {
		f := cdf(v)
		if math.IsNaN(f) {
			return nanTest(nf)
		}
		// The empirical CDF steps from i/n to (i+1)/n at v.
		d = max(d, f-float64(i)/nf, float64(i+1)/nf-f)
	}
	return model.Test{Stat: d, DF: nf, P: kolmogorovSurvival(math.Sqrt(nf) * d)}
}

// kolmogorovSurvival returns P(K > t) for the Kolmogorov distribution,
//
//	P(K > t) = 2 Σ_{k≥1} (−1)^{k−1} exp(−2k²t²)
//	P(K ≤ t) = (√(2π)/t) Σ_{k≥1} exp(−(2k−1)²π²/(8t²)),
//
// using the first (alternating) series for t ≥ 1 and the second, which
// converges fast for small t, below. Both are from Kolmogorov (1933); see also
// Marsaglia, Tsang and Wang (2003), J. Stat. Softw. 8(18).
func kolmogorovSurvival(t float64) float64 {
	switch {
	case math.IsNaN(t):
		return math.NaN()
	case t <= 0:
		return 1
	case t < 1:
		z := -math.Pi * math.Pi / (8 * t * t)
		logT := math.Log(t)
		var s float64
		for k := 1.0; ; k += 2 {
			term := math.Exp(k*k*z - logT)
			s += term
			if term <= 1e-17*s {
				break
			}
		}
		return max(0, 1-math.Sqrt(2*math.Pi)*s)
	default:
		z := -2 * t * t
		var s float64
		sign := 1.0
		for k := 1.0; ; k++ {
			term := math.Exp(z * k * k)
			s += sign * term
			if term <= 1e-17*s {
				break
			}
			sign = -sign
		}
		return min(1, 2*s)
	}
}
