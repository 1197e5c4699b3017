package diagnose

import (
	"slices"
)

// QQ returns the points of a quantile-quantile plot of the present values of x
// against a distribution with the given quantile function: sample is the
// sorted data, theoretical[i] = quantile((i + 0.5)/n) for i = 0 … n−1, the
// Hazen plotting positions (i − 0.5)/n in 1-based terms (R's ppoints for
// n > 10). Both are empty if x has no present values. It panics if quantile
// is nil.
func QQ(x []float64, quantile func(float64) float64) (theoretical, sample []float64) {
	if quantile == nil {
		panic("diagnose: nil quantile function")
	}
	sample = present(x)
	slices.Sort(sample)
	n := float64(len(sample))
	theoretical = make([]float64, len(sample))
	for i := range theoretical {
		theoretical[i] = quantile((float64(i) + 0.5) / n)
	}
	return theoretical, sample
}

// QQPoints is QQ thinned to at most k evenly spaced points of the sorted
// sample, always its two ends, with the theoretical quantile computed for
// those points only (a quantile of a fitted t can cost microseconds, and a
// plot needs a few hundred of a record's tens of thousands of points).
func QQPoints(x []float64, quantile func(float64) float64, k int) (theoretical, sample []float64) {
	if quantile == nil {
		panic("diagnose: nil quantile function")
	}
	s := present(x)
	slices.Sort(s)
	n := len(s)
	if n <= k || k < 2 {
		return QQ(s, quantile)
	}
	for j := range k {
		i := j * (n - 1) / (k - 1)
		theoretical = append(theoretical, quantile((float64(i)+0.5)/float64(n)))
		sample = append(sample, s[i])
	}
	return theoretical, sample
}
