package sim

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"

	"wxstress/model"
)

// With normal shocks the stationary daily temperature is normal with mean
// S and sd σ/√(1 − φ²), so the fan's quantiles are S + z_p·sd (standard
// result for the AR(1)).
func TestFanMatchesStationaryQuantiles(t *testing.T) {
	t.Parallel()
	const level, phi, sigma, paths = 5.0, 0.6, 2.0, 4000
	f, err := RunFan(context.Background(), flatModel(level, phi, sigma, model.FamilyNormal, 0),
		Config{Seed: 1, Year: 2023, Bases: BasesFor(model.Celsius)}, paths)
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Dates) != 365 || f.Dates[0].String() != "2023-01-01" {
		t.Fatalf("fan covers %d days from %s", len(f.Dates), f.Dates[0])
	}
	sd := sigma / math.Sqrt(1-phi*phi)
	for k, p := range FanQuantileProbs() {
		want := level + distuv.UnitNormal.Quantile(p)*sd
		mean := 0.0
		for _, v := range f.Q[k] {
			mean += v
		}
		mean /= float64(len(f.Q[k]))
		// The average over 365 days of a quantile estimated from 4000 paths:
		// its error is well under 0.05·sd.
		if math.Abs(mean-want) > 0.05*sd {
			t.Errorf("P%.0f averages %.3f over the year, want %.3f", 100*p, mean, want)
		}
	}
}

// TestFanDaysArePathDays checks RunFan's gathering of days into rows (in
// blocks of fanBlock paths, four paths at a time) against the same paths
// simulated one at a time: every daily quantile of temperature and demand
// is the same to the bit. 70 paths leave part blocks and single paths.
func TestFanDaysArePathDays(t *testing.T) {
	t.Parallel()
	const paths = 70
	m := seasonalModel([]float64{0.72})
	cfg := Config{Seed: 11, Year: 2027, Bases: BasesFor(model.Celsius), Demand: testDemand()}
	fan, err := RunFan(context.Background(), m, cfg, paths)
	if err != nil {
		t.Fatal(err)
	}
	c := cfg
	c.Paths, c.Periods = paths, DefaultPeriods() // the fan's own: the run's, the year among them
	pl, periods, err := prepare(m, &c)
	if err != nil {
		t.Fatal(err)
	}
	y := periods[slices.Index(c.Periods, "year")]
	n, off := y.Days(), int(y.From-pl.first)
	temps, demand := matrix(n, paths), matrix(n, paths)
	var rng rand.PCG
	buf, dbuf := make([]float64, pl.n), make([]float64, pl.n)
	for i := range paths {
		pl.path(&rng, c.Seed, i, buf, dbuf)
		for d := range n {
			temps[d][i], demand[d][i] = buf[off+d], dbuf[off+d]
		}
	}
	for _, x := range []struct {
		what      string
		got, want [][]float64
	}{
		{"temperature", fan.Q, quantilesByRow(temps, 1)},
		{"demand", fan.DemandQ, quantilesByRow(demand, 1)},
	} {
		for k := range x.want {
			for d := range x.want[k] {
				if x.got[k][d] != x.want[k][d] {
					t.Fatalf("%s quantile %d, day %d: fan %v, paths alone %v", x.what, k, d, x.got[k][d], x.want[k][d])
				}
			}
		}
	}
}
