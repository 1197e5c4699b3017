package sim

import "math"

// TempIndices returns the temperature indices (HDD … ColdSpell, indexed by
// Index) of one run of daily means, with the simulator's definitions: degree
// days Σ max(Tb − T, 0) and Σ max(T − Tb, 0), the lowest and highest daily
// mean, the days below the cold threshold and the longest run of them. It is
// what the simulator accumulates per path, for observed seasons.
func TempIndices(days []float64, b Bases) []float64 {
	v := make([]float64, numTempIndices)
	v[Coldest], v[Hottest] = math.Inf(1), math.Inf(-1)
	run := 0
	for _, t := range days {
		v[HDD] += max(b.HDD-t, 0)
		v[CDD] += max(t-b.CDD, 0)
		v[Coldest], v[Hottest] = min(v[Coldest], t), max(v[Hottest], t)
		if t < b.ColdBelow {
			v[ColdDays]++
			run++
			v[ColdSpell] = max(v[ColdSpell], float64(run))
		} else {
			run = 0
		}
	}
	return v
}

// TempIndexList lists the temperature indices in output order.
func TempIndexList() []Index {
	out := make([]Index, 0, numTempIndices)
	for x := range numTempIndices {
		out = append(out, x)
	}
	return out
}
