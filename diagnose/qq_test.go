package diagnose

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// TestQQPoints checks that the thinned plot is the full one (QQ) at the
// kept points: the first and last pairs and evenly spaced ones between,
// missing values left out.
func TestQQPoints(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	x := make([]float64, 5000)
	for i := range x {
		x[i] = rng.NormFloat64()
	}
	x[17] = math.NaN()
	q := distuv.UnitNormal.Quantile
	ft, fs := QQ(x, q)
	tt, ts := QQPoints(x, q, 200)
	if len(tt) != 200 || len(ts) != 200 {
		t.Fatalf("%d points, want 200", len(tt))
	}
	n := len(fs)
	for j := range tt {
		i := j * (n - 1) / 199
		if tt[j] != ft[i] || ts[j] != fs[i] {
			t.Fatalf("point %d: (%v, %v), full plot's point %d is (%v, %v)", j, tt[j], ts[j], i, ft[i], fs[i])
		}
	}
	if ts[0] != fs[0] || ts[199] != fs[n-1] {
		t.Error("the ends are not kept")
	}
	if a, b := QQPoints(x[:150], q, 200); len(a) != 149 || len(b) != 149 { // x[17] is missing
		t.Errorf("a short sample gives %d points, want all 149", len(a))
	}
}
