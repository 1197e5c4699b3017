package render

import (
	"math"

	"wxstress/internal/numfmt"
	"wxstress/stress"
)

// DesignTable lays out the design figures at each planning standard: the
// 1-in-T coldest day, coldest k-day mean, peak-day demand and k-day demand
// energy of each period, with their Monte Carlo errors.
func DesignTable(rows []stress.DesignRow, snapDays int, units, demandUnit string) (header []string, cells [][]string) {
	k := numfmt.Number(float64(snapDays))
	header = []string{"standard", "period", "design day (°" + units + ")", k + "-day cold snap (°" + units + ")"}
	withDemand := len(rows) > 0 && !math.IsNaN(rows[0].Peak)
	if withDemand {
		header = append(header, "design-day demand ("+demandUnit+")", k+"-day snap energy ("+EnergyUnit(demandUnit)+")")
	}
	cell := func(v, se float64) string {
		if math.IsNaN(v) {
			return "—"
		}
		return numfmt.ValueSE(v, se)
	}
	band := func(b stress.Band, se float64) string { // to the value's own precision
		if math.IsNaN(b.Lo) {
			return ""
		}
		return " [" + numfmt.Value(b.Lo, se) + " to " + numfmt.Value(b.Hi, se) + "]"
	}
	for _, r := range rows {
		line := []string{"1-in-" + periodKey(r.T), r.Period, cell(r.Coldest, r.ColdestSE) + band(r.ColdestBand, r.ColdestSE),
			cell(r.Snap, r.SnapSE)}
		if withDemand {
			line = append(line, cell(r.Peak, r.PeakSE)+band(r.PeakBand, r.PeakSE), cell(r.SnapEnergy, r.SnapEnerSE))
		}
		cells = append(cells, line)
	}
	return header, cells
}

// CapacityTable lays out the solved capacities.
func CapacityTable(rows []stress.CapacityRow, demandUnit string) (header []string, cells [][]string, notes []string) {
	header = []string{"target", "period", "capacity (" + demandUnit + ")", "achieved at it"}
	for _, r := range rows {
		achieved := ""
		switch {
		case len(r.Target) > 5 && r.Target[:5] == "days:":
			achieved = numfmt.Fixed(r.Achieved, 2) + " days a year"
		default:
			achieved = numfmt.Prob(r.Achieved) + " of years"
		}
		cells = append(cells, []string{r.Target, r.Period, cell2(r.Capacity, r.SE), achieved})
		if math.IsNaN(r.SE) {
			notes = append(notes, r.Target+", "+r.Period+": too few paths beyond this capacity to bound its Monte Carlo "+
				"error; run more paths (--paths)")
		}
		if r.Saturated > 0 {
			notes = append(notes, r.Target+", "+r.Period+": "+numfmt.Percent(r.Saturated)+
				" of the years have more days over the capacity than the run keeps; the mean is a lower bound")
		}
	}
	notes = append(notes, "peak:1-in-T is the peak-day demand exceeded once in T years; days:x the least capacity with at "+
		"most x days over it a year on average; any:p the least capacity with at most probability p of any day over it.")
	return header, cells, notes
}

func cell2(v, se float64) string {
	if math.IsNaN(se) {
		return numfmt.Fixed(v, 0)
	}
	return numfmt.ValueSE(v, se)
}

func writeDesign(e *errWriter, r *SimReport) {
	if len(r.Design) > 0 {
		header, cells := DesignTable(r.Design, r.Manifest.SnapDays, r.Manifest.Units, demandUnitOf(r))
		title := "Design day at the planning standards (1-in-T levels on the adverse side, ± Monte Carlo s.e."
		for _, d := range r.Design {
			if !math.IsNaN(d.ColdestBand.Lo) {
				title += "; [90" + Glue + "%" + Glue + "parameter" + Glue + "band]"
				break
			}
		}
		e.printf("\n%s)\n", title)
		e.table(header, cells)
	}
	if len(r.Capacities) > 0 {
		header, cells, notes := CapacityTable(r.Capacities, demandUnitOf(r))
		e.printf("\nCapacity to a target\n")
		e.table(header, cells)
		for _, n := range notes {
			e.printf("  %s\n", n)
		}
	}
}

func demandUnitOf(r *SimReport) string {
	if r.Planning != nil {
		return r.Planning.Unit
	}
	return ""
}

type jsonDesign struct {
	Band       map[string]jsonBand `json:"band,omitempty"` // design_day, design_day_demand: 90 % parameter bands
	Standard   string              `json:"standard"`
	Period     string              `json:"period"`
	DesignDay  *float64            `json:"design_day"`
	DesignSE   *float64            `json:"design_day_se"`
	Snap       *float64            `json:"cold_snap"`
	SnapSE     *float64            `json:"cold_snap_se"`
	Peak       *float64            `json:"design_day_demand,omitempty"`
	PeakSE     *float64            `json:"design_day_demand_se,omitempty"`
	SnapEnergy *float64            `json:"snap_energy,omitempty"`
	SnapEnerSE *float64            `json:"snap_energy_se,omitempty"`
}

type jsonCapacity struct {
	Target    string   `json:"target"`
	Period    string   `json:"period"`
	Capacity  float64  `json:"capacity"`
	Achieved  float64  `json:"achieved"`
	SE        *float64 `json:"se"`
	Saturated float64  `json:"saturated,omitempty"`
}

func toJSONDesign(rows []stress.DesignRow) []jsonDesign {
	var out []jsonDesign
	for _, r := range rows {
		var b map[string]jsonBand
		if !math.IsNaN(r.ColdestBand.Lo) {
			b = map[string]jsonBand{"design_day": {r.ColdestBand.Lo, r.ColdestBand.Hi}}
			if !math.IsNaN(r.PeakBand.Lo) {
				b["design_day_demand"] = jsonBand{r.PeakBand.Lo, r.PeakBand.Hi}
			}
		}
		out = append(out, jsonDesign{b, "1-in-" + periodKey(r.T), r.Period, finitePtr(r.Coldest), finitePtr(r.ColdestSE),
			finitePtr(r.Snap), finitePtr(r.SnapSE), finitePtr(r.Peak), finitePtr(r.PeakSE), finitePtr(r.SnapEnergy),
			finitePtr(r.SnapEnerSE)})
	}
	return out
}

func toJSONCapacity(rows []stress.CapacityRow) []jsonCapacity {
	var out []jsonCapacity
	for _, r := range rows {
		out = append(out, jsonCapacity{r.Target, r.Period, r.Capacity, r.Achieved, finitePtr(r.SE), r.Saturated})
	}
	return out
}
