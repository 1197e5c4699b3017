package diagnose

import (
	"math"

	"wxstress/model"

	"gonum.org/v1/gonum/stat"
)

// moments returns the count and the population (divisor n) central moments
// m2, m3, m4 of the present values of x, or NaN moments if there are none or
// all are equal.
func moments(x []float64) (n int, m2, m3, m4 float64) {
	values := present(x)
	if len(values) == 0 || constant(values) {
		return len(values), math.NaN(), math.NaN(), math.NaN()
	}
	mu := mean(values)
	return len(values),
		stat.MomentAbout(2, values, mu, nil),
		stat.MomentAbout(3, values, mu, nil),
		stat.MomentAbout(4, values, mu, nil)
}

// Skewness returns the moment coefficient of skewness g1 = m3 / m2^{3/2} of the
// present values of x, with population central moments m_k = Σ (x−x̄)^k / n
// (no small-sample correction). It is NaN for a constant or empty series.
func Skewness(x []float64) float64 {
	_, m2, m3, _ := moments(x)
	return m3 / math.Pow(m2, 1.5)
}

// ExcessKurtosis returns g2 = m4 / m2² − 3 of the present values of x, with
// population central moments as in Skewness; 0 for normal data. It is NaN for
// a constant or empty series.
func ExcessKurtosis(x []float64) float64 {
	_, m2, _, m4 := moments(x)
	return m4/(m2*m2) - 3
}

// JarqueBera returns the Jarque–Bera normality statistic
//
//	JB = n/6 · (g1² + g2²/4)
//
// with g1 = Skewness(x), g2 = ExcessKurtosis(x) and n the number of present
// values, and its asymptotic p-value against χ²(2). It is NaN for a constant
// or empty series.
func JarqueBera(x []float64) model.Test {
	n, m2, m3, m4 := moments(x)
	g1 := m3 / math.Pow(m2, 1.5)
	g2 := m4/(m2*m2) - 3
	return chiSquareTest(float64(n)/6*(g1*g1+g2*g2/4), 2)
}
