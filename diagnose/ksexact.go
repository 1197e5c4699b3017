package diagnose

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"

	"wxstress/model"
)

// ExactBelow is the sample size under which KolmogorovSmirnovExact uses the
// exact distribution of D (R's ks.test does the same by default).
const ExactBelow = 100

// KolmogorovSmirnovExact is KolmogorovSmirnov with the exact two-sided
// p-value P(D_n ≥ d) for fewer than ExactBelow values without ties, where
// the asymptotic one is too high (at n = 10 it gives 0.944 for 0.903);
// with more values or ties it is KolmogorovSmirnov. For the few seasons a
// backtest has.
func KolmogorovSmirnovExact(x []float64, cdf func(float64) float64) model.Test {
	t := KolmogorovSmirnov(x, cdf)
	n := int(t.DF)
	if n == 0 || n >= ExactBelow || math.IsNaN(t.Stat) {
		return t
	}
	v := present(x)
	slices.Sort(v)
	for i := 1; i < len(v); i++ {
		if v[i] == v[i-1] {
			return t // ties: the exact law assumes a continuous sample
		}
	}
	t.P = kolmogorovExactSF(n, t.Stat)
	return t
}

// kolmogorovExactSF returns P(D_n ≥ d). Below 1e-7 the complement
// 1 − P(D_n < d) loses its digits to cancellation, and the upper tail is
// 2·P(D⁺_n ≥ d) instead: exact for d ≥ ½ (the two one-sided events cannot
// both happen) and within a factor 1 + O(p) below.
func kolmogorovExactSF(n int, d float64) float64 {
	p := 1 - kolmogorovExactCDF(n, d)
	if p < 1e-7 {
		p = 2 * smirnovSF(n, d)
	}
	return min(max(p, 0), 1)
}

// smirnovSF returns the one-sided P(D⁺_n ≥ d) by the Birnbaum–Tingey
// (1951) sum, d·Σ_{j ≤ n(1−d)} C(n, j)·(1 − d − j/n)^(n−j)·(d + j/n)^(j−1)
// (from memory; checked with the two-sided law against SciPy in
// TestKolmogorovExact), its terms summed in logarithms: all are positive,
// so nothing cancels however small the tail.
func smirnovSF(n int, d float64) float64 {
	if d <= 0 {
		return 1
	}
	if d >= 1 {
		return 0
	}
	nf := float64(n)
	lgN, _ := math.Lgamma(nf + 1)
	s := 0.0
	for j := 0; float64(j) <= nf*(1-d); j++ {
		jf := float64(j)
		a := 1 - d - jf/nf
		if a <= 0 {
			continue
		}
		lgJ, _ := math.Lgamma(jf + 1)
		lgR, _ := math.Lgamma(nf - jf + 1)
		s += math.Exp(lgN - lgJ - lgR + (nf-jf)*math.Log(a) + (jf-1)*math.Log(d+jf/nf))
	}
	return d * s
}

// kolmogorovExactCDF returns P(D_n < d) for the two-sided one-sample
// statistic, by the matrix method of Marsaglia, Tsang and Wang (2003),
// "Evaluating Kolmogorov's distribution", J. Stat. Softw. 8(18) (from
// memory; checked against SciPy's kstwo in TestKolmogorovExact): with
// k = ⌊nd⌋ + 1, m = 2k − 1 and h = k − nd, P(D_n < d) = n!/nⁿ·(Hⁿ)_kk for the
// m×m matrix H below. The power is taken by squaring with the scale kept
// apart (powers of 2), so nothing overflows for n below ExactBelow.
func kolmogorovExactCDF(n int, d float64) float64 {
	nd := float64(n) * d
	switch {
	case d <= 0:
		return 0
	case nd <= 0.5:
		// D_n ≥ 1/(2n) always: P(D_n < d) = 0 below it.
		return 0
	case d >= 1:
		return 1
	}
	k := int(nd) + 1
	m := 2*k - 1
	h := float64(k) - nd
	H := mat.NewDense(m, m, nil)
	for i := range m {
		for j := range m {
			if i-j+1 >= 0 {
				H.Set(i, j, 1)
			}
		}
	}
	for i := range m {
		H.Set(i, 0, H.At(i, 0)-math.Pow(h, float64(i+1)))
		H.Set(m-1, i, H.At(m-1, i)-math.Pow(h, float64(m-i)))
	}
	if 2*h-1 > 0 {
		H.Set(m-1, 0, H.At(m-1, 0)+math.Pow(2*h-1, float64(m)))
	}
	for i := range m {
		for j := range m {
			if i-j+1 > 0 {
				f := 1.0
				for g := 2; g <= i-j+1; g++ {
					f *= float64(g)
				}
				H.Set(i, j, H.At(i, j)/f)
			}
		}
	}
	q, e := matPower(H, n, k-1)
	// n!/nⁿ·q, the factors taken one at a time to stay in range.
	s := q
	for i := 1; i <= n; i++ {
		s *= float64(i) / float64(n)
	}
	return math.Ldexp(s, e)
}

// matPower returns Hⁿ's element (c, c) as a mantissa and a power of 2,
// rescaling the partial products whenever that element grows large.
func matPower(h *mat.Dense, n, c int) (float64, int) {
	m, _ := h.Dims()
	result := mat.NewDense(m, m, nil)
	for i := range m {
		result.Set(i, i, 1)
	}
	exp := 0
	base := mat.DenseCopyOf(h)
	baseExp := 0
	var tmp mat.Dense
	for p := n; p > 0; p >>= 1 {
		if p&1 == 1 {
			tmp.Mul(result, base)
			result.Copy(&tmp)
			exp += baseExp
			exp += rescale(result, c)
		}
		if p > 1 {
			tmp.Mul(base, base)
			base.Copy(&tmp)
			baseExp *= 2
			baseExp += rescale(base, c)
		}
	}
	return result.At(c, c), exp
}

// rescale divides a by a power of 2 when its element (c, c) is large, and
// returns that power.
func rescale(a *mat.Dense, c int) int {
	_, e := math.Frexp(a.At(c, c))
	if e < 400 {
		return 0
	}
	a.Scale(math.Ldexp(1, -e), a)
	return e
}
