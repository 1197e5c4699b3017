package stress

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/model"
	"wxstress/sim"
)

// synthRecord draws a record from the model class (seasonal cycle, fast
// AR(1), slow AR(1), normal shocks) with a few gaps.
func synthRecord(years int, seed uint64) *calibrate.Series {
	r := rand.New(rand.NewPCG(seed, 21))
	start := calendar.FromYMD(2000, time.January, 1)
	end := calendar.FromYMD(2000+years-1, time.December, 31)
	s := &calibrate.Series{Name: "synthetic", Start: start, Units: calibrate.Celsius}
	y, f := 0.0, 0.7*r.NormFloat64()
	q := 0.7 * math.Sqrt(1-0.98*0.98)
	for d := start - 300; d <= end; d++ {
		y = 0.7*y + 2.5*r.NormFloat64()
		f = 0.98*f + q*r.NormFloat64()
		if d >= start {
			tt := d.ModelTime()
			s.Temps = append(s.Temps, 10+10*math.Cos(2*math.Pi*(tt-200)/calendar.DaysPerYear)+y+f)
		}
	}
	for i := 400; i < 410; i++ {
		s.Temps[i] = math.NaN()
	}
	return s
}

// TestBootstrapMatchesCurvature compares the spread of φ across
// parametric-bootstrap refits with the standard error from the likelihood's
// curvature — two independent routes to the same sampling error — on a model
// where both apply (an AR(1) alone: with a slow part on a 20-year record the
// e-folding time is so weakly identified that refits move between maxima,
// which the bootstrap shows and a curvature cannot), and checks that the
// bands hold the baseline's own numbers.
func TestBootstrapMatchesCurvature(t *testing.T) {
	if testing.Short() {
		t.Skip("40 refits")
	}
	t.Parallel()
	s := synthRecord(20, 4)
	fit := &calibrate.Settings{Harmonics: 1, AROrder: 1, Slow: calibrate.SlowNone, Trend: "none", Shocks: model.FamilyNormal}
	res, err := Run(context.Background(), &Job{Temps: s, Fit: fit,
		Config:      sim.Config{Paths: 4000, Seed: 2, Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)},
		Uncertainty: &Uncertainty{Refits: 40}})
	if err != nil {
		t.Fatal(err)
	}
	var phi []float64
	for _, m := range res.Refits {
		phi = append(phi, m.AR.Phi[0])
	}
	sd := stat.StdDev(phi, nil)
	se := res.Model.AR.PhiSE[0]
	// The sd of 40 draws is within about ±25 % of the truth (2 s.e.).
	t.Logf("φ: bootstrap sd %.4f, curvature s.e. %.4f", sd, se)
	if sd < 0.65*se || sd > 1.5*se {
		t.Errorf("bootstrap sd of φ %.4f against the curvature s.e. %.4f", sd, se)
	}
	if len(res.Bands) != len(res.Set.Rows) {
		t.Fatalf("%d bands for %d rows", len(res.Bands), len(res.Set.Rows))
	}
	for k, b := range res.Bands {
		r := res.Set.Rows[k]
		if r.Index != sim.HDD {
			continue
		}
		t.Logf("HDD year mean %.0f band %.0f–%.0f; 1-in-20 %.0f band %.0f–%.0f", r.Tail.Mean, b.Mean.Lo, b.Mean.Hi,
			r.Tail.ReturnLevel(20), b.RL20.Lo, b.RL20.Hi)
		if !(b.Mean.Lo <= r.Tail.Mean && r.Tail.Mean <= b.Mean.Hi) || !(b.RL20.Lo < b.RL20.Hi) {
			t.Errorf("HDD band %+v does not hold the baseline mean %.1f", b, r.Tail.Mean)
		}
	}
}

// TestMixWidensTheSpread checks that spreading the paths over refitted
// models (the predictive distribution) is at least as wide as the plug-in
// model's, and that every path is filled.
func TestMixWidensTheSpread(t *testing.T) {
	if testing.Short() {
		t.Skip("20 refits")
	}
	t.Parallel()
	s := synthRecord(15, 6)
	fit := &calibrate.Settings{Harmonics: 1, AROrder: 1, Slow: calibrate.SlowOn, Trend: "none", Shocks: model.FamilyNormal}
	cfg := sim.Config{Paths: 6000, Seed: 3, Periods: []string{"year"}, Bases: sim.BasesFor(model.Celsius)}
	plain, err := Run(context.Background(), &Job{Temps: s, Fit: fit, Config: cfg})
	if err != nil {
		t.Fatal(err)
	}
	mix, err := Run(context.Background(), &Job{Temps: s, Fit: fit, Config: cfg, Uncertainty: &Uncertainty{Refits: 20, Mode: UncertaintyMix}})
	if err != nil {
		t.Fatal(err)
	}
	for k, r := range mix.Set.Rows {
		if r.Index != sim.HDD {
			continue
		}
		for _, v := range mix.Set.Base.Aggregates[k].Values {
			if v == 0 || math.IsNaN(v) {
				t.Fatal("a path of the mixed run was not filled")
			}
		}
		p := plain.Set.Rows[k].Tail
		t.Logf("annual HDD sd: plug-in %.1f, predictive %.1f", p.SD, r.Tail.SD)
		// Parameter uncertainty adds variance; allow for Monte Carlo noise of
		// the two sds (about 1 % each).
		if r.Tail.SD < 0.97*p.SD {
			t.Errorf("predictive sd %.1f below the plug-in %.1f", r.Tail.SD, p.SD)
		}
	}
}
