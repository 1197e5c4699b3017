package render

import (
	"bytes"
	"context"
	"encoding/csv"
	"io"
	"strconv"
	"strings"
	"testing"
	"time"

	"wxstress/calendar"
	"wxstress/model"
	"wxstress/sim"
)

// pathsModel is a small valid temperature model: a seasonal mean, an AR(1)
// and Student-t shocks.
func pathsModel() *model.File {
	f := &model.File{Schema: model.Schema, SchemaVersion: model.SchemaVersion}
	f.Data = model.Data{Units: "C", FirstDate: calendar.FromYMD(1990, time.January, 1), LastDate: calendar.FromYMD(2019, time.December, 31)}
	f.Trend = model.Trend{Kind: "none", Epoch: calendar.Epoch, Intercept: 10}
	f.Seasonal = model.Seasonal{PeriodDays: calendar.DaysPerYear, Harmonics: []model.Harmonic{{K: 1, Cos: -10, Sin: -4}}}
	f.AR = model.AR{Phi: []float64{0.7}, PhiSE: []float64{0.01}, Last: []float64{0}}
	f.Shocks = model.Shocks{Family: model.FamilyStudentT, DF: 8}
	f.Volatility.Kind = "monthly"
	for m := range 12 {
		f.Volatility.Monthly[m] = 2.5
	}
	return f
}

func pathsRun(t testing.TB, paths int) *sim.Result {
	m := pathsModel()
	if err := m.Validate("test"); err != nil {
		t.Fatal(err)
	}
	res, err := sim.Run(context.Background(), m, sim.Config{Paths: paths, Seed: 2, Year: 2026, Bases: sim.BasesFor(model.Celsius)})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestPathsCSV reads the per-path file back with the standard library's
// CSV reader: one row a path, in order, and every value the float64 it
// was (shortest round-trip formatting).
func TestPathsCSV(t *testing.T) {
	res := pathsRun(t, 10_001) // more than one block on any processor count
	for i := range res.Aggregates[0].Values {
		res.Aggregates[0].Values[i] *= 1e4 // an energy-sized value (exponent 7 in %g)
	}
	var b bytes.Buffer
	if err := PathsCSV(&b, res, nil); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1+res.Config.Paths || len(rows[0]) != 1+len(res.Aggregates) {
		t.Fatalf("%d rows of %d columns, want %d of %d", len(rows), len(rows[0]), 1+res.Config.Paths, 1+len(res.Aggregates))
	}
	if want := res.Aggregates[0].Period.Name + "." + res.Aggregates[0].Index.Info().Key; rows[0][1] != want {
		t.Errorf("first column %q, want %q", rows[0][1], want)
	}
	for i, row := range rows[1:] {
		if row[0] != strconv.Itoa(i) {
			t.Fatalf("row %d is path %s", i, row[0])
		}
		for j, a := range res.Aggregates {
			if v, err := strconv.ParseFloat(row[j+1], 64); err != nil || v != a.Values[i] {
				t.Fatalf("path %d, %s: %q, want %v", i, rows[0][j+1], row[j+1], a.Values[i])
			}
			if strings.ContainsAny(row[j+1], "eE") {
				t.Fatalf("path %d, %s: %q has an exponent", i, rows[0][j+1], row[j+1])
			}
		}
	}
}

// BenchmarkPathsCSV times writing the per-path file of 100 000 paths of
// the default periods; the rate is in MB/s of CSV written.
func BenchmarkPathsCSV(b *testing.B) {
	res := pathsRun(b, 100_000)
	var n int64
	for b.Loop() {
		c := &counter{}
		if err := PathsCSV(c, res, nil); err != nil {
			b.Fatal(err)
		}
		n = c.n
	}
	b.SetBytes(n)
}

type counter struct{ n int64 }

func (c *counter) Write(p []byte) (int, error) { c.n += int64(len(p)); return len(p), nil }

var _ io.Writer = (*counter)(nil)
