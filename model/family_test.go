package model

import (
	"encoding/json"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"wxstress/shocks"
)

// Every parametric family's Fit returns parameters from which New rebuilds
// the fitted distribution, and what it fits is what package shocks fits.
func TestFamilyFitRoundTrip(t *testing.T) {
	t.Parallel()
	r := rand.New(rand.NewPCG(1, 2))
	z := make([]float64, 400)
	for i := range z {
		z[i] = shocks.SkewT{Nu: 6, Xi: 0.85}.Quantile(r.Float64())
	}
	for _, fam := range Families() {
		if !fam.Parametric() {
			if fam.Fit != nil || fam.Params() != 0 {
				t.Errorf("%s: a resampling family with a fit or parameters", fam.Name)
			}
			continue
		}
		fit, sh, err := fam.Fit(z)
		if err != nil {
			t.Fatalf("%s: %v", fam.Name, err)
		}
		if sh.Family != fam.Name || fit.Params != fam.Params() {
			t.Errorf("%s: fitted shocks %+v with %d parameters, family has %d", fam.Name, sh, fit.Params, fam.Params())
		}
		if got := fam.New(sh); got != fit.Dist || sh.Dist() != fit.Dist {
			t.Errorf("%s: New(%+v) = %#v, the fit gave %#v", fam.Name, sh, got, fit.Dist)
		}
	}
}

func TestFamilyRegistry(t *testing.T) {
	t.Parallel()
	if got := FamilyNames(); !slices.Equal(got, []string{"normal", "t", "skew-t", "bootstrap"}) {
		t.Errorf("FamilyNames() = %q", got)
	}
	fs := Families()
	fs[0].Name = "changed"
	if Families()[0].Name != FamilyNormal {
		t.Error("Families returns the registry itself, not a copy")
	}
	if _, ok := LookupFamily("cauchy"); ok {
		t.Error("an unknown family was found")
	}
	for name, want := range map[string]string{"normal": "normal", "t": "Student-t", "skew-t": "skewed Student-t",
		"bootstrap": "seasonal bootstrap", "cauchy": "cauchy"} {
		if got := FamilyLabel(name); got != want {
			t.Errorf("FamilyLabel(%q) = %q, want %q", name, got, want)
		}
	}
	for _, c := range []struct {
		s           Shocks
		shape, text string
		json        string
	}{
		{Shocks{Family: FamilyNormal}, "", "standard normal", `{"family":"normal","df":null,"skew":1}`},
		{Shocks{Family: FamilyStudentT, DF: 7.123}, "ν = 7.12", "unit-variance Student-t, ν = 7.12",
			`{"family":"t","df":7.123,"skew":1}`},
		{Shocks{Family: FamilySkewT, DF: 7.123, Skew: 0.9126}, "ν = 7.12, ξ = 0.913",
			"unit-variance skewed Student-t, ν = 7.12, ξ = 0.913 (ξ < 1: longer cold tail)",
			`{"family":"skew-t","df":7.123,"skew":0.9126}`},
		{Shocks{Family: FamilyBootstrap, ByMonth: [][]float64{{0.5}}}, "",
			"seasonal bootstrap of the standardized innovations (same calendar month)",
			`{"family":"bootstrap","df":null,"skew":null,"by_month":[[0.5]]}`},
	} {
		if got := c.s.ShapeText(); got != c.shape {
			t.Errorf("%s: ShapeText %q, want %q", c.s.Family, got, c.shape)
		}
		if got := c.s.Text(); got != c.text {
			t.Errorf("%s: Text %q, want %q", c.s.Family, got, c.text)
		}
		b, err := json.Marshal(c.s)
		if err != nil || string(b) != c.json {
			t.Errorf("%s: JSON %s (%v), want %s", c.s.Family, b, err, c.json)
		}
	}
}

// Validate names the valid families from the registry.
func TestValidateUnknownFamily(t *testing.T) {
	t.Parallel()
	f := valid()
	f.Shocks = Shocks{Family: "cauchy"}
	err := f.Validate("m.json")
	if err == nil || !strings.Contains(err.Error(), "key shocks.family") || !strings.Contains(err.Error(), "normal, t, skew-t, bootstrap") {
		t.Errorf("error %v", err)
	}
}
