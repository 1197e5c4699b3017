package sim

import (
	"context"
	"testing"

	"wxstress/model"
)

// TestCompareAdverseSide: a scenario's quantile changes are taken on each
// index's adverse side, as its ES and return level are: for the coldest day
// the change of the cold P5 (VaR95 = 1-in-20), which a warming of Δ moves by
// +Δ exactly, path by path; for HDD the high P95.
func TestCompareAdverseSide(t *testing.T) {
	t.Parallel()
	m := flatModel(5, 0.7, 2.5, model.FamilyStudentT, 8)
	warm := flatModel(6, 0.7, 2.5, model.FamilyStudentT, 8) // the same climate 1 °C warmer
	cfg := Config{Paths: 4000, Seed: 3, Periods: []string{"jan"}, Bases: BasesFor(model.Celsius)}
	base, err := Run(context.Background(), m, cfg)
	if err != nil {
		t.Fatal(err)
	}
	scen, err := Run(context.Background(), warm, cfg)
	if err != nil {
		t.Fatal(err)
	}
	br, sr := base.Summarize(model.Celsius, nil), scen.Summarize(model.Celsius, nil)
	for k, c := range Compare(base, scen, br, sr) {
		switch br[k].Index {
		case Coldest:
			if d := c.VaR95 - 1; d*d > 1e-20 || c.VaR95 != c.RL20 {
				t.Errorf("coldest day: VaR95 change %v, RL20 change %v; want +1 on the cold side", c.VaR95, c.RL20)
			}
			if want := sr[k].Tail.Quantile(0.01) - br[k].Tail.Quantile(0.01); c.VaR99 != want {
				t.Errorf("coldest day: VaR99 change %v, want the P1's %v", c.VaR99, want)
			}
		case HDD:
			if want := sr[k].Tail.Quantile(0.95) - br[k].Tail.Quantile(0.95); c.VaR95 != want {
				t.Errorf("HDD: VaR95 change %v, want the P95's %v", c.VaR95, want)
			}
		}
	}
}
