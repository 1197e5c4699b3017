package render

import "testing"

// TestScaleUnit checks the units of large values: SI prefixes for joules
// and watt-hours (the SI prefixes of the BIPM SI Brochure, 9th edition;
// its table number from memory: 7), words otherwise.
func TestScaleUnit(t *testing.T) {
	for _, c := range []struct {
		unit string
		big  float64
		f    float64
		want string
	}{
		{"GJ", 20.7e6, 1e3, "TJ"},
		{"GJ/day", 999_999, 1, "GJ/day"},
		{"MWh/day", 3e6, 1e3, "GWh/day"},
		{"kWh", 4e9, 1e6, "GWh"},
		{"J", 2e6, 1e3, "kJ"},
		{"therm", 5e6, 1e3, "thousand therm"},
		{"MMBtu", 5e9, 1e6, "million MMBtu"},
		{"°C·day", 3e3, 1, "°C·day"},
	} {
		f, u := ScaleUnit(c.unit, c.big)
		if f != c.f || u != c.want {
			t.Errorf("ScaleUnit(%q, %g) = %g, %q; want %g, %q", c.unit, c.big, f, u, c.f, c.want)
		}
	}
}
