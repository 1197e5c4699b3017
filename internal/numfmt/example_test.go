package numfmt_test

import (
	"fmt"

	"wxstress/internal/numfmt"
)

func Example() {
	fmt.Println(numfmt.ValueSE(2450.37, 6.3))
	fmt.Println(numfmt.ValueSE(2450.37, 0.63))
	fmt.Println(numfmt.ValueSE(-0.0, 1.6e-5))
	fmt.Println(numfmt.ValueSE(2450.37, 0))
	fmt.Println(numfmt.Number(20844556.1), numfmt.Number(7e6))
	fmt.Println(numfmt.Prob(0.00001), numfmt.Percent(0.0523))
	// Output:
	// 2,450 ± 6.3
	// 2,450.4 ± 0.63
	// 0 ± 0.000016
	// 2,450 (exact)
	// 20,844,556 7,000,000
	// 0.00001 5.2%
}
