package evidence

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestSelectRanks checks SelectRanks against a full sort (the standard
// library's slices.Sort) on samples with and without ties, sorted, reversed,
// constant and two-valued ones included, that every selected rank splits
// the sample, and that SortedQuantile then reads the sorted sample's
// quantiles.
func TestSelectRanks(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	gen := map[string]func(i int) float64{
		"normal":   func(int) float64 { return rng.NormFloat64() },
		"ties":     func(int) float64 { return math.Round(rng.NormFloat64() * 3) },
		"constant": func(int) float64 { return 4 },
		"two":      func(int) float64 { return float64(rng.IntN(2)) },
		"sorted":   func(i int) float64 { return float64(i) },
		"reversed": func(i int) float64 { return -float64(i) },
	}
	probs := []float64{0.05, 0.25, 0.5, 0.75, 0.95, 0.001, 0.999}
	for name, f := range gen {
		for _, n := range []int{1, 2, 5, 17, 100, 1001, 20000} {
			x := make([]float64, n)
			for i := range x {
				x[i] = f(i)
			}
			want := slices.Sorted(slices.Values(x))
			var ranks []int
			for _, p := range probs {
				ranks = append(ranks, QuantileRanks(p, n)...)
			}
			ranks = append(ranks, rng.IntN(n), n-1, 0)
			SelectRanks(x, ranks)
			for _, r := range ranks {
				if x[r] != want[r] {
					t.Fatalf("%s, n %d: rank %d holds %v, sorted %v", name, n, r, x[r], want[r])
				}
				// The set of the worst values (expected shortfall) reads
				// whole sides: nothing larger before a rank, nothing
				// smaller after it.
				if slices.Max(x[:r+1]) > x[r] || slices.Min(x[r:]) < x[r] {
					t.Fatalf("%s, n %d: values on the wrong side of rank %d", name, n, r)
				}
			}
			for _, p := range probs {
				if got, w := SortedQuantile(p, x), SortedQuantile(p, want); got != w {
					t.Errorf("%s, n %d, p %v: quantile after selection %v, after sorting %v", name, n, p, got, w)
				}
			}
			if !slices.Equal(slices.Sorted(slices.Values(x)), want) {
				t.Fatalf("%s, n %d: selection changed the values", name, n)
			}
		}
	}
}
