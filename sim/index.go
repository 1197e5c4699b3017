package sim

import (
	"strings"

	"wxstress/model"
)

// Index is a per-path aggregate of a period: what a tail table has a row for.
type Index int

const (
	HDD       Index = iota // heating degree days, Σ max(Tb − T, 0)
	CDD                    // cooling degree days, Σ max(T − Tb, 0)
	Coldest                // lowest daily mean
	Hottest                // highest daily mean
	ColdDays               // days with a mean below the cold threshold
	ColdSpell              // longest run of such days
	numTempIndices
)

// Demand indices, present when a run has a demand model.
const (
	Energy       Index = numTempIndices + iota // total demand over the period
	PeakDemand                                 // highest daily demand
	PeakDay                                    // day of that peak, counted from the period's first day (1)
	OverCapacity                               // days with demand above the capacity
	numIndices
)

// Cold-snap indices, present when a run asks for them (Config.SnapDays):
// the planner's k-day design snap.
const (
	ColdSnap   Index = numIndices + iota // lowest mean of SnapDays consecutive days
	SnapEnergy                           // highest demand over SnapDays consecutive days (with demand)
)

// Info describes an index for reports.
type Info struct {
	Key  string // short name for flags and files: "hdd", "coldest", ...
	Name string // report name: "HDD", "coldest day", ...
	// HighIsAdverse says which tail is the risk: true for HDD, CDD, demand;
	// false for the coldest day.
	HighIsAdverse bool
	unit          string // "dd" (degree days), "deg" (temperature) or a literal
}

var indexInfo = [...]Info{
	HDD:       {"hdd", "HDD", true, "dd"},
	CDD:       {"cdd", "CDD", true, "dd"},
	Coldest:   {"coldest", "coldest day", false, "deg"},
	Hottest:   {"hottest", "hottest day", true, "deg"},
	ColdDays:  {"cold-days", "cold days", true, "days"},
	ColdSpell: {"cold-spell", "longest cold spell", true, "days"},

	Energy:       {"energy", "demand energy", true, "energy"},
	PeakDemand:   {"peak-demand", "peak-day demand", true, "demand"},
	PeakDay:      {"peak-date", "day of the peak", true, "day of period"},
	OverCapacity: {"over-capacity", "days over capacity", true, "days"},

	ColdSnap:   {"cold-snap", "coldest k-day mean", false, "deg"},
	SnapEnergy: {"snap-energy", "k-day demand energy", true, "energy"},
}

// Info returns the description of the index.
func (x Index) Info() Info { return indexInfo[x] }

// NeedsDemand reports whether the index exists only in runs with a demand
// model.
func (x Index) NeedsDemand() bool { return x >= Energy && x < numIndices || x == SnapEnergy }

// Unit returns the index's unit for temperatures in units and demand in
// demandUnit (e.g. "GJ/day"; the energy of a period is then in GJ).
func (i Info) Unit(units model.Units, demandUnit string) string {
	switch i.unit {
	case "dd":
		return units.Symbol() + "·day"
	case "deg":
		return units.Symbol()
	case "demand":
		return demandUnit
	case "energy":
		if u, ok := strings.CutSuffix(demandUnit, "/day"); ok {
			return u
		}
		return demandUnit + "·day"
	}
	return i.unit
}

// IndexByKey finds an index by its key.
func IndexByKey(key string) (Index, bool) {
	for i, in := range indexInfo {
		if in.Key == key {
			return Index(i), true
		}
	}
	return 0, false
}
