// Package scenarios defines stress and warming scenarios and applies them to
// a fitted model. A scenario transforms the model, never the simulated
// output: a level shift (uniform or by month), a move along the fitted trend
// to another year or a new slope, a volatility scale (uniform or by month),
// a change of persistence φ, fatter or thinner tails (ν, ξ), and injected
// cold or hot spells. Scenarios come from TOML files, decoded strictly
// (unknown keys, wrong types and out-of-range values are errors naming the
// file, line and key), or from the built-in set.
//
// Temperatures in a scenario are in its units (key "units", "C" by
// default for built-ins; a file without "units" is in the model's units);
// Apply converts differences to the model's units (1 °C = 1.8 °F).
//
// Functions here are safe for concurrent use; Apply never modifies its input.
package scenarios
