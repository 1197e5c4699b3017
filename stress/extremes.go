package stress

import (
	"math"

	"wxstress/extremes"
	"wxstress/sim"
)

// ExtremeLevels are the return periods the extremes check compares.
var extremeLevels = [...]float64{20, 50}

// ExtremeCheck sets the model's simulated 1-in-T coldest or hottest day of a
// period beside a GEV fitted by maximum likelihood to the record's own
// seasons (their minima or maxima, moved to the target year's trend level),
// with profile-likelihood 95 % intervals (Coles 2001, An Introduction to
// Statistical Modeling of Extreme Values, §3.3 — from memory).
type ExtremeCheck struct {
	Period  string
	Year    int       // the target year the seasons were moved to
	Index   sim.Index // Coldest (block minima) or Hottest (block maxima)
	Seasons int
	GEV     extremes.GEV // fitted to the maxima, or to the negated minima
	Minima  bool
	Levels  []ExtremeLevel
	Err     string // why no GEV could be fitted, when one could not
}

// ExtremeLevel is one return period of an ExtremeCheck.
type ExtremeLevel struct {
	T           float64
	GEV         float64 // the GEV's 1-in-T level
	Lo, Hi      float64 // its profile-likelihood 95 % interval (NaN where it could not be found)
	Model       float64 // the simulation's 1-in-T level
	ModelSE     float64
	Outside     bool // the model's level lies outside the interval
	OutsideSide string
}

// extremeChecks fits the GEV to the record's coldest days of the heating
// periods and hottest days of the others (each period simulated, with at
// least 15 seasons) and compares the levels with the simulation's.
func extremeChecks(h *HistoricalSeasons, set *Set) []ExtremeCheck {
	var out []ExtremeCheck
	for _, r := range h.Rows {
		if r.Index != sim.Coldest && r.Index != sim.Hottest || len(r.Values) < 15 ||
			r.Index == sim.Coldest && r.Period == "cooling" || r.Index == sim.Hottest && r.Period == "heating" {
			continue // winter minima and summer maxima
		}
		var row *sim.Row
		for i := range set.Rows {
			if set.Rows[i].Index == r.Index && set.Rows[i].Period == r.Period {
				row = &set.Rows[i]
			}
		}
		if row == nil {
			continue
		}
		c := ExtremeCheck{Period: r.Period, Year: h.TargetYear, Index: r.Index, Seasons: len(r.Values), Minima: r.Index == sim.Coldest}
		type fitter interface {
			ReturnLevel(T float64) float64
			ReturnLevelInterval(T, level float64) (float64, float64, error)
		}
		var f fitter
		if c.Minima {
			m, err := extremes.FitMinima(r.Values)
			if err != nil {
				c.Err = err.Error()
				out = append(out, c)
				continue
			}
			f, c.GEV = m, m.Negated.GEV
		} else {
			m, err := extremes.Fit(r.Values)
			if err != nil {
				c.Err = err.Error()
				out = append(out, c)
				continue
			}
			f, c.GEV = m, m.GEV
		}
		for _, T := range extremeLevels {
			l := ExtremeLevel{T: T, GEV: f.ReturnLevel(T), Lo: math.NaN(), Hi: math.NaN(),
				Model: row.Tail.ReturnLevel(T), ModelSE: row.Tail.ReturnLevelError(T)}
			if lo, hi, err := f.ReturnLevelInterval(T, 0.95); err == nil {
				l.Lo, l.Hi = lo, hi
				switch {
				case l.Model < lo:
					l.Outside, l.OutsideSide = true, "below"
				case l.Model > hi:
					l.Outside, l.OutsideSide = true, "above"
				}
			}
			c.Levels = append(c.Levels, l)
		}
		out = append(out, c)
	}
	return out
}
