package evidence

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/stat/distuv"
)

// CRPS returns the fair continuous ranked probability score of the forecast
// sample x for the observation y,
//
//	CRPS = (1/n) Σᵢ |xᵢ − y| − 1/(2n(n−1)) Σᵢ Σⱼ |xᵢ − xⱼ|,
//
// the unbiased estimate of E|X − y| − ½E|X − X′| (Gneiting and Raftery 2007,
// JASA 102, eq. 21) for the distribution the sample was drawn from; the
// n(n−1) divisor makes it "fair" (Ferro 2014, Q. J. R. Meteorol. Soc. 140,
// from memory). The double sum is computed in O(n log n) from the sorted
// sample as 2 Σᵢ (2i − n − 1) x₍ᵢ₎. The score is in the units of x and y and is
// never negative.
//
// x is not modified. A NaN in x or y gives NaN. It panics if x has fewer than
// two values.
func CRPS(x []float64, y float64) float64 {
	if len(x) < 2 {
		panic("evidence: CRPS of fewer than two sample values")
	}
	return crpsSorted(sortedCopy(x), y, true)
}

// CRPSEmpirical returns the CRPS of the empirical distribution of x (the
// plug-in or "V-statistic" form, divisor n² in place of n(n−1)), the exact
// score of a forecast that puts mass 1/n on each sample value. It exceeds the
// fair score of CRPS by ½E|X − X′|/n on average. It panics if x is empty.
func CRPSEmpirical(x []float64, y float64) float64 {
	if len(x) == 0 {
		panic("evidence: CRPS of an empty sample")
	}
	return crpsSorted(sortedCopy(x), y, false)
}

// CRPSNormal returns the CRPS of the normal forecast N(μ, σ²) for the
// observation y in closed form (Gneiting, Raftery, Westveld and Goldman
// 2005, Mon. Wea. Rev. 133, eq. 5):
//
//	CRPS = σ [z (2Φ(z) − 1) + 2φ(z) − 1/√π],  z = (y − μ)/σ.
//
// σ = 0 gives |y − μ|, the limit of a point forecast. It panics if σ < 0.
func CRPSNormal(mu, sigma, y float64) float64 {
	switch {
	case sigma < 0:
		panic("evidence: negative σ")
	case sigma == 0:
		return math.Abs(y - mu)
	}
	z := (y - mu) / sigma
	std := distuv.UnitNormal
	return sigma * (z*(2*std.CDF(z)-1) + 2*std.Prob(z) - 1/math.Sqrt(math.Pi))
}

// crpsSorted is the sample CRPS of sorted x; fair selects the n(n−1)
// divisor over n².
func crpsSorted(x []float64, y float64, fair bool) float64 {
	n := len(x)
	// Both sums are invariant to a shift of x and y; centring on the median
	// keeps the rounding error relative to the spread, not to the level.
	c := x[n/2]
	yc := y - c
	var abs, spread float64
	for i, v := range x {
		v -= c
		abs += math.Abs(v - yc)
		spread += float64(2*i+1-n) * v // (2i − n − 1) with i counted from 1
	}
	nf := float64(n)
	// Σᵢ Σⱼ |xᵢ − xⱼ| = 2·spread; halved by the ½ in front of E|X − X′|.
	pairs := nf * nf
	if fair {
		pairs = nf * (nf - 1)
	}
	return abs/nf - spread/pairs
}

// sortedCopy returns x itself if it is already in increasing order (it is then
// only read), otherwise a sorted copy.
func sortedCopy(x []float64) []float64 {
	if slices.IsSorted(x) {
		return x
	}
	s := slices.Clone(x)
	slices.Sort(s)
	return s
}
