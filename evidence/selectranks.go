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
//
// The partition is Lomuto's without branches (partitionBelow): which side
// a value falls on is a coin toss that a branch predictor loses half the
// time, so every element is swapped and the boundary moves by the
// comparison's 0 or 1; twice as fast as Hoare's branching scheme on a
// million values. The pivot ends at its final place, and when more than a
// sixteenth of the range equals it (counts, dates: indices with many ties)
// the equal run is split off too, so that ties cannot stall the search.
func selectRanks(x []float64, lo, hi int, ranks []int) {
	for len(ranks) > 0 {
		if hi-lo <= 32 {
			slices.Sort(x[lo:hi])
			return
		}
		// The median of the first, middle and last values as the pivot,
		// moved to the end.
		mid := lo + (hi-lo)/2
		a, b, c := x[lo], x[mid], x[hi-1]
		switch {
		case (a <= b) == (b <= c):
			x[mid], x[hi-1] = x[hi-1], x[mid]
		case (b <= a) == (a <= c):
			x[lo], x[hi-1] = x[hi-1], x[lo]
		}
		v := x[hi-1]
		below, equal := partitionBelow(x[lo:hi-1], v)
		j := lo + below
		x[j], x[hi-1] = x[hi-1], x[j]
		// Now x[lo:j] < v = x[j] ≤ x[j+1:hi]; with many ties, also
		// x[j+1:k] = v < x[k:hi]. Ranks in [j, k) are in place.
		k := j + 1
		if equal*16 > hi-lo {
			k += partitionAtMost(x[j+1:hi], v)
		}
		left := ranks[:sortSearch(ranks, j)]
		right := ranks[sortSearch(ranks, k):]
		if len(left) < len(right) { // recurse into the smaller side, loop on the other
			selectRanks(x, lo, j, left)
			lo, ranks = k, right
		} else {
			selectRanks(x, k, hi, right)
			hi, ranks = j, left
		}
	}
}

// partitionBelow moves the values of a below v to its front, without
// branches, and returns their number and the number equal to v.
func partitionBelow(a []float64, v float64) (below, equal int) {
	for i, x := range a {
		a[i] = a[below]
		a[below] = x
		lt, eq := 0, 0 // set from the comparisons, not branched on
		if x < v {
			lt = 1
		}
		if x == v {
			eq = 1
		}
		below += lt
		equal += eq
	}
	return below, equal
}

// partitionAtMost moves the values of a at most v to its front, without
// branches, and returns their number.
func partitionAtMost(a []float64, v float64) int {
	n := 0
	for i, x := range a {
		a[i] = a[n]
		a[n] = x
		le := 0
		if x <= v {
			le = 1
		}
		n += le
	}
	return n
}

// sortSearch returns the number of ranks below v.
func sortSearch(ranks []int, v int) int {
	k, _ := slices.BinarySearch(ranks, v)
	return k
}
