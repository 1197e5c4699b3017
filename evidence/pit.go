package evidence

import "math"

// PIT returns the probability integral transform of the observation y in the
// forecast sample x with ties split at the mid-rank,
//
//	PIT = (#{xᵢ < y} + ½ #{xᵢ = y}) / n,
//
// a number in [0, 1]: 0 when y is below every sample value, 1 when above.
// Splitting ties deterministically (rather than drawing a uniform point
// within them, the randomised PIT) keeps results reproducible; with
// continuous simulated values ties are rare. x is not modified. A NaN y gives
// NaN; NaN values of x count as neither below nor equal. It panics if x is
// empty.
func PIT(x []float64, y float64) float64 {
	if len(x) == 0 {
		panic("evidence: PIT in an empty sample")
	}
	if math.IsNaN(y) {
		return math.NaN()
	}
	var below, equal int
	for _, v := range x {
		switch {
		case v < y:
			below++
		case v == y:
			equal++
		}
	}
	return (float64(below) + 0.5*float64(equal)) / float64(len(x))
}
