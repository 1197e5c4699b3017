package sim

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"testing"

	"wxstress/evidence"
)

// Golden values: testdata/tail_golden.json, written by testdata/tail_golden.R
// with R 4.2.2: quantile(x, probs, type = 4), the empirical expected
// shortfall as the mean of the worst ceiling(a·n) values, mean and sd.
type tailGolden struct {
	X          []float64
	Quantiles  []float64 `json:"quantile_type4"`
	ReturnHigh []float64 `json:"return_high_type4"`
	ReturnLow  []float64 `json:"return_low_type4"`
	ES95High   float64   `json:"es95_high"`
	ES99High   float64   `json:"es99_high"`
	ES95Low    float64   `json:"es95_low"`
	ES99Low    float64   `json:"es99_low"`
	Mean, SD   float64
	Exceed600  float64 `json:"exceed_600"`
	Below100   float64 `json:"below_100"`
}

const tolTail = 1e-12 // relative: the same arithmetic as R

func TestSummarizeMatchesR(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("testdata/tail_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g tailGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	check := func(what string, got, want float64) {
		t.Helper()
		if math.Abs(got-want) > tolTail*math.Abs(want) {
			t.Errorf("%s = %.15g, R gives %.15g", what, got, want)
		}
	}
	hi := Summarize(g.X, true, []float64{600})
	lo := Summarize(g.X, false, []float64{100})
	// The golden arrays are in the order of the probabilities and periods
	// tail_golden.R lists, which are TailQuantileProbs and TailReturnPeriods.
	probs, periods := TailQuantileProbs(), TailReturnPeriods()
	if len(g.Quantiles) != len(probs) || len(g.ReturnHigh) != len(periods) || len(g.ReturnLow) != len(periods) {
		t.Fatalf("golden file has %d quantiles and %d/%d return levels", len(g.Quantiles), len(g.ReturnHigh), len(g.ReturnLow))
	}
	for i, p := range probs {
		check(fmt.Sprintf("quantile %v", p), hi.Quantile(p), g.Quantiles[i])
	}
	for i, T := range periods {
		check(fmt.Sprintf("%v-year return level (high adverse)", T), hi.ReturnLevel(T), g.ReturnHigh[i])
		check(fmt.Sprintf("%v-year return level (low adverse)", T), lo.ReturnLevel(T), g.ReturnLow[i])
	}
	check("ES95 high", hi.ES95, g.ES95High)
	check("ES99 high", hi.ES99, g.ES99High)
	check("ES95 low", lo.ES95, g.ES95Low)
	check("ES99 low", lo.ES99, g.ES99Low)
	check("mean", hi.Mean, g.Mean)
	check("sd", hi.SD, g.SD)
	check("P(x > 600)", hi.Exceedances[0].Prob, g.Exceed600)
	check("P(x < 100)", lo.Exceedances[0].Prob, g.Below100)
	check("VaR95 = P95", hi.VaR95, g.Quantiles[7])    // probs[7] = 0.95
	check("VaR95 low = P5", lo.VaR95, g.Quantiles[1]) // probs[1] = 0.05
}

func TestSummarizeDoesNotReorderInput(t *testing.T) {
	t.Parallel()
	x := []float64{3, 1, 2}
	Summarize(x, true, nil)
	if x[0] != 3 || x[1] != 1 || x[2] != 2 {
		t.Errorf("input reordered: %v", x)
	}
}

func TestExceedanceCountsTiesOnTheSafeSide(t *testing.T) {
	t.Parallel()
	// "Worse than" is strict: a year exactly at the threshold does not exceed it.
	x := []float64{1, 2, 2, 2, 3}
	if p := Summarize(x, true, []float64{2}).Exceedances[0].Prob; p != 0.2 {
		t.Errorf("P(x > 2) = %v, want 0.2", p)
	}
	if p := Summarize(x, false, []float64{2}).Exceedances[0].Prob; p != 0.2 {
		t.Errorf("P(x < 2) = %v, want 0.2", p)
	}
}

// Tail.Quantile and Tail.ReturnLevel refuse a column the table does not have.
func TestTailPanicsOnMissingColumn(t *testing.T) {
	t.Parallel()
	tail := Summarize([]float64{1, 2, 3, 4}, true, nil)
	for name, f := range map[string]func(){
		"Quantile(0.3)":     func() { tail.Quantile(0.3) },
		"ReturnLevel(25)":   func() { tail.ReturnLevel(25) },
		"zero Tail":         func() { Tail{}.Quantile(0.5) },
		"zero Tail, levels": func() { Tail{}.ReturnLevel(20) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s did not panic", name)
				}
			}()
			f()
		}()
	}
	if tail.Quantile(0.5) != tail.Quantiles[4] || tail.ReturnLevel(100) != tail.ReturnLevels[5] {
		t.Error("Quantile or ReturnLevel reads the wrong column")
	}
}

// TestSelectionMatchesSorting checks the tail table built by selection
// against the same statistics read from the fully sorted values: every
// quantile, return level, value at risk and standard error exactly, the
// expected shortfalls and the mean to rounding.
func TestSelectionMatchesSorting(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	for _, n := range []int{1, 2, 7, 100, 5000, 100_000} {
		for _, high := range []bool{true, false} {
			x := make([]float64, n)
			for i := range x {
				x[i] = math.Round(rng.NormFloat64()*100) / 10 // ties
			}
			got := SummarizeWith(x, high, []float64{0.5}, []float64{3, 30})
			s := slices.Sorted(slices.Values(x))
			adv := func(p float64) float64 {
				if high {
					return p
				}
				return 1 - p
			}
			for i, p := range tailProbs {
				if w := evidence.SortedQuantile(p, s); got.Quantiles[i] != w {
					t.Errorf("n %d: quantile %v = %v, sorted %v", n, p, got.Quantiles[i], w)
				}
				if n >= 2 {
					if w := evidence.QuantileSorted(s, p).SE; got.QuantileSE[i] != w && !(math.IsNaN(w) && math.IsNaN(got.QuantileSE[i])) {
						t.Errorf("n %d: s.e. of quantile %v = %v, sorted %v", n, p, got.QuantileSE[i], w)
					}
				}
			}
			for _, T := range []float64{3, 20, 30, 50, 100} {
				if w := evidence.SortedQuantile(adv(1-1/T), s); got.ReturnLevel(T) != w {
					t.Errorf("n %d, high %v: 1-in-%v = %v, sorted %v", n, high, T, got.ReturnLevel(T), w)
				}
			}
			if w := evidence.SortedQuantile(adv(0.99), s); got.VaR99 != w {
				t.Errorf("n %d: VaR99 %v, sorted %v", n, got.VaR99, w)
			}
			if w := shortfall(s, 0.05, high); math.Abs(got.ES95-w) > 1e-12*math.Max(1, math.Abs(w)) {
				t.Errorf("n %d, high %v: ES95 %v, sorted %v", n, high, got.ES95, w)
			}
			if w := shortfall(s, 0.01, high); math.Abs(got.ES99-w) > 1e-12*math.Max(1, math.Abs(w)) {
				t.Errorf("n %d, high %v: ES99 %v, sorted %v", n, high, got.ES99, w)
			}
		}
	}
}
