package diagnose_test

import (
	"fmt"
	"math"

	"wxstress/diagnose"
)

// Residual checks on a short anomaly series with one missing day. The printed
// values agree with R 4.2.2: acf(x, lag.max = 3, na.action = na.pass),
// pacf(x, lag.max = 3, na.action = na.pass), Box.test(x, lag = 3,
// type = "Ljung-Box") and qnorm(0.975)/sqrt(11).
func Example() {
	x := []float64{4.1, 5.3, 6.0, 4.8, math.NaN(), 3.2, 2.9, 4.4, 5.6, 6.1, 5.0, 3.8}

	acf := diagnose.ACF(x, 3)
	fmt.Printf("ACF  %.4f\n", acf)
	fmt.Printf("PACF %.4f\n", diagnose.PACF(acf))

	lb := diagnose.LjungBox(x, 3, 0)
	fmt.Printf("Ljung–Box Q = %.4f, df = %g, p = %.4f\n", lb.Stat, lb.DF, lb.P)
	fmt.Printf("95%% band ±%.4f\n", diagnose.ConfidenceBound(11))
	// Output:
	// ACF  [0.4755 -0.3238 -0.6706]
	// PACF [0.4755 -0.7106 -0.1807]
	// Ljung–Box Q = 12.9370, df = 3, p = 0.0048
	// 95% band ±0.5910
}
