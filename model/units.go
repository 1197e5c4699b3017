package model

import (
	"fmt"
	"strings"
)

// Units are the units of a temperature: degrees Celsius or degrees
// Fahrenheit. The value is the letter model files store, "C" or "F", so a
// Units encodes to JSON and TOML exactly as that string. The zero value ""
// means not stated; it is not Valid.
type Units string

// The two temperature units.
const (
	Celsius    Units = "C"
	Fahrenheit Units = "F"
)

// ParseUnits reads a units name as a user writes it: C or F in any case,
// also degC, degF, °C and °F, with surrounding spaces.
func ParseUnits(s string) (Units, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "c", "degc", "°c":
		return Celsius, nil
	case "f", "degf", "°f":
		return Fahrenheit, nil
	}
	return "", fmt.Errorf("model: unknown temperature units %q: valid choices are C and F (also degC, degF, °C, °F)", s)
}

// Valid reports whether u is Celsius or Fahrenheit.
func (u Units) Valid() bool { return u == Celsius || u == Fahrenheit }

// Symbol returns "°C" or "°F" ("°" alone for the zero value).
func (u Units) Symbol() string { return "°" + string(u) }

// Convert converts the temperature v (not a difference) from u to the units
// to: F = C·9/5 + 32, C = (F − 32)·5/9. It panics if u or to is not Valid.
func (u Units) Convert(v float64, to Units) float64 {
	switch u.pair(to) {
	case celsiusToFahrenheit:
		return v*9/5 + 32
	case fahrenheitToCelsius:
		return (v - 32) * 5 / 9
	}
	return v
}

// ConvertDelta converts the temperature difference d from u to the units
// to: 1 °C = 1.8 °F. It panics if u or to is not Valid.
func (u Units) ConvertDelta(d float64, to Units) float64 {
	switch u.pair(to) {
	case celsiusToFahrenheit:
		return d * 1.8
	case fahrenheitToCelsius:
		return d * (1 / 1.8)
	}
	return d
}

// DegreeDayBase returns the usual base of heating and cooling degree days,
// 18 °C or 65 °F (common practice: 65 °F is the US convention, 18 °C the
// European one; the two are not an exact conversion). It panics if u is not
// Valid.
func (u Units) DegreeDayBase() float64 {
	if u.mustValid() == Fahrenheit {
		return 65
	}
	return 18
}

// ColdThreshold returns the freezing point, 0 °C or 32 °F: a day is cold
// when its mean is below it. It panics if u is not Valid.
func (u Units) ColdThreshold() float64 {
	if u.mustValid() == Fahrenheit {
		return 32
	}
	return 0
}

type conversion int

const (
	sameUnits conversion = iota
	celsiusToFahrenheit
	fahrenheitToCelsius
)

func (u Units) pair(to Units) conversion {
	u.mustValid()
	to.mustValid()
	switch {
	case u == to:
		return sameUnits
	case u == Celsius:
		return celsiusToFahrenheit
	}
	return fahrenheitToCelsius
}

func (u Units) mustValid() Units {
	if !u.Valid() {
		panic(fmt.Sprintf("model: temperature units %q, want %q or %q", string(u), string(Celsius), string(Fahrenheit)))
	}
	return u
}
