package evidence

import (
	"math"
	"slices"
)

// QuantileRanks returns the 0-based ranks of the order statistics that
// SortedQuantile(p, s) reads for len(s) = n: one or two.
func QuantileRanks(p float64, n int) []int {
	i := max(int(math.Ceil(p*float64(n)))-1, 0)
	if i == 0 {
		return []int{0}
	}
	return []int{i - 1, i}
}

// SelectRanks reorders x so that x[r] is its r-th smallest value (0-based)
// for every r in ranks, as a full sort would leave it, in expected time
// O(n log k) for k ranks: quickselect (Hoare's FIND) with median-of-three
// pivots, each partition passing on only the ranks that fall on each side.
// Then SortedQuantile(p, x) equals its value on the sorted x when ranks
// include QuantileRanks(p, len(x)). x must be free of NaN; ranks must lie
// in [0, len(x)).
func SelectRanks(x []float64, ranks []int) {
	rs := slices.Clone(ranks)
	slices.Sort(rs)
	selectRanks(x, 0, len(x), slices.Compact(rs))
}

// selectRanks places the order statistics ranks (sorted, inside [lo, hi))
// of x[lo:hi], with smaller or equal values before each and larger or equal
// after, within [lo, hi).
func selectRanks(x []float64, lo, hi int, ranks []int) {
	for len(ranks) > 0 {
		if hi-lo <= 16 {
			slices.Sort(x[lo:hi])
			return
		}
		// Median of three as the pivot, then Hoare's partition.
		mid := lo + (hi-lo)/2
		a, b, c := x[lo], x[mid], x[hi-1]
		pivot := max(min(a, b), min(max(a, b), c))
		i, j := lo, hi-1
		for i <= j {
			for x[i] < pivot {
				i++
			}
			for x[j] > pivot {
				j--
			}
			if i <= j {
				x[i], x[j] = x[j], x[i]
				i++
				j--
			}
		}
		// Now x[lo:j+1] ≤ pivot ≤ x[i:hi], and x[j+1:i] equals the pivot:
		// ranks in between are in place.
		left := ranks[:sortSearch(ranks, j+1)]
		right := ranks[sortSearch(ranks, i):]
		if len(left) < len(right) { // recurse into the smaller side, loop on the other
			selectRanks(x, lo, j+1, left)
			lo, ranks = i, right
		} else {
			selectRanks(x, i, hi, right)
			hi, ranks = j+1, left
		}
	}
}

// sortSearch returns the number of ranks below v.
func sortSearch(ranks []int, v int) int {
	k, _ := slices.BinarySearch(ranks, v)
	return k
}
