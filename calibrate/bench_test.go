package calibrate

import (
	"bytes"
	"testing"

	"wxstress/demo"
	"wxstress/model"
)

func BenchmarkFitLean(b *testing.B) {
	s, _ := ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, ReadOptions{Units: Celsius})
	full, _ := Fit(s, nil)
	set := &Settings{Harmonics: 2, AROrder: 1, Slow: SlowOn, Shocks: model.FamilySkewT, Lean: true, Start: full.Model}
	for b.Loop() {
		if _, err := Fit(s, set); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkFitFull(b *testing.B) {
	s, _ := ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, ReadOptions{Units: Celsius})
	for b.Loop() {
		if _, err := Fit(s, nil); err != nil {
			b.Fatal(err)
		}
	}
}
