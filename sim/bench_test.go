package sim

import (
	"context"
	"math/rand/v2"
	"testing"

	"wxstress/model"
)

// BenchmarkPathDay times the per-day kernel: paths of the default periods
// (year, heating, cooling: 426 accumulated days plus the burn-in) with
// Student-t shocks, four at a time as a run simulates them, and the
// accumulation of their indices; reported per simulated day.
func BenchmarkPathDay(b *testing.B) {
	benchPathDay(b, flatModel(10, 0.72, 2.5, model.FamilyStudentT, 6))
}

// benchPathDay times paths of m (temperatures and accumulation) the way a
// run's worker does and reports nanoseconds per simulated day.
func benchPathDay(b *testing.B, m *model.File) {
	pl, _, err := prepare(m, &Config{Paths: 1, Bases: BasesFor(model.Celsius)})
	if err != nil {
		b.Fatal(err)
	}
	segs := make([]segStats, len(pl.segs))
	var rngs [4]rand.PCG
	var bufs [4][]float64
	for k := range bufs {
		bufs[k] = make([]float64, pl.n)
	}
	k := 1
	if pl.fast1() {
		k = 4
	}
	for i := 0; b.Loop(); i += k {
		if k == 4 {
			pl.temps4(&rngs, &bufs, 1, i)
		} else {
			seedPath(&rngs[0], 1, i)
			pl.temps(&rngs[0], bufs[0])
		}
		for j := range k {
			pl.accumulate(bufs[j], segs)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(k*pl.n), "ns/day")
}

// BenchmarkRun times a whole run of 100 000 paths on all cores, tail
// tables excluded, and reports simulated station-days per second.
func BenchmarkRun(b *testing.B) {
	m := flatModel(10, 0.72, 2.5, model.FamilyStudentT, 6)
	var days int
	for b.Loop() {
		res, err := Run(context.Background(), m, Config{Paths: 100_000, Seed: 1, Bases: BasesFor(model.Celsius)})
		if err != nil {
			b.Fatal(err)
		}
		days = res.SimulatedDays * 100_000
	}
	b.ReportMetric(float64(days)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mdays/s")
}

// BenchmarkRunDemand is BenchmarkRun with a demand model and a capacity:
// one more draw and the demand aggregates per day.
func BenchmarkRunDemand(b *testing.B) {
	m := flatModel(10, 0.72, 2.5, model.FamilyStudentT, 6)
	var days int
	for b.Loop() {
		res, err := Run(context.Background(), m, Config{Paths: 100_000, Seed: 1, Bases: BasesFor(model.Celsius),
			Demand: testDemand(), Capacity: 90000})
		if err != nil {
			b.Fatal(err)
		}
		days = res.SimulatedDays * 100_000
	}
	b.ReportMetric(float64(days)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mdays/s")
}

// BenchmarkPathDaySlow is BenchmarkPathDay with the slow part and
// skewed-t shocks: the default model of a long record.
func BenchmarkPathDaySlow(b *testing.B) {
	m := flatModel(10, 0.72, 2.5, model.FamilySkewT, 10)
	m.Shocks.Skew = 0.85
	m.Slow = &model.Slow{Phi: 0.985, SD: 0.6}
	benchPathDay(b, m)
}

// BenchmarkSummarize times the tail table of one aggregate of a million
// paths (selection of the order statistics it reads, the shortfalls, the
// Monte Carlo errors).
func BenchmarkSummarize(b *testing.B) {
	r := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 1_000_000)
	for i := range x {
		x[i] = 3000 + 180*r.NormFloat64()
	}
	for b.Loop() {
		SummarizeWith(x, true, nil, nil)
	}
}
