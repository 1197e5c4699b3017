// Package demo embeds the invented demo data of wxstress: a daily mean
// temperature record of Kestrel Bay Airfield, 1955–2025, and the daily gas
// send-out of Lanternfield Energy, 2021–2025.
//
// The data are invented. Kestrel Bay, its airfield station and Lanternfield
// Energy are fictional, and the numbers were drawn from a known model with a
// fixed seed, so they describe no real place; TRUTH.md in this directory
// lists the generating parameters, which fitted values can be compared with.
// The files are regenerated, byte for byte, by
//
//	go run ./demo/gen
//
// from the module root.
package demo

import (
	_ "embed"
)

//go:generate go run ./gen -dir .

// Names and units of the demo data.
const (
	StationName = "Kestrel Bay Airfield"
	StationFile = "kestrel_bay_daily.csv"
	DemandFile  = "lanternfield_demand.csv"
	Retailer    = "Lanternfield Energy"
	DemandUnit  = "GJ/day"
)

//go:embed kestrel_bay_daily.csv
var station []byte

//go:embed lanternfield_demand.csv
var demand []byte

// Station returns a copy of StationFile: columns date,tavg with the daily
// mean temperature in °C to 0.1 °C, 1955-01-01 to 2025-12-31; a few values
// are empty and one date has no row.
func Station() []byte { return clone(station) }

// Demand returns a copy of DemandFile: columns date,load,holiday with the
// daily gas send-out in GJ/day and 1 on public holidays, 2021-01-01 to
// 2025-12-31, every day present.
func Demand() []byte { return clone(demand) }

func clone(b []byte) []byte { return append([]byte(nil), b...) }
