package diagnose

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// TestKolmogorovExact checks the exact law of D_n against SciPy's kstwo
// (diagnose/testdata/ks_exact.py made the golden file) over n from 1 to 99
// and d across the range, to 1e-9 absolute, and in the far upper tail to
// 1e-6 relative.
func TestKolmogorovExact(t *testing.T) {
	b, err := os.ReadFile("testdata/ks_exact.json")
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Cases, Tail []struct {
			N     int
			D, SF float64
		}
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	if len(g.Cases) < 100 {
		t.Fatalf("only %d golden cases", len(g.Cases))
	}
	for _, c := range g.Cases {
		if got := 1 - kolmogorovExactCDF(c.N, c.D); math.Abs(got-c.SF) > 1e-9 {
			t.Errorf("P(D_%d ≥ %g) = %.12g, SciPy %.12g", c.N, c.D, got, c.SF)
		}
	}
	// Far in the tail (down to 1e-23) the complement has cancelled; the
	// one-sided sum keeps the p-value to 1e-6 relative.
	if len(g.Tail) < 5 {
		t.Fatalf("only %d tail cases", len(g.Tail))
	}
	for _, c := range g.Tail {
		if got := kolmogorovExactSF(c.N, c.D); math.Abs(got/c.SF-1) > 1e-6 {
			t.Errorf("tail P(D_%d ≥ %g) = %.10g, SciPy %.10g", c.N, c.D, got, c.SF)
		}
	}
}

// TestKolmogorovSmirnovExactUsesIt: below ExactBelow values without ties
// the p-value is the exact one (lower than the asymptotic at n = 10), from
// ExactBelow on or with ties it is KolmogorovSmirnov's.
func TestKolmogorovSmirnovExactUsesIt(t *testing.T) {
	uniform := func(u float64) float64 { return min(max(u, 0), 1) }
	x := []float64{0.05, 0.12, 0.2, 0.33, 0.41, 0.47, 0.8, 0.86, 0.9, 0.99}
	exact, asym := KolmogorovSmirnovExact(x, uniform), KolmogorovSmirnov(x, uniform)
	if exact.Stat != asym.Stat || !(exact.P < asym.P) || math.Abs(exact.P-(1-kolmogorovExactCDF(10, exact.Stat))) > 1e-15 {
		t.Errorf("n = 10: exact %+v, asymptotic %+v", exact, asym)
	}
	tied := append([]float64{0.05}, x...)
	if got, want := KolmogorovSmirnovExact(tied, uniform), KolmogorovSmirnov(tied, uniform); got != want {
		t.Errorf("ties: %+v, want the asymptotic %+v", got, want)
	}
	big := make([]float64, ExactBelow)
	for i := range big {
		big[i] = (float64(i) + 0.3) / ExactBelow
	}
	if got, want := KolmogorovSmirnovExact(big, uniform), KolmogorovSmirnov(big, uniform); got != want {
		t.Errorf("n = %d: %+v, want the asymptotic %+v", ExactBelow, got, want)
	}
}
