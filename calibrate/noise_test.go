package calibrate

import (
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"wxstress/calendar"
)

// synthDemand draws five years of daily load from a heating-only change-point
// model with AR(1) noise whose innovation sd is sigma(T).
func noiseDemand(seed uint64, sigma func(t float64) float64) *DemandDays {
	r := rand.New(rand.NewPCG(seed, 3))
	d := &DemandDays{Units: Celsius, Demand: &DemandSeries{Name: "synthetic"}, Temps: &Series{Name: "synthetic"}}
	u, x := 0.0, 0.0
	for day := calendar.FromYMD(2020, time.January, 1); day <= calendar.FromYMD(2024, time.December, 31); day++ {
		x = 0.7*x + 2.5*r.NormFloat64()
		t := 10 + 10*math.Cos(2*math.Pi*(day.ModelTime()-200)/calendar.DaysPerYear) + x
		u = 0.5*u + sigma(t)*r.NormFloat64()
		d.Dates = append(d.Dates, day)
		d.Temp = append(d.Temp, t)
		d.Load = append(d.Load, 40000+3000*math.Max(15.5-t, 0)+u)
		d.Holiday = append(d.Holiday, false)
	}
	return d
}

// TestNoiseScaleFollowsTheData: noise whose sd is three times larger on cold
// days is fitted by temperature bands, with the coldest band's σ near the
// truth, and the cold-days check then agrees; constant noise keeps the
// constant scale.
func TestNoiseScaleFollowsTheData(t *testing.T) {
	t.Parallel()
	cold := noiseDemand(1, func(t float64) float64 {
		if t < 2 {
			return 3000
		}
		return 1000
	})
	res, err := FitDemand(cold, &DemandSettings{Unit: "GJ/day"})
	if err != nil {
		t.Fatal(err)
	}
	n := res.Model.Noise
	if n.Scale != "bands" || !(n.BandSigma[0] > 1.8*n.BandSigma[2]) {
		t.Errorf("cold-day noise fitted as %q, σ %v", n.Scale, n.BandSigma)
	}
	flat := noiseDemand(2, func(float64) float64 { return 1500 })
	res, err = FitDemand(flat, &DemandSettings{Unit: "GJ/day"})
	if err != nil {
		t.Fatal(err)
	}
	if n := res.Model.Noise; n.Scale != "constant" {
		t.Errorf("constant noise fitted as %q (%+v)", n.Scale, n.Choice)
	}
	if c := res.Model.Noise.Cold; c == nil || math.Abs(c.Model/c.Observed-1) > 0.2 {
		t.Errorf("cold-days check of constant noise %+v", c)
	}
}
