package hedge_test

import (
	"fmt"

	"wxstress/hedge"
)

func Example() {
	src := `
[[contract]]
name = "HDD call"
index = "hdd"
period = "heating"
kind = "call"
strike = 2450
tick = 4000
limit = 600000
premium = 100000
`
	f, err := hedge.Parse([]byte(src), "book.toml")
	if err != nil {
		fmt.Println(err)
		return
	}
	// Five simulated heating seasons' HDD (°C·day), as the simulator would give.
	hdd := []float64{2300, 2400, 2500, 2600, 2700}
	r, err := hedge.Evaluate(f, map[hedge.Key][]float64{f.Needs()[0]: hdd}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	c := r.Contracts[0]
	// By hand: payouts 4000·max(HDD − 2450, 0) capped at 600000; mean 280000;
	// s² = (2·280000² + 80000² + 2·320000²)/4, 0.2·s = 60663.
	fmt.Println("payouts:", c.Payoffs)
	fmt.Printf("expected payout %.0f, P(payout) %.1f, loaded price %.0f\n", c.Mean, c.ProbPayout, c.LoadedPrice)
	// Output:
	// payouts: [0 0 200000 600000 600000]
	// expected payout 280000, P(payout) 0.6, loaded price 340663
}
