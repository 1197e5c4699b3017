package scenarios

import (
	"errors"
	"fmt"
	"os"
	"sort"
	"strings"
)

func ptr[T any](v T) *T { return &v }

// builtins are the named scenarios every run can use, in °C.
var builtins = []Scenario{
	{Name: "warm-1c", Units: "C", Description: "today's climate 1 °C warmer on every day",
		Shift: &Shift{Uniform: ptr(1.0)}},
	{Name: "warm-2c", Units: "C", Description: "today's climate 2 °C warmer on every day",
		Shift: &Shift{Uniform: ptr(2.0)}},
	{Name: "trend-2050", Units: "C", Description: "the fitted trend carried on to 2050",
		Trend: &Trend{TargetYear: ptr(2050)}},
	{Name: "volatile-winter", Units: "C", Description: "a quarter more day-to-day volatility in Dec–Feb, a tenth more in Mar and Nov",
		Volatility: &Volatility{MonthlyScale: []float64{1.25, 1.25, 1.1, 1, 1, 1, 1, 1, 1, 1, 1.1, 1.25}}},
	{Name: "persistent", Units: "C", Description: "anomalies that last longer: φ × 1.1 with the daily variance kept",
		Persistence: &Persistence{Scale: ptr(1.1), KeepVariance: true}},
	{Name: "fat-tails", Units: "C", Description: "heavier-tailed shocks: ν = 5 (a skewed model keeps its skew)",
		Tails: &Tails{DF: ptr(5.0)}},
	{Name: "cold-spell-10d", Units: "C", Description: "a 10-day spell 8 °C colder than simulated, starting at random in Dec–Feb, every year",
		Events: []Event{{Kind: "cold", Days: 10, Anomaly: 8, Window: "12-01:02-28"}}},
}

// Builtins returns the built-in scenarios.
func Builtins() []Scenario {
	out := make([]Scenario, len(builtins))
	copy(out, builtins)
	return out
}

// Names returns the names of the built-in scenarios.
func Names() []string {
	names := make([]string, len(builtins))
	for i, s := range builtins {
		names[i] = s.Name
	}
	sort.Strings(names)
	return names
}

func isBuiltin(name string) bool {
	for _, s := range builtins {
		if s.Name == name {
			return true
		}
	}
	return false
}

// ErrUnknown is wrapped by Lookup's error for a name that is neither a
// built-in scenario nor a file: a usage error, where a bad file is a data
// error.
var ErrUnknown = errors.New("scenarios: unknown scenario")

// ErrUnsuited is wrapped by Apply's errors for a built-in scenario that the
// model cannot take (a trend scenario on a model without a trend): the
// choice of scenario, not a file's content.
var ErrUnsuited = errors.New("scenarios: unsuited")

// Lookup returns the built-in scenario of that name, or else the scenario in
// the file at that path.
func Lookup(nameOrFile string) (*Scenario, error) {
	for _, s := range builtins {
		if s.Name == nameOrFile {
			return &s, nil
		}
	}
	if _, err := os.Stat(nameOrFile); err != nil {
		return nil, fmt.Errorf("%w: %q is neither a built-in scenario (%s) nor a file", ErrUnknown, nameOrFile, strings.Join(Names(), ", "))
	}
	return Load(nameOrFile)
}
