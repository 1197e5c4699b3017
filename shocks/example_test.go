package shocks_test

import (
	"fmt"
	"math"
	"math/rand/v2"

	"wxstress/shocks"
)

// Fit the families to standardized innovations, pick one by AIC and sample
// from it.
func Example() {
	// Stand-in innovations: draws from a left-skewed t.
	truth := shocks.NewTable(shocks.SkewT{Nu: 6, Xi: 0.8})
	src := rand.NewPCG(1, 2)
	z := make([]float64, 5000)
	for i := range z {
		z[i] = truth.Draw(src.Uint64())
	}

	best := shocks.FitNormal(z)
	for _, fit := range []func([]float64) (shocks.Fit, error){shocks.FitStudentT, shocks.FitSkewT} {
		f, err := fit(z)
		if err != nil {
			fmt.Println(err)
			return
		}
		if f.AIC() < best.AIC() {
			best = f
		}
	}
	d := best.Dist.(shocks.SkewT)
	fmt.Printf("skewed t: ν ≈ %.0f, ξ ≈ %.1f\n", d.Nu, d.Xi)

	table := shocks.NewTable(best.Dist)
	mean, variance := table.Moments()
	fmt.Printf("table mean within 1e-4 of 0: %v, variance %.4f\n", math.Abs(mean) < 1e-4, variance)
	fmt.Printf("1-in-100 cold shock %.2f\n", best.Dist.Quantile(0.01))
	// Output:
	// skewed t: ν ≈ 6, ξ ≈ 0.8
	// table mean within 1e-4 of 0: true, variance 1.0000
	// 1-in-100 cold shock -2.89
}
