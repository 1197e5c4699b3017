package diagnose

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"wxstress/model"

	"gonum.org/v1/gonum/stat/distuv"
)

// Every reference value in this file comes from testdata/golden.json, written
// by testdata/golden.R under R 4.2.2 (2022-11-10 r83330); the R call behind
// each value is stored beside it in the JSON and quoted in the test below.

const (
	// tolSame is the relative tolerance where Go and R carry out the same
	// arithmetic and differ only in summation order and rounding.
	tolSame = 1e-10
	// tolSameAbs is the absolute floor for values that are near zero on an
	// O(1) scale (autocorrelations, quantiles near the median).
	tolSameAbs = 1e-13
	// tolChiSq is the relative tolerance between gonum's and R's upper
	// incomplete gamma function (different algorithms).
	tolChiSq = 1e-9
	// tolRPValue is the absolute tolerance against p-values that R computes
	// as 1 − pchisq(Q, df), which loses everything below about 1e-16.
	tolRPValue = 1e-14
	// tolKSRTruncation is the absolute tolerance against ks.test's own
	// p-value: R sums the Kolmogorov series only to tol = 1e-6, with a single
	// term below √n·D = 1, which is up to 3e-5 off near 1.
	tolKSRTruncation = 5e-5
	// tolQuantile is the relative tolerance between gonum's and R's inverse
	// regularized incomplete beta function (Student-t quantiles).
	tolQuantile = 1e-9
)

type goldenVector struct {
	Call  string    `json:"call"`
	Value []float64 `json:"value"`
}

type goldenScalar struct {
	Call  string  `json:"call"`
	Value float64 `json:"value"`
}

type goldenTest struct {
	Call      string   `json:"call"`
	Statistic float64  `json:"statistic"`
	DF        float64  `json:"df"`
	P         float64  `json:"p"`
	PAccurate *float64 `json:"p_accurate"`
}

type goldenFile struct {
	Generator string                  `json:"generator"`
	Vectors   map[string]goldenVector `json:"vectors"`
	Tests     map[string]goldenTest   `json:"tests"`
	Scalars   map[string]goldenScalar `json:"scalars"`
}

func loadGolden(t *testing.T) goldenFile {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "golden.json"))
	if err != nil {
		t.Fatal(err)
	}
	var g goldenFile
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatalf("golden.json: %v", err)
	}
	return g
}

func (g goldenFile) vector(t *testing.T, name string) goldenVector {
	t.Helper()
	v, ok := g.Vectors[name]
	if !ok {
		t.Fatalf("golden.json has no vector %q", name)
	}
	return v
}

func (g goldenFile) test(t *testing.T, name string) goldenTest {
	t.Helper()
	v, ok := g.Tests[name]
	if !ok {
		t.Fatalf("golden.json has no test %q", name)
	}
	return v
}

func (g goldenFile) scalar(t *testing.T, name string) goldenScalar {
	t.Helper()
	v, ok := g.Scalars[name]
	if !ok {
		t.Fatalf("golden.json has no scalar %q", name)
	}
	return v
}

// readColumns reads a CSV with a header row; "NA" is a missing value (NaN).
func readColumns(t *testing.T, file string) map[string][]float64 {
	t.Helper()
	f, err := os.Open(filepath.Join("testdata", file))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", file, err)
	}
	cols := make(map[string][]float64)
	for _, row := range rows[1:] {
		for j, field := range row {
			v := math.NaN()
			if field != "NA" {
				v, err = strconv.ParseFloat(field, 64)
				if err != nil {
					t.Fatalf("%s: %v", file, err)
				}
			}
			cols[rows[0][j]] = append(cols[rows[0][j]], v)
		}
	}
	return cols
}

type series struct{ ar, gaps, shock []float64 }

func loadSeries(t *testing.T) series {
	t.Helper()
	ar1 := readColumns(t, "ar1.csv")
	shocks := readColumns(t, "shocks.csv")
	s := series{ar: ar1["ar"], gaps: ar1["gaps"], shock: shocks["shock"]}
	if len(s.ar) != 1500 || len(s.gaps) != 1500 || len(s.shock) != 400 {
		t.Fatalf("series lengths %d, %d, %d; want 1500, 1500, 400", len(s.ar), len(s.gaps), len(s.shock))
	}
	if countPresent(s.gaps) == len(s.gaps) {
		t.Fatal("gaps series has no missing days")
	}
	return s
}

func near(got, want, rel, abs float64) bool {
	return math.Abs(got-want) <= abs+rel*math.Abs(want)
}

func checkVector(t *testing.T, got []float64, want goldenVector, rel, abs float64) {
	t.Helper()
	if len(got) != len(want.Value) {
		t.Fatalf("%s: got %d values, want %d", want.Call, len(got), len(want.Value))
	}
	for i := range got {
		if !near(got[i], want.Value[i], rel, abs) {
			t.Errorf("%s: [%d] = %.17g, want %.17g", want.Call, i, got[i], want.Value[i])
		}
	}
}

func square(x []float64) []float64 {
	y := make([]float64, len(x))
	for i, v := range x {
		y[i] = v * v
	}
	return y
}

func TestACFGolden(t *testing.T) {
	t.Parallel()
	g, s := loadGolden(t), loadSeries(t)
	for _, c := range []struct {
		name string
		x    []float64
	}{
		{"acf_ar", s.ar},        // acf(ar, lag.max = 30, plot = FALSE, na.action = na.pass)
		{"acf_gaps", s.gaps},    // acf(gaps, lag.max = 30, plot = FALSE, na.action = na.pass)
		{"acf_shocks", s.shock}, // acf(shock, lag.max = 30, plot = FALSE, na.action = na.pass)
	} {
		checkVector(t, ACF(c.x, 30), g.vector(t, c.name), tolSame, tolSameAbs)
	}
}

func TestPACFGolden(t *testing.T) {
	t.Parallel()
	g, s := loadGolden(t), loadSeries(t)
	for _, c := range []struct {
		name string
		x    []float64
	}{
		{"pacf_ar", s.ar},        // pacf(ar, lag.max = 30, plot = FALSE, na.action = na.pass)
		{"pacf_gaps", s.gaps},    // pacf(gaps, lag.max = 30, plot = FALSE, na.action = na.pass)
		{"pacf_shocks", s.shock}, // pacf(shock, lag.max = 30, plot = FALSE, na.action = na.pass)
	} {
		checkVector(t, PACF(ACF(c.x, 30)), g.vector(t, c.name), tolSame, tolSameAbs)
	}
}

func checkTest(t *testing.T, got model.Test, want goldenTest, relStat float64) {
	t.Helper()
	if !near(got.Stat, want.Statistic, relStat, 0) {
		t.Errorf("%s: statistic %.17g, want %.17g", want.Call, got.Stat, want.Statistic)
	}
	if got.DF != want.DF {
		t.Errorf("%s: DF %v, want %v", want.Call, got.DF, want.DF)
	}
}

func TestLjungBoxGolden(t *testing.T) {
	t.Parallel()
	g, s := loadGolden(t), loadSeries(t)
	for _, c := range []struct {
		name        string
		x           []float64
		lags, fitdf int
	}{
		{"lb_ar_10_0", s.ar, 10, 0},                 // Box.test(ar, lag = 10, type = "Ljung-Box", fitdf = 0)
		{"lb_ar_20_1", s.ar, 20, 1},                 // Box.test(ar, lag = 20, type = "Ljung-Box", fitdf = 1)
		{"lb_ar2_10_0", square(s.ar), 10, 0},        // Box.test(ar^2, lag = 10, type = "Ljung-Box", fitdf = 0)
		{"lb_ar2_20_1", square(s.ar), 20, 1},        // Box.test(ar^2, lag = 20, type = "Ljung-Box", fitdf = 1)
		{"lb_gaps_10_0", s.gaps, 10, 0},             // Box.test(gaps, lag = 10, type = "Ljung-Box", fitdf = 0)
		{"lb_gaps_20_1", s.gaps, 20, 1},             // Box.test(gaps, lag = 20, type = "Ljung-Box", fitdf = 1)
		{"lb_shocks_10_0", s.shock, 10, 0},          // Box.test(shock, lag = 10, type = "Ljung-Box", fitdf = 0)
		{"lb_shocks_20_1", s.shock, 20, 1},          // Box.test(shock, lag = 20, type = "Ljung-Box", fitdf = 1)
		{"lb_shocks2_10_0", square(s.shock), 10, 0}, // Box.test(shock^2, lag = 10, type = "Ljung-Box", fitdf = 0)
		{"lb_shocks2_20_1", square(s.shock), 20, 1}, // Box.test(shock^2, lag = 20, type = "Ljung-Box", fitdf = 1)
	} {
		want := g.test(t, c.name)
		got := LjungBox(c.x, c.lags, c.fitdf)
		checkTest(t, got, want, tolSame)
		// p_accurate: pchisq(Q, df, lower.tail = FALSE) in R.
		if !near(got.P, *want.PAccurate, tolChiSq, 0) {
			t.Errorf("%s: p %.17g, want pchisq upper tail %.17g", want.Call, got.P, *want.PAccurate)
		}
		// p: Box.test's own 1 - pchisq(Q, df).
		if !near(got.P, want.P, 0, tolRPValue) {
			t.Errorf("%s: p %.17g, want Box.test p.value %.17g", want.Call, got.P, want.P)
		}
	}
}

func TestMomentsGolden(t *testing.T) {
	t.Parallel()
	g, s := loadGolden(t), loadSeries(t)
	for _, c := range []struct {
		skew, kurt, jb string
		x              []float64
	}{
		// mean((x - mean(x))^3) / mean((x - mean(x))^2)^1.5, mean((x - mean(x))^4) / mean((x - mean(x))^2)^2 - 3,
		// and n/6 * (g1^2 + g2^2/4) with pchisq(JB, 2, lower.tail = FALSE), NA dropped.
		{"skew_ar", "kurt_ar", "jb_ar", s.ar},
		{"skew_gaps", "kurt_gaps", "jb_gaps", s.gaps},
		{"skew_shocks", "kurt_shocks", "jb_shocks", s.shock},
	} {
		if want := g.scalar(t, c.skew); !near(Skewness(c.x), want.Value, tolSame, tolSameAbs) {
			t.Errorf("%s: got %.17g, want %.17g", want.Call, Skewness(c.x), want.Value)
		}
		if want := g.scalar(t, c.kurt); !near(ExcessKurtosis(c.x), want.Value, tolSame, tolSameAbs) {
			t.Errorf("%s: got %.17g, want %.17g", want.Call, ExcessKurtosis(c.x), want.Value)
		}
		want := g.test(t, c.jb)
		got := JarqueBera(c.x)
		checkTest(t, got, want, tolSame)
		if !near(got.P, want.P, tolChiSq, 0) {
			t.Errorf("%s: p %.17g, want %.17g", want.Call, got.P, want.P)
		}
	}
}

func TestKolmogorovSmirnovGolden(t *testing.T) {
	t.Parallel()
	g, s := loadGolden(t), loadSeries(t)
	nu := 5.0
	for _, c := range []struct {
		name string
		x    []float64
		cdf  func(float64) float64
	}{
		// ks.test(shock, "pnorm", exact = FALSE)
		{"ks_shocks_norm", s.shock, distuv.UnitNormal.CDF},
		// ks.test(shock, function(q) pt(q / sqrt(3/5), df = 5), exact = FALSE)
		{"ks_shocks_t", s.shock, distuv.StudentsT{Mu: 0, Sigma: math.Sqrt((nu - 2) / nu), Nu: nu}.CDF},
		// ks.test(shock, "pnorm", mean = 0.25, exact = FALSE)
		{"ks_shocks_shifted", s.shock, distuv.Normal{Mu: 0.25, Sigma: 1}.CDF},
		// ks.test(gaps, "pnorm", sd = sqrt(1/0.51), exact = FALSE)
		{"ks_gaps_norm", s.gaps, distuv.Normal{Mu: 0, Sigma: math.Sqrt(1 / 0.51)}.CDF},
		// ks.test(ar, "pnorm", exact = FALSE)
		{"ks_ar_norm", s.ar, distuv.UnitNormal.CDF},
	} {
		want := g.test(t, c.name)
		got := KolmogorovSmirnov(c.x, c.cdf)
		checkTest(t, got, want, tolSame)
		// p_accurate: P(K > sqrt(n) D) summed in R to double precision.
		if !near(got.P, *want.PAccurate, tolSame, 0) {
			t.Errorf("%s: p %.17g, want %.17g", want.Call, got.P, *want.PAccurate)
		}
		// p: ks.test's own truncated series.
		if !near(got.P, want.P, 0, tolKSRTruncation) {
			t.Errorf("%s: p %.17g, want ks.test p.value %.17g", want.Call, got.P, want.P)
		}
	}
}

func TestQQGolden(t *testing.T) {
	t.Parallel()
	g, s := loadGolden(t), loadSeries(t)

	theo, sample := QQ(s.shock, distuv.UnitNormal.Quantile)
	// sort(qqnorm(shock, plot.it = FALSE)$x): ppoints(400) is (i - 0.5)/400.
	checkVector(t, theo, g.vector(t, "qq_shocks_norm_theoretical"), tolSame, tolSameAbs)
	// sort(qqnorm(shock, plot.it = FALSE)$y)
	checkVector(t, sample, g.vector(t, "qq_shocks_norm_sample"), 0, 0)

	nu := 5.0
	tq := distuv.StudentsT{Mu: 0, Sigma: math.Sqrt((nu - 2) / nu), Nu: nu}.Quantile
	theo, sample = QQ(s.gaps, tq)
	// qt(ppoints(sum(!is.na(gaps))), df = 5) * sqrt(3/5)
	checkVector(t, theo, g.vector(t, "qq_gaps_t_theoretical"), tolQuantile, tolSameAbs)
	if len(sample) != countPresent(s.gaps) {
		t.Errorf("QQ kept %d sample values, want %d", len(sample), countPresent(s.gaps))
	}
}

func TestConfidenceBoundGolden(t *testing.T) {
	t.Parallel()
	g := loadGolden(t)
	// qnorm((1 + 0.95)/2) / sqrt(1500), as plot.acf with ci = 0.95
	want := g.scalar(t, "confidence_bound_1500")
	if got := ConfidenceBound(1500); !near(got, want.Value, tolSame, 0) {
		t.Errorf("%s: got %.17g, want %.17g", want.Call, got, want.Value)
	}
}
