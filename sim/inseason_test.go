package sim

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/model"
)

// observedRecord draws a daily record of m's kind for the days from..to.
func observedRecord(m *model.File, from, to calendar.Date, seed uint64) *Observed {
	r := rand.New(rand.NewPCG(seed, 5))
	o := &Observed{From: from}
	x := 0.0
	for d := from; d <= to; d++ {
		x = 0.7*x + 2*r.NormFloat64()
		o.Temps = append(o.Temps, m.Mean(d.ModelTime())+x)
	}
	return o
}

// TestInSeasonReproducesTheObservedPart runs a heating season under way
// (data end 15 January) with its observed days: a window that ended by the
// data end is the same on every path and equals its index recomputed from
// the observed days, and every path's heating HDD is at least the HDD so far.
func TestInSeasonReproducesTheObservedPart(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.7})
	m.Data.LastDate = calendar.FromYMD(2026, 1, 15)
	obs := observedRecord(m, calendar.FromYMD(2025, 10, 1), m.Data.LastDate, 1)
	cfg := Config{Paths: 2000, Seed: 3, Start: StartConditional, Periods: []string{"heating", "11-01:01-10"},
		Bases: BasesFor(model.Celsius), Observed: obs}
	res, err := Run(context.Background(), m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	if res.Config.Year != 2026 {
		t.Errorf("default target year %d, want 2026: the heating season under way", res.Config.Year)
	}
	// Recompute from the observed days by the definitions.
	hddOf := func(from, to calendar.Date) float64 {
		s := 0.0
		for d := from; d <= to; d++ {
			s += math.Max(18-obs.Temps[int(d-obs.From)], 0)
		}
		return s
	}
	done := hddOf(calendar.FromYMD(2025, 11, 1), calendar.FromYMD(2026, 1, 10))
	soFar := hddOf(calendar.FromYMD(2025, 11, 1), m.Data.LastDate)
	for _, v := range column(t, res, HDD, "11-01:01-10") {
		if math.Abs(v-done) > 1e-9 {
			t.Fatalf("an ended window's HDD is %v on a path, %v observed", v, done)
		}
	}
	for _, v := range column(t, res, HDD, "heating") {
		if v < soFar-1e-9 {
			t.Fatalf("a path's heating HDD %v is below the %v observed so far", v, soFar)
		}
	}
	io := res.InSeason[0]
	if io.Period != "heating" || io.Days != 76 || math.Abs(io.Values[HDD]-soFar) > 1e-9 {
		t.Errorf("in-season report %+v; want heating, 76 days, HDD %.3f", io, soFar)
	}
}

// TestInSeasonSpreadShrinks moves the data end through the winter: the
// heating season's HDD spread narrows as more of it is observed.
func TestInSeasonSpreadShrinks(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.7})
	obs := observedRecord(m, calendar.FromYMD(2025, 10, 1), calendar.FromYMD(2026, 3, 1), 2)
	prev := math.Inf(1)
	for _, end := range []calendar.Date{calendar.FromYMD(2025, 10, 31), calendar.FromYMD(2025, 12, 15),
		calendar.FromYMD(2026, 1, 31), calendar.FromYMD(2026, 2, 28)} {
		mm := *m
		mm.Data.LastDate = end
		res, err := Run(context.Background(), &mm, Config{Paths: 3000, Seed: 1, Year: 2026, Start: StartConditional,
			Periods: []string{"heating"}, Bases: BasesFor(model.Celsius), Observed: obs})
		if err != nil {
			t.Fatal(err)
		}
		sd := stat.StdDev(column(t, res, HDD, "heating"), nil)
		if !(sd < prev) {
			t.Errorf("data end %s: heating HDD sd %.1f, not below %.1f of an earlier data end", end, sd, prev)
		}
		prev = sd
	}
}

// TestInSeasonErrors: a gap in the season so far, an observed record that
// stops short of the data end, and demand in a season under way are refused.
func TestInSeasonErrors(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.7})
	m.Data.LastDate = calendar.FromYMD(2026, 1, 15)
	obs := observedRecord(m, calendar.FromYMD(2025, 10, 1), m.Data.LastDate, 3)
	gap := &Observed{From: obs.From, Temps: append([]float64(nil), obs.Temps...)}
	gap.Temps[50] = math.NaN()
	short := &Observed{From: obs.From, Temps: obs.Temps[:90]}
	for _, c := range []struct {
		o    *Observed
		want string
	}{{gap, "no value on"}, {short, "does not cover"}, {nil, "--observed"}} {
		_, err := Run(context.Background(), m, Config{Paths: 10, Start: StartConditional, Periods: []string{"heating"}, Observed: c.o})
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("error %v, want one saying %q", err, c.want)
		}
	}
}

// TestSnapsAndTopMatchBruteForce recomputes, from one path's days, the
// lowest 3-day mean, the highest 3-day demand and the 5 highest daily
// demands of each period, as the run stores them.
func TestSnapsAndTopMatchBruteForce(t *testing.T) {
	t.Parallel()
	m := seasonalModel([]float64{0.7})
	cfg := Config{Paths: 3, Seed: 9, Year: 2021, Periods: []string{"heating", "jan", "year"}, Bases: BasesFor(model.Celsius),
		Demand: testDemand(), SnapDays: 3, TopDays: 5}
	pl, periods, err := prepare(m, &cfg)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Run(context.Background(), m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	buf, dbuf := make([]float64, pl.n), make([]float64, pl.n)
	var rng rand.PCG
	for i := range cfg.Paths {
		pl.path(&rng, cfg.Seed, i, buf, dbuf)
		for k, p := range periods {
			lo, hi := int(p.From-pl.first), int(p.To-pl.first)+1
			cold, energy := math.Inf(1), math.Inf(-1)
			for d := lo; d+3 <= hi; d++ {
				cold = math.Min(cold, (buf[d]+buf[d+1]+buf[d+2])/3)
				energy = math.Max(energy, dbuf[d]+dbuf[d+1]+dbuf[d+2])
			}
			if got := column(t, res, ColdSnap, p.Name)[i]; math.Abs(got-cold) > 1e-9 {
				t.Errorf("path %d %s: cold snap %v, brute force %v", i, p.Name, got, cold)
			}
			if got := column(t, res, SnapEnergy, p.Name)[i]; math.Abs(got-energy) > 1e-6*math.Abs(energy) {
				t.Errorf("path %d %s: snap energy %v, brute force %v", i, p.Name, got, energy)
			}
			days := append([]float64(nil), dbuf[lo:hi]...)
			slices.Sort(days)
			for j := range 5 {
				want := float32(days[len(days)-1-j])
				if got := res.Top[k][i*5+j]; got != want {
					t.Errorf("path %d %s: top %d is %v, brute force %v", i, p.Name, j, got, want)
				}
			}
		}
	}
}
