package evidence_test

import (
	"math/rand/v2"
	"testing"

	"wxstress/evidence"
	"wxstress/sim"
)

func TestConventionsMatchSim(t *testing.T) {
	t.Parallel()
	// Value and ES must be the numbers sim.Summarize puts in the tail table.
	rng := rand.New(rand.NewPCG(13, 14))
	x := make([]float64, 1001)
	for i := range x {
		x[i] = 3000 + 400*rng.NormFloat64()
	}
	for _, high := range []bool{true, false} {
		tail := sim.Summarize(x, high, nil)
		p95, p99 := 0.95, 0.99
		if !high {
			p95, p99 = 0.05, 0.01
		}
		if q := evidence.Quantile(x, p95); q.Value != tail.VaR95 {
			t.Errorf("high=%v: quantile %v, sim VaR95 %v", high, q.Value, tail.VaR95)
		}
		if q := evidence.Quantile(x, p99); q.Value != tail.VaR99 {
			t.Errorf("high=%v: quantile %v, sim VaR99 %v", high, q.Value, tail.VaR99)
		}
		if e := evidence.Shortfall(x, 0.05, high); e.Value != tail.ES95 || e.K != 51 {
			t.Errorf("high=%v: shortfall %v of %d paths, sim ES95 %v", high, e.Value, e.K, tail.ES95)
		}
		if e := evidence.Shortfall(x, 0.01, high); e.Value != tail.ES99 || e.K != 11 {
			t.Errorf("high=%v: shortfall %v of %d paths, sim ES99 %v", high, e.Value, e.K, tail.ES99)
		}
		// The tail table carries the same Monte Carlo errors.
		if q := evidence.Quantile(x, p99); q.SE != tail.VaR99SE {
			t.Errorf("high=%v: quantile s.e. %v, sim VaR99 s.e. %v", high, q.SE, tail.VaR99SE)
		}
		if e := evidence.Shortfall(x, 0.05, high); e.SE != tail.ES95SE {
			t.Errorf("high=%v: shortfall s.e. %v, sim ES95 s.e. %v", high, e.SE, tail.ES95SE)
		}
	}
}
