package evidence

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// BinomialTest returns the two-sided exact p-value of k successes in n trials
// of success probability p: the total probability of every count no more
// likely than k,
//
//	P = Σ { P(K = i) : P(K = i) ≤ P(K = k)·(1 + 10⁻⁷) },  K ~ Binomial(n, p),
//
// the "minimum-likelihood" convention of R's binom.test (R Core Team, R 4.2
// stats::binom.test, including its relative tolerance 10⁻⁷ for counts of
// equal probability). The p-value is 1 when k equals n·p. It panics unless
// 0 ≤ k ≤ n, n ≥ 1 and 0 < p < 1.
func BinomialTest(k, n int, p float64) float64 {
	if n < 1 || k < 0 || k > n || !(p > 0 && p < 1) {
		panic("evidence: binomial test needs 0 ≤ k ≤ n, n ≥ 1 and 0 < p < 1")
	}
	b := distuv.Binomial{N: float64(n), P: p}
	m := float64(n) * p
	kf := float64(k)
	if kf == m {
		return 1
	}
	limit := b.Prob(kf) * (1 + 1e-7)
	var pv float64
	if kf < m {
		// Count the counts on the far (upper) side no more likely than k;
		// they are the top y of them, since the pmf falls away from the mode.
		y := 0
		for i := int(math.Ceil(m)); i <= n; i++ {
			if b.Prob(float64(i)) <= limit {
				y++
			}
		}
		pv = b.CDF(kf) + upperTail(n, p, n-y+1)
	} else {
		y := 0
		for i := 0; i <= int(math.Floor(m)); i++ {
			if b.Prob(float64(i)) <= limit {
				y++
			}
		}
		pv = b.CDF(float64(y-1)) + upperTail(n, p, k)
	}
	return min(1, pv)
}

// upperTail returns P(K ≥ j) for K ~ Binomial(n, p), computed as the lower
// tail of n − K ~ Binomial(n, 1 − p) so that small tails keep their
// relative accuracy.
func upperTail(n int, p float64, j int) float64 {
	if j <= 0 {
		return 1
	}
	if j > n {
		return 0
	}
	return distuv.Binomial{N: float64(n), P: 1 - p}.CDF(float64(n - j))
}
