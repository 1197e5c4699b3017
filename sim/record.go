package sim

import (
	"fmt"
	"math/rand/v2"

	"wxstress/calendar"
	"wxstress/model"
)

// Record draws one synthetic daily record of m for the days from..to (each
// day's seasonal mean with the trend at that date, the anomaly from its
// stationary law after a burn-in), the i-th of seed's stream. It is what a
// parametric bootstrap refits. Events of a scenario are not injected.
func Record(m *model.File, from, to calendar.Date, seed uint64, i int) ([]float64, error) {
	if to < from {
		return nil, fmt.Errorf("sim: record from %s to %s is empty", from, to)
	}
	cfg := Config{Paths: 1, Seed: seed, Year: to.Year(), Start: StartClimate, Bases: BasesFor(model.Units(m.Data.Units))}
	if err := cfg.Validate(m); err != nil {
		return nil, err
	}
	pl, err := newPlan(m, &cfg, []Period{{Name: "record", From: from, To: to}})
	if err != nil {
		return nil, err
	}
	buf := make([]float64, pl.n)
	var rng rand.PCG
	seedPath(&rng, seed, i)
	pl.temps(&rng, buf)
	return buf[pl.acc:], nil
}
