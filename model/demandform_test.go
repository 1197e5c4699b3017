package model

import (
	"slices"
	"strconv"
	"testing"
)

// The change-point forms are named by their parameter count (ASHRAE
// Guideline 14-2014, annex D; from memory): β0 plus slopes plus balance
// points, so 3p = β0 + one slope + one balance point, 4p = β0 + two slopes
// + one shared balance point, 5p = β0 + two slopes + two balance points.
func TestDemandFormParameterCount(t *testing.T) {
	t.Parallel()
	for _, f := range AllDemandForms() {
		n, err := strconv.Atoi(string(f)[:1])
		if err != nil {
			t.Fatalf("form %q is not named by its parameter count", f)
		}
		if got := 1 + f.Params(); got != n {
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
		{Form3PHeating, true, false, 1, 1}, {Form3PCooling, false, true, 1, 1}, {Form4P, true, true, 2, 1}, {Form5P, true, true, 2, 2},
	} {
		if c.f.HasHeating() != c.heating || c.f.HasCooling() != c.cooling || c.f.Slopes() != c.slopes || c.f.BalancePoints() != c.balancePoints {
			t.Errorf("%s: heating %v, cooling %v, %d slopes, %d balance points", c.f, c.f.HasHeating(), c.f.HasCooling(), c.f.Slopes(), c.f.BalancePoints())
		}
	}
	if !slices.Equal(DemandFormNames(), []string{"3p-heating", "3p-cooling", "4p", "5p"}) {
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
