package diagnose

import (
	"math"

	"gonum.org/v1/gonum/stat"
)

// present returns a new slice of the values of x that are not NaN, in order.
func present(x []float64) []float64 {
	v := make([]float64, 0, len(x))
	for _, xi := range x {
		if !math.IsNaN(xi) {
			v = append(v, xi)
		}
	}
	return v
}

// countPresent returns the number of values of x that are not NaN.
func countPresent(x []float64) int {
	n := 0
	for _, xi := range x {
		if !math.IsNaN(xi) {
			n++
		}
	}
	return n
}

// constant reports whether all values are equal. It is checked explicitly
// because a rounded mean leaves tiny nonzero deviations, whose ratios would be
// arbitrary finite numbers instead of NaN.
func constant(values []float64) bool {
	for _, v := range values[1:] {
		if v != values[0] {
			return false
		}
	}
	return true
}

func mean(values []float64) float64 { return stat.Mean(values, nil) }

func fill(x []float64, v float64) {
	for i := range x {
		x[i] = v
	}
}
