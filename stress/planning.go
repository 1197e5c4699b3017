package stress

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/stat"

	"wxstress/evidence"
	"wxstress/sim"
)

// DefaultSnapDays is the length of the design cold snap.
const DefaultSnapDays = 3

// topDays is how many of each path's highest daily demands a capacity solve
// keeps: "days over capacity" targets count exactly while no path has more
// days over the capacity than this.
const topDays = 40

// maxDaysTarget is the largest days:x capacity target: a quarter of the
// days a solve keeps, so that paths with more days over the capacity than
// it counts stay rare (days:400 "achieved" 40, the count's ceiling).
const maxDaysTarget = topDays / 4

// capacityBatches split the paths to measure a solved capacity's Monte
// Carlo error (the spread of the batches' solutions).
const capacityBatches = 10

// DesignRow is a planning standard's design figures for one period: the
// 1-in-T coldest daily mean, coldest k-day mean, peak-day demand and k-day
// demand energy, each with its Monte Carlo standard error (NaN when the run
// has no such index).
type DesignRow struct {
	Period                 string
	T                      float64
	Coldest, ColdestSE     float64
	Snap, SnapSE           float64
	Peak, PeakSE           float64
	SnapEnergy, SnapEnerSE float64
	// With parameter uncertainty (band mode), the 90 % bands of the design
	// day and the design-day demand (NaN without).
	ColdestBand, PeakBand Band
}

// ParseStandard reads a planning standard: "1-in-20" or "20" (years, > 1).
func ParseStandard(s string) (float64, error) {
	t := strings.TrimPrefix(strings.TrimSpace(s), "1-in-")
	T, err := strconv.ParseFloat(t, 64)
	if err != nil || !(T > 1) || T > sim.MaxReturnPeriod {
		return 0, fmt.Errorf("stress: standard %q: want 1-in-T with T a number of years above 1 and at most 1,000,000, e.g. 1-in-20", s)
	}
	return T, nil
}

// withDesignBands adds the parameter bands of the design day and the
// design-day demand to the design rows.
func withDesignBands(design []DesignRow, rows []sim.Row, bands []RowBands, standards []float64) {
	for i := range design {
		d := &design[i]
		nan := Band{math.NaN(), math.NaN()}
		d.ColdestBand, d.PeakBand = nan, nan
		j := slices.Index(standards, d.T)
		for k, r := range rows {
			if r.Period != d.Period || k >= len(bands) || j < 0 || j >= len(bands[k].Design) {
				continue
			}
			switch r.Index {
			case sim.Coldest:
				d.ColdestBand = bands[k].Design[j]
			case sim.PeakDemand:
				d.PeakBand = bands[k].Design[j]
			}
		}
	}
}

// designRows lays out the design figures of every period at each standard.
func designRows(rows []sim.Row, standards []float64) []DesignRow {
	find := func(x sim.Index, period string) *sim.Tail {
		for i := range rows {
			if rows[i].Index == x && rows[i].Period == period {
				return &rows[i].Tail
			}
		}
		return nil
	}
	level := func(t *sim.Tail, T float64) (float64, float64) {
		if t == nil {
			return math.NaN(), math.NaN()
		}
		return t.ReturnLevel(T), t.ReturnLevelError(T)
	}
	var periods []string
	for _, r := range rows {
		if !slices.Contains(periods, r.Period) {
			periods = append(periods, r.Period)
		}
	}
	var out []DesignRow
	for _, p := range periods {
		// The coldest day of a summer is no design day: a warm period keeps
		// its demand figures (a summer-peaking load's design day) and
		// leaves its temperatures out, or leaves the table without demand.
		_, warm := sim.Season(rows, p)
		if warm && find(sim.PeakDemand, p) == nil {
			continue
		}
		for _, T := range standards {
			d := DesignRow{Period: p, T: T, ColdestBand: Band{math.NaN(), math.NaN()}, PeakBand: Band{math.NaN(), math.NaN()}}
			if !warm {
				d.Coldest, d.ColdestSE = level(find(sim.Coldest, p), T)
				d.Snap, d.SnapSE = level(find(sim.ColdSnap, p), T)
			} else {
				d.Coldest, d.ColdestSE, d.Snap, d.SnapSE = math.NaN(), math.NaN(), math.NaN(), math.NaN()
			}
			d.Peak, d.PeakSE = level(find(sim.PeakDemand, p), T)
			d.SnapEnergy, d.SnapEnerSE = level(find(sim.SnapEnergy, p), T)
			out = append(out, d)
		}
	}
	return out
}

// CapacityTarget is a reliability target a capacity is solved for:
//
//	peak:1-in-T  the peak-day demand exceeded once in T years
//	days:x       at most x days over capacity a year, on average
//	any:p        at most probability p of at least one day over capacity
type CapacityTarget struct {
	Kind  string // "peak", "days" or "any"
	Value float64
	Text  string // as given
}

// ParseCapacityTarget reads a capacity target.
func ParseCapacityTarget(s string) (CapacityTarget, error) {
	kind, v, ok := strings.Cut(strings.TrimSpace(s), ":")
	bad := fmt.Errorf("stress: capacity target %q: want peak:1-in-T (T > 1), days:x (0 ≤ x ≤ %d days a year) or any:p (0 < p < 1)",
		s, maxDaysTarget)
	if !ok {
		return CapacityTarget{}, bad
	}
	t := CapacityTarget{Kind: kind, Text: s}
	var err error
	switch kind {
	case "peak":
		t.Value, err = ParseStandard(v)
	case "days", "any":
		t.Value, err = strconv.ParseFloat(v, 64)
		if err == nil && (math.IsNaN(t.Value) || t.Value < 0 || kind == "any" && !(t.Value > 0 && t.Value < 1) ||
			kind == "days" && t.Value > maxDaysTarget || math.IsInf(t.Value, 0)) {
			err = bad
		}
	default:
		err = bad
	}
	if err != nil {
		return CapacityTarget{}, bad
	}
	return t, nil
}

// CapacityRow is a solved capacity: the least capacity that meets the
// target over the simulated years, the target's value achieved at it, and
// the capacity's Monte Carlo standard error. A peak or any target's
// capacity is a quantile of the paths' peak days, and its error is the
// tail tables' order-statistic one (so a peak:1-in-T capacity has the
// design-day demand's error as well as its value); a days target's is the
// spread of the solutions of capacityBatches batches of paths, over
// √batches.
type CapacityRow struct {
	Target   string
	Period   string
	Capacity float64
	Achieved float64 // years with a peak above (peak), mean days over (days), P(any day over) (any)
	SE       float64
	// Saturated is the share of paths with more than the days kept over
	// the capacity (days targets): above 0 the achieved count is a lower
	// bound.
	Saturated float64
}

// solveCapacities solves every target for every period from the paths'
// highest daily demands.
func solveCapacities(res *sim.Result, targets []CapacityTarget) []CapacityRow {
	if res.Top == nil {
		return nil
	}
	k := res.Config.TopDays
	n := res.Config.Paths
	var out []CapacityRow
	for p, period := range res.Periods {
		top := res.Top[p]
		// The peak days in full precision (the kept days are float32):
		// a peak or any capacity is then the tail table's quantile itself.
		var peaks []float64
		for _, a := range res.Aggregates {
			if a.Index == sim.PeakDemand && a.Period.Name == period.Name {
				peaks = slices.Sorted(slices.Values(a.Values))
			}
		}
		for _, t := range targets {
			if q, ok := t.peakQuantile(); ok && peaks != nil {
				est := evidence.QuantileSorted(peaks, q)
				above := len(peaks) - sort.SearchFloat64s(peaks, math.Nextafter(est.Value, math.Inf(1)))
				se := est.SE
				if math.IsInf(se, 0) {
					se = math.NaN() // too few paths beyond it to bound the error (the table says so)
				}
				out = append(out, CapacityRow{Target: t.Text, Period: period.Name, Capacity: est.Value,
					Achieved: float64(above) / float64(len(peaks)), SE: se})
				continue
			}
			c := solveOne(top, k, 0, n, t)
			row := CapacityRow{Target: t.Text, Period: period.Name, Capacity: c}
			row.Achieved, row.Saturated = achieved(top, k, 0, n, t, c)
			if q, ok := t.peakQuantile(); ok {
				row.SE = evidence.QuantileSorted(sortedPeaks(top, k, 0, n), q).SE
			} else if n >= 10*capacityBatches {
				var sols []float64
				for b := range capacityBatches {
					lo, hi := b*n/capacityBatches, (b+1)*n/capacityBatches
					sols = append(sols, solveOne(top, k, lo, hi, t))
				}
				row.SE = stat.StdDev(sols, nil) / math.Sqrt(capacityBatches)
			} else {
				row.SE = math.NaN()
			}
			out = append(out, row)
		}
	}
	return out
}

// peakQuantile returns the quantile of the paths' peak days that solves a
// peak or any target, and false for a days target.
func (t CapacityTarget) peakQuantile() (float64, bool) {
	switch t.Kind {
	case "peak":
		return 1 - 1/t.Value, true
	case "any":
		return 1 - t.Value, true
	}
	return 0, false
}

// sortedPeaks returns the peak days of paths lo..hi, ascending.
func sortedPeaks(top []float32, k, lo, hi int) []float64 {
	peaks := make([]float64, hi-lo)
	for i := range peaks {
		peaks[i] = float64(top[(lo+i)*k])
	}
	slices.Sort(peaks)
	return peaks
}

// solveOne solves target t on paths lo..hi.
func solveOne(top []float32, k, lo, hi int, t CapacityTarget) float64 {
	n := hi - lo
	peaks := sortedPeaks(top, k, lo, hi)
	if p, ok := t.peakQuantile(); ok {
		return stat.Quantile(p, stat.LinInterp, peaks, nil)
	}
	// days: the mean count over C falls as C rises; bisect for the least C
	// with a mean of at most x, from below the lowest kept day (a period
	// shorter than k days leaves −∞ in the last places) to the highest.
	a, b := peaks[0], peaks[n-1]
	for i := lo; i < hi; i++ {
		for _, v := range slices.Backward(top[i*k : (i+1)*k]) {
			if !math.IsInf(float64(v), -1) {
				a = min(a, float64(v))
				break
			}
		}
	}
	a--
	if mean, _ := achieved(top, k, lo, hi, t, a); mean <= t.Value {
		return a
	}
	for range 80 {
		m := (a + b) / 2
		if mean, _ := achieved(top, k, lo, hi, t, m); mean <= t.Value {
			b = m
		} else {
			a = m
		}
	}
	return b
}

// achieved is the target's measure at capacity c on paths lo..hi, and the
// share of paths whose kept days all lie above c.
func achieved(top []float32, k, lo, hi int, t CapacityTarget, c float64) (float64, float64) {
	over, any, saturated := 0, 0, 0
	for i := lo; i < hi; i++ {
		days := top[i*k : (i+1)*k]
		if float64(days[0]) > c {
			any++
		}
		j := 0
		for j < k && float64(days[j]) > c {
			j++
		}
		over += j
		if j == k {
			saturated++
		}
	}
	n := float64(hi - lo)
	switch t.Kind {
	case "days":
		return float64(over) / n, float64(saturated) / n
	}
	return float64(any) / n, 0
}
