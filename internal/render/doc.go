// Package render presents results as text: terminal tables, CSV and JSON of
// the fitted temperature and demand models (FitSummary, DemandSummary), of a
// stress run's tail tables and scenario comparison (SimReport with
// SimTables, SimCSV, SimJSON), of the per-path aggregates (PathsCSV) and of
// the weather-normalized history (NormalsTable). The HTML report lives in
// package report and formats its numbers with the helpers exported here
// (Num, PValue, Statistics, ...), so that a number reads the same in every
// output.
//
// It never computes a statistic: every function takes an io.Writer and a
// result built elsewhere (package stress, calibrate, sim). Numbers keep the
// units of the data (°C or °F, degree days in °C·day or °F·day, demand in
// the unit of the demand model); the CSV and JSON carry every float64 in
// full (strconv 'g', -1), the tables round for reading.
//
// Functions are safe for concurrent use; a SimReport is read, never
// changed, by the renderers.
package render
