package evidence

import "math"

// SortedQuantile is stat.Quantile(p, stat.LinInterp, s, nil) for s sorted
// ascending and free of NaN, which the caller guarantees (not checked):
// gonum checks both and walks to the p-th value on every call, three passes
// over s, which for the tail tables of a million paths cost more than
// sorting them. The formula is gonum's, term for term, so the values are
// identical (TestSortedQuantileIsGonums): with f = p·n, the first index i
// with i + 1 ≥ f, and the value t·s[i−1] + (1 − t)·s[i], t = i + 1 − f
// (s[0] when i is 0). It panics if s is empty or p is outside [0, 1].
func SortedQuantile(p float64, s []float64) float64 {
	if !(p >= 0 && p <= 1) {
		panic("evidence: quantile probability outside [0, 1]")
	}
	if len(s) == 0 {
		panic("evidence: quantile of no values")
	}
	f := p * float64(len(s))
	i := max(int(math.Ceil(f))-1, 0)
	if i == 0 {
		return s[0]
	}
	t := float64(i+1) - f
	return t*s[i-1] + (1-t)*s[i]
}
