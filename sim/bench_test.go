package sim

import (
	"context"
	"math/rand/v2"
	"testing"

	"wxstress/model"
)

// BenchmarkPathDay times the per-day kernel: one path of the default
// periods (year, heating, cooling: 426 accumulated days plus the burn-in)
// with Student-t shocks, reported per simulated day.
func BenchmarkPathDay(b *testing.B) {
	benchPathDay(b, flatModel(10, 0.72, 2.5, model.FamilyStudentT, 6))
}

// benchPathDay times one path of m (temperatures and accumulation) and
// reports nanoseconds per simulated day.
func benchPathDay(b *testing.B, m *model.File) {
	pl, _, err := prepare(m, &Config{Paths: 1, Bases: BasesFor(model.Celsius)})
	if err != nil {
		b.Fatal(err)
	}
	segs := make([]segStats, len(pl.segs))
	buf := make([]float64, pl.n)
	var rng rand.PCG
	for i := 0; b.Loop(); i++ {
		seedPath(&rng, 1, i)
		pl.temps(&rng, buf)
		pl.accumulate(buf, segs)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(pl.n), "ns/day")
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
