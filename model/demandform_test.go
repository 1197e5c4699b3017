package model

import (
	"slices"
	"testing"
)

// The change-point forms of ASHRAE Guideline 14-2014, annex D (from memory)
// count β0 plus slopes plus balance points: three parameters for a one-sided
// form (one slope, one balance point), four for heating-and-cooling (two
// slopes, one shared balance point), five for heating-and-cooling-band (two
// slopes, two balance points).
func TestDemandFormParameterCount(t *testing.T) {
	t.Parallel()
	want := map[DemandForm]int{FormHeatingOnly: 3, FormCoolingOnly: 3, FormHeatingCooling: 4, FormHeatingCoolingBand: 5}
	for _, f := range AllDemandForms() {
		if got, n := 1+f.Params(), want[f]; got != n {
			t.Errorf("%s: 1 + Params() = %d", f, got)
		}
		if f.Formula() == "" || f.Description() == "" || !f.Valid() {
			t.Errorf("%s: formula %q, description %q", f, f.Formula(), f.Description())
		}
	}
	for _, c := range []struct {
		f                     DemandForm
		heating, cooling      bool
		slopes, balancePoints int
	}{
		{FormHeatingOnly, true, false, 1, 1}, {FormCoolingOnly, false, true, 1, 1}, {FormHeatingCooling, true, true, 2, 1}, {FormHeatingCoolingBand, true, true, 2, 2},
	} {
		if c.f.HasHeating() != c.heating || c.f.HasCooling() != c.cooling || c.f.Slopes() != c.slopes || c.f.BalancePoints() != c.balancePoints {
			t.Errorf("%s: heating %v, cooling %v, %d slopes, %d balance points", c.f, c.f.HasHeating(), c.f.HasCooling(), c.f.Slopes(), c.f.BalancePoints())
		}
	}
	if !slices.Equal(DemandFormNames(), []string{"heating-only", "cooling-only", "heating-and-cooling", "heating-and-cooling-band"}) {
		t.Errorf("DemandFormNames() = %q", DemandFormNames())
	}
	if DemandForm("6p").Valid() || DemandForm("").Valid() {
		t.Error("an unknown form is valid")
	}
	defer func() {
		if recover() == nil {
			t.Error("HasHeating of an unknown form did not panic")
		}
	}()
	DemandForm("6p").HasHeating()
}
