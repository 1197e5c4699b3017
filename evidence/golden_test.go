package evidence

import (
	"encoding/json"
	"math"
	"os"
	"testing"
)

// Golden values: testdata/golden.json, written by testdata/golden.R with
// R 4.2.2 (run it from testdata: Rscript golden.R).
type golden struct {
	CRPSNormal []struct {
		Mu, Sigma, Y     float64
		Closed, Integral float64
	} `json:"crps_normal"`
	CRPSSample []struct {
		X            []float64
		Y            float64
		Fair, Plugin float64
	} `json:"crps_sample"`
	Binom []struct {
		K, N      int
		P, PValue float64
	}
	OrderCI []struct {
		N        int
		P        float64
		J, K     int
		Coverage float64
	} `json:"order_ci"`
}

func readGolden(t *testing.T) golden {
	t.Helper()
	b, err := os.ReadFile("testdata/golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g golden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	return g
}

const (
	tolSame     = 1e-12 // relative: the same formula evaluated in R
	tolIntegral = 1e-9  // relative: R's stats::integrate of the defining integral, rel.tol 1e-12
	tolPValue   = 1e-9  // relative: gonum's binomial against R's dbinom/pbinom
)

func relClose(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Abs(want)
}

func TestCRPSNormalMatchesR(t *testing.T) {
	t.Parallel()
	for _, c := range readGolden(t).CRPSNormal {
		got := CRPSNormal(c.Mu, c.Sigma, c.Y)
		// R 4.2.2: the closed form with pnorm/dnorm (golden.R).
		if !relClose(got, c.Closed, tolSame) {
			t.Errorf("CRPSNormal(%g, %g, %g) = %.17g, R closed form %.17g", c.Mu, c.Sigma, c.Y, got, c.Closed)
		}
		// R 4.2.2: ∫ (F(x) − 1{x ≥ y})² dx by stats::integrate (golden.R).
		if !relClose(got, c.Integral, tolIntegral) {
			t.Errorf("CRPSNormal(%g, %g, %g) = %.17g, R integral %.17g", c.Mu, c.Sigma, c.Y, got, c.Integral)
		}
	}
}

func TestSampleCRPSMatchesR(t *testing.T) {
	t.Parallel()
	// R 4.2.2: the O(n²) double sum with outer() (golden.R).
	for _, c := range readGolden(t).CRPSSample {
		if got := CRPS(c.X, c.Y); !relClose(got, c.Fair, tolSame) {
			t.Errorf("CRPS(%v, %g) = %.17g, R %.17g", c.X, c.Y, got, c.Fair)
		}
		if got := CRPSEmpirical(c.X, c.Y); !relClose(got, c.Plugin, tolSame) {
			t.Errorf("CRPSEmpirical(%v, %g) = %.17g, R %.17g", c.X, c.Y, got, c.Plugin)
		}
	}
}

func TestBinomialTestMatchesR(t *testing.T) {
	t.Parallel()
	// R 4.2.2: binom.test(k, n, p)$p.value (golden.R).
	for _, c := range readGolden(t).Binom {
		if got := BinomialTest(c.K, c.N, c.P); !relClose(got, c.PValue, tolPValue) {
			t.Errorf("BinomialTest(%d, %d, %g) = %.17g, R binom.test %.17g", c.K, c.N, c.P, got, c.PValue)
		}
	}
}

func TestQuantileRanksMatchR(t *testing.T) {
	t.Parallel()
	// R 4.2.2: exhaustive search of pbinom for the ranks (golden.R).
	for _, c := range readGolden(t).OrderCI {
		x := make([]float64, c.N)
		for i := range x {
			x[i] = float64(i + 1) // X₍ᵢ₎ = i shows the ranks directly
		}
		q := Quantile(x, c.P)
		if q.J != c.J || q.K != c.K {
			t.Errorf("N = %d, p = %g: ranks (%d, %d), R (%d, %d)", c.N, c.P, q.J, q.K, c.J, c.K)
		}
		if !relClose(q.Coverage, c.Coverage, tolPValue) {
			t.Errorf("N = %d, p = %g: coverage %.17g, R %.17g", c.N, c.P, q.Coverage, c.Coverage)
		}
		if q.J >= 1 && q.Lo != float64(q.J) || q.K <= c.N && q.Hi != float64(q.K) {
			t.Errorf("N = %d, p = %g: interval [%g, %g] is not X₍%d₎, X₍%d₎", c.N, c.P, q.Lo, q.Hi, q.J, q.K)
		}
		if q.J == 0 && !math.IsInf(q.Lo, -1) || q.K == c.N+1 && !math.IsInf(q.Hi, 1) {
			t.Errorf("N = %d, p = %g: missing bound not infinite: [%g, %g]", c.N, c.P, q.Lo, q.Hi)
		}
	}
}
