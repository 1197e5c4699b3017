package diagnose

import (
	"math"

	"wxstress/model"

	"gonum.org/v1/gonum/stat/distuv"
)

// nanTest is the result for degenerate data.
func nanTest(df float64) model.Test { return model.Test{Stat: math.NaN(), DF: df, P: math.NaN()} }

// chiSquareTest completes a test whose statistic is referred to χ²(df).
func chiSquareTest(stat, df float64) model.Test {
	if math.IsNaN(stat) {
		return nanTest(df)
	}
	return model.Test{Stat: stat, DF: df, P: distuv.ChiSquared{K: df}.Survival(stat)}
}

// LjungBox returns the Ljung–Box portmanteau statistic
//
//	Q = n(n+2) Σ_{k=1..lags} r_k² / (n−k)
//
// with r_k from ACF (missing days handled as there) and n the number of
// present values, and its p-value against χ² with lags − fitdf degrees of
// freedom, as R's Box.test(x, lag = lags, type = "Ljung-Box", fitdf = fitdf).
// fitdf is the number of fitted ARMA coefficients when x holds a model's
// innovations (p for an AR(p) fit), 0 for raw data.
//
// Q is NaN when any r_k is (constant or empty series) or when lags ≥ n. It
// panics if lags < 1, fitdf < 0, or fitdf ≥ lags.
func LjungBox(x []float64, lags, fitdf int) model.Test {
	switch {
	case lags < 1:
		panic("diagnose: Ljung–Box needs at least one lag")
	case fitdf < 0:
		panic("diagnose: negative fitdf")
	case fitdf >= lags:
		panic("diagnose: fitdf leaves no degrees of freedom")
	}
	df := float64(lags - fitdf)
	n := countPresent(x)
	if lags >= n {
		return nanTest(df)
	}
	r := ACF(x, lags)
	var sum float64
	for k, rk := range r {
		sum += rk * rk / float64(n-k-1)
	}
	nf := float64(n)
	return chiSquareTest(nf*(nf+2)*sum, df)
}
