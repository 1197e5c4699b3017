package sim

import (
	"context"
	"math"
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
