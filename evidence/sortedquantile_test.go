package evidence

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat"
)

// TestSortedQuantileIsGonums checks SortedQuantile against gonum's
// stat.Quantile with LinInterp, bit for bit, on sorted samples of many
// sizes (ties included) at probabilities on and between the grid points.
func TestSortedQuantileIsGonums(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for _, n := range []int{1, 2, 3, 7, 20, 99, 100, 1000, 12345} {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Round(rng.NormFloat64()*40) / 8 // ties
		}
		slices.Sort(x)
		ps := []float64{0, 1, 0.5, 0.05, 0.95, 0.99, 0.01, 1.0 / 3, 0.98, 0.995}
		for k := 0; k <= n; k++ {
			ps = append(ps, float64(k)/float64(n))
		}
		for range 200 {
			ps = append(ps, rng.Float64())
		}
		for _, p := range ps {
			if got, want := SortedQuantile(p, x), stat.Quantile(p, stat.LinInterp, x, nil); got != want {
				t.Fatalf("n %d, p %v: SortedQuantile %v, stat.Quantile %v", n, p, got, want)
			}
		}
	}
}
