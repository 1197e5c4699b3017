package model

import (
	"math"
	"strings"
	"testing"
)

// tolUnits is the rounding allowed in a conversion (a few ulps of 100).
const tolUnits = 1e-12

func TestUnitsConvert(t *testing.T) {
	t.Parallel()
	// The degree Fahrenheit is defined by t/°F = 1.8·t/°C + 32 (NIST Special
	// Publication 811, 2008 edition, appendix B.8; from memory): water
	// freezes at 32 °F and boils at 212 °F, and −40 is the same in both.
	for _, c := range []struct{ c, f float64 }{{0, 32}, {100, 212}, {-40, -40}, {37, 98.6}, {18, 64.4}} {
		if got := Celsius.Convert(c.c, Fahrenheit); math.Abs(got-c.f) > tolUnits {
			t.Errorf("%v °C = %v °F, want %v", c.c, got, c.f)
		}
		if got := Fahrenheit.Convert(c.f, Celsius); math.Abs(got-c.c) > tolUnits {
			t.Errorf("%v °F = %v °C, want %v", c.f, got, c.c)
		}
		if got := Celsius.Convert(c.c, Celsius); got != c.c {
			t.Errorf("%v °C to °C = %v", c.c, got)
		}
	}
	// A difference of 1 °C is 1.8 °F; the offset 32 plays no part.
	for _, c := range []struct{ dc, df float64 }{{1, 1.8}, {10, 18}, {-5, -9}, {0, 0}} {
		if got := Celsius.ConvertDelta(c.dc, Fahrenheit); math.Abs(got-c.df) > tolUnits {
			t.Errorf("difference %v °C = %v °F, want %v", c.dc, got, c.df)
		}
		if got := Fahrenheit.ConvertDelta(c.df, Celsius); math.Abs(got-c.dc) > tolUnits {
			t.Errorf("difference %v °F = %v °C, want %v", c.df, got, c.dc)
		}
	}
}

func TestUnitsDefaults(t *testing.T) {
	t.Parallel()
	// Common practice: degree days to 18 °C (Europe) or 65 °F (US); the
	// freezing point as the cold-day threshold.
	if Celsius.DegreeDayBase() != 18 || Fahrenheit.DegreeDayBase() != 65 {
		t.Errorf("degree-day bases %v, %v", Celsius.DegreeDayBase(), Fahrenheit.DegreeDayBase())
	}
	if Celsius.ColdThreshold() != 0 || Fahrenheit.ColdThreshold() != 32 {
		t.Errorf("cold thresholds %v, %v", Celsius.ColdThreshold(), Fahrenheit.ColdThreshold())
	}
	if Celsius.Convert(Celsius.ColdThreshold(), Fahrenheit) != Fahrenheit.ColdThreshold() {
		t.Error("the cold thresholds are not the same temperature")
	}
	if Celsius.Symbol() != "°C" || Fahrenheit.Symbol() != "°F" {
		t.Errorf("symbols %q, %q", Celsius.Symbol(), Fahrenheit.Symbol())
	}
}

func TestParseUnits(t *testing.T) {
	t.Parallel()
	for in, want := range map[string]Units{"C": Celsius, "c": Celsius, " degC ": Celsius, "°C": Celsius,
		"F": Fahrenheit, "degf": Fahrenheit, "°F": Fahrenheit} {
		if got, err := ParseUnits(in); err != nil || got != want {
			t.Errorf("ParseUnits(%q) = %q, %v; want %q", in, got, err, want)
		}
	}
	for _, in := range []string{"", "K", "celsius", "°"} {
		_, err := ParseUnits(in)
		if err == nil || !strings.HasPrefix(err.Error(), "model: ") || !strings.Contains(err.Error(), "C and F") {
			t.Errorf("ParseUnits(%q): error %v, want one naming the choices", in, err)
		}
		if Units(in).Valid() {
			t.Errorf("Units(%q).Valid()", in)
		}
	}
}

func TestUnitsPanicsOnInvalid(t *testing.T) {
	t.Parallel()
	for name, f := range map[string]func(){
		"Convert":       func() { Units("K").Convert(0, Celsius) },
		"ConvertDelta":  func() { Celsius.ConvertDelta(0, "") },
		"DegreeDayBase": func() { Units("").DegreeDayBase() },
		"ColdThreshold": func() { Units("c").ColdThreshold() },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s with invalid units did not panic", name)
				}
			}()
			f()
		}()
	}
}
