package evidence

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

const tolBrute = 1e-12 // relative: O(n log n) sum against the O(n²) double sum

// bruteCRPS is the definition E|X − y| − ½E|X − X′| with the double sum over
// all ordered pairs, divided by n(n−1) (fair) or n².
func bruteCRPS(x []float64, y float64, fair bool) float64 {
	n := float64(len(x))
	var abs, pairs float64
	for _, a := range x {
		abs += math.Abs(a - y)
		for _, b := range x {
			pairs += math.Abs(a - b)
		}
	}
	div := n * n
	if fair {
		div = n * (n - 1)
	}
	return abs/n - pairs/(2*div)
}

func TestCRPSMatchesDoubleSum(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := range 200 {
		n := 2 + rng.IntN(40)
		x := make([]float64, n)
		for i := range x {
			x[i] = 2450 + 60*rng.NormFloat64()
			if trial%3 == 0 {
				x[i] = math.Round(x[i] / 20) // many ties
			}
		}
		y := x[rng.IntN(n)] + float64(rng.IntN(3)-1)*rng.Float64()*50
		orig := slices.Clone(x)
		for _, fair := range []bool{true, false} {
			got := CRPSEmpirical(x, y)
			if fair {
				got = CRPS(x, y)
			}
			if want := bruteCRPS(x, y, fair); !relClose(got, want, tolBrute) {
				t.Fatalf("trial %d fair=%v: CRPS = %.17g, double sum %.17g", trial, fair, got, want)
			}
		}
		if !slices.Equal(x, orig) {
			t.Fatalf("trial %d: sample modified", trial)
		}
	}
}

func TestCRPSOfLargeNormalSampleMatchesClosedForm(t *testing.T) {
	t.Parallel()
	const (
		n         = 200_000
		mu, sigma = 10.0, 3.0
		tolSigmas = 4 // Monte Carlo standard errors
	)
	rng := rand.New(rand.NewPCG(3, 4))
	x := make([]float64, n)
	for i := range x {
		x[i] = mu + sigma*rng.NormFloat64()
	}
	// g(v) = E|v − X′| for X′ ~ N(μ, σ²), the closed form of the CRPS plus
	// σ/√π; the fair estimator's first-order (Hájek) projection is
	// (1/n) Σ (|xᵢ − y| − g(xᵢ)), whose standard deviation gives its s.e.
	g := func(v float64) float64 { return CRPSNormal(mu, sigma, v) + sigma/math.Sqrt(math.Pi) }
	for _, y := range []float64{10, 4, 13.5, 25} {
		h := make([]float64, n)
		for i, v := range x {
			h[i] = math.Abs(v-y) - g(v)
		}
		se := stat.StdDev(h, nil) / math.Sqrt(n)
		got, want := CRPS(x, y), CRPSNormal(mu, sigma, y) // Gneiting et al. 2005, checked against R in golden_test.go
		if math.Abs(got-want) > tolSigmas*se {
			t.Errorf("y = %g: sample CRPS %.6f, closed form %.6f, differ by %.2g s.e. (s.e. %.2g)",
				y, got, want, math.Abs(got-want)/se, se)
		}
	}
}

func TestCRPSNormalDegenerate(t *testing.T) {
	t.Parallel()
	// σ → 0 is the absolute error of a point forecast (Gneiting and Raftery 2007, §4.2).
	if got := CRPSNormal(3, 0, 1); got != 2 {
		t.Errorf("CRPSNormal(3, 0, 1) = %v, want 2", got)
	}
	if got, want := CRPSNormal(3, 1e-9, 1), 2.0; math.Abs(got-want) > 1e-8 {
		t.Errorf("CRPSNormal(3, 1e-9, 1) = %v, want about %v", got, want)
	}
}

func TestPITMidRank(t *testing.T) {
	t.Parallel()
	// The definition (#{x < y} + ½#{x = y})/n worked by hand.
	x := []float64{3, 2, 1, 2}
	for _, c := range []struct{ y, want float64 }{
		{0, 0}, {1, 0.125}, {1.5, 0.25}, {2, 0.5}, {2.5, 0.75}, {3, 0.875}, {9, 1},
	} {
		if got := PIT(x, c.y); got != c.want {
			t.Errorf("PIT(%v, %g) = %g, want %g", x, c.y, got, c.want)
		}
	}
	if !math.IsNaN(PIT(x, math.NaN())) {
		t.Error("PIT of NaN is not NaN")
	}
}

func TestSummarizePITCounts(t *testing.T) {
	t.Parallel()
	// 30 PITs: 10 outside [0.05, 0.95], 16 inside [0.25, 0.75] (bounds included).
	var pits []float64
	for range 5 {
		pits = append(pits, 0.01, 0.99)
	}
	pits = append(pits, 0.05, 0.95, 0.2, 0.8)
	for range 8 {
		pits = append(pits, 0.25, 0.75)
	}
	s := SummarizePIT(pits, 100)
	if s.Central90.Inside != 20 || s.Central50.Inside != 16 || s.Cases != 30 {
		t.Fatalf("inside 90 %% = %d, inside 50 %% = %d, cases %d; want 20, 16, 30",
			s.Central90.Inside, s.Central50.Inside, s.Cases)
	}
	// p-values as R 4.2.2 binom.test(20, 30, 0.9) and binom.test(16, 30, 0.5);
	// BinomialTest itself is checked against R in golden_test.go.
	if s.Central90.P != BinomialTest(20, 30, 0.9) || s.Central50.P != BinomialTest(16, 30, 0.5) {
		t.Errorf("coverage p-values %g, %g", s.Central90.P, s.Central50.P)
	}
	want := "too narrow: realised values fall outside the 90 % band 10 of 30 times (expected 3)"
	if s.Verdict != want {
		t.Errorf("verdict %q, want %q", s.Verdict, want)
	}
	if s.Above != 15 || s.Untied != 30 || s.AboveP != 1 {
		t.Errorf("sign test: %d above of %d, p %g; want 15 of 30, p 1", s.Above, s.Untied, s.AboveP)
	}
}

func TestProbitClamp(t *testing.T) {
	t.Parallel()
	// PITs 0 and 1 of samples of 100 are clamped to 0.005 and 0.995:
	// Φ⁻¹(0.005) = −2.5758293035489 (R 4.2.2 qnorm(0.005)), and the sd of
	// {−a, a} is a√2.
	s := SummarizePIT([]float64{0, 1}, 100)
	if want := 2.5758293035489 * math.Sqrt2; math.Abs(s.ProbitSD-want) > 1e-9 {
		t.Errorf("probit sd %.12g, want %.12g", s.ProbitSD, want)
	}
	if !strings.HasPrefix(s.Verdict, "too few cases") {
		t.Errorf("verdict for 2 cases: %q", s.Verdict)
	}
}

// simulateVerdicts runs reps backtests of m cases, observations N(0, 1) and
// forecast samples of size n from N(shift, scale²), and returns the verdicts.
func simulateVerdicts(rng *rand.Rand, reps, m, n int, shift, scale float64) []*Backtest {
	out := make([]*Backtest, reps)
	for r := range out {
		cases := make([]Case, m)
		for i := range cases {
			s := make([]float64, n)
			for j := range s {
				s[j] = shift + scale*rng.NormFloat64()
			}
			cases[i] = Case{Sample: s, Observed: rng.NormFloat64()}
		}
		b, err := Evaluate(cases)
		if err != nil {
			panic(err)
		}
		out[r] = b
	}
	return out
}

func TestVerdictBySimulation(t *testing.T) {
	t.Parallel()
	const (
		reps, cases, size = 300, 30, 400
		tolProbitSD       = 0.1 // relative, mean over reps of the sd of 30 probits
	)
	rng := rand.New(rand.NewPCG(5, 6))
	for _, c := range []struct {
		name         string
		shift, scale float64
		prefix       string
		minShare     float64 // of reps whose verdict starts with prefix
	}{
		// A calibrated forecast: the share of clean verdicts is checked
		// against the false-alarm rate of about 10 % stated in doc.go, less
		// 3 binomial s.e. of a share from 300 repetitions (0.017 each).
		{"calibrated", 0, 1, "no evidence against the spread", 0.85},
		{"narrow", 0, 0.5, "too narrow", 0.95},
		{"wide", 0, 2, "too wide", 0.95},
		{"biased", 1, 1, "", 0.9}, // checked below for "forecast too high"
	} {
		var hits int
		var probitSD []float64
		for _, b := range simulateVerdicts(rng, reps, cases, size, c.shift, c.scale) {
			probitSD = append(probitSD, b.ProbitSD)
			ok := strings.HasPrefix(b.Verdict, c.prefix)
			if c.name == "calibrated" {
				ok = ok && !strings.Contains(b.Verdict, ";")
			}
			if c.name == "biased" {
				ok = strings.Contains(b.Verdict, "forecast too high")
			}
			if ok {
				hits++
			}
		}
		if share := float64(hits) / reps; share < c.minShare {
			t.Errorf("%s: %.2f of verdicts as expected, want at least %.2f", c.name, share, c.minShare)
		}
		// sd of Φ⁻¹(PIT) is σ_obs/σ_forecast for normal forecasts of a normal
		// truth with no shift: 1, 2 and 0.5 (tolerance for 30 cases).
		// Too narrow a forecast leaves realised values beyond every sample
		// value, whose probits are clamped, so only the others are checked.
		if c.shift == 0 && c.scale >= 1 {
			if got, want := stat.Mean(probitSD, nil), 1/c.scale; math.Abs(got/want-1) > tolProbitSD {
				t.Errorf("%s: mean probit sd %.3f, want about %.3f", c.name, got, want)
			}
		}
	}
}

func TestEvaluateClimatologyAndSkill(t *testing.T) {
	t.Parallel()
	// Years whose level moves a lot; the model knows each year's level, so
	// it must beat the leave-one-out climatology.
	rng := rand.New(rand.NewPCG(7, 8))
	cases := make([]Case, 25)
	for i := range cases {
		level := 4000 + 40*float64(i)
		s := make([]float64, 300)
		for j := range s {
			s[j] = level + 50*rng.NormFloat64()
		}
		cases[i] = Case{Sample: s, Observed: level + 50*rng.NormFloat64()}
	}
	b, err := Evaluate(cases)
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range cases {
		var others []float64
		for j, o := range cases {
			if j != i {
				others = append(others, o.Observed)
			}
		}
		if want := CRPS(others, c.Observed); b.RefCRPS[i] != want {
			t.Fatalf("case %d: reference CRPS %v, leave-one-out %v", i, b.RefCRPS[i], want)
		}
	}
	if !(b.Skill > 0.5) {
		t.Errorf("skill %.3f of a model that knows the level, want > 0.5", b.Skill)
	}
	// An explicit reference replaces the leave-one-out one.
	cases[0].Reference = []float64{0, 1}
	b2, err := Evaluate(cases)
	if err != nil {
		t.Fatal(err)
	}
	if want := CRPS([]float64{0, 1}, cases[0].Observed); b2.RefCRPS[0] != want {
		t.Errorf("explicit reference CRPS %v, want %v", b2.RefCRPS[0], want)
	}
}

func TestEvaluateRejectsBadData(t *testing.T) {
	t.Parallel()
	good := []float64{1, 2, 3}
	for _, c := range []struct {
		name  string
		cases []Case
		want  string
	}{
		{"one case", []Case{{Sample: good, Observed: 1}}, "1 cases"},
		{"short sample", []Case{{Sample: good, Observed: 1}, {Sample: good[:1], Observed: 2}, {Sample: good, Observed: 3}}, "case 2: 1 sample values"},
		{"two cases, leave-one-out", []Case{{Sample: good, Observed: 1}, {Sample: good, Observed: 2}}, "case 1: the leave-one-out climatology needs at least 3 cases"},
		{"NaN observed", []Case{{Sample: good, Observed: math.NaN(), Reference: good}, {Sample: good, Observed: 2, Reference: good}}, "case 1: observed value NaN"},
		{"Inf in sample", []Case{{Sample: good, Observed: 1, Reference: good}, {Sample: []float64{1, math.Inf(1)}, Observed: 2, Reference: good}}, "case 2: sample value 2 is +Inf"},
		{"short reference", []Case{{Sample: good, Observed: 1, Reference: []float64{}}, {Sample: good, Observed: 2, Reference: good}}, "case 1: 0 reference values"},
	} {
		_, err := Evaluate(c.cases)
		if !errors.Is(err, ErrBacktest) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	} // Two cases are enough with explicit references.
	if _, err := Evaluate([]Case{{Sample: good, Observed: 1, Reference: good}, {Sample: good, Observed: 2, Reference: good}}); err != nil {
		t.Errorf("two cases with references: %v", err)
	}
}

func TestQuantileIntervalCoverageBySimulation(t *testing.T) {
	t.Parallel()
	const (
		reps      = 2000
		zBinomial = 3.29 // two-sided 0.1 % range of the binomial count
		tolSE     = 0.1  // relative: mean s.e. against the sd of the estimates
	)
	rng := rand.New(rand.NewPCG(9, 10))
	for _, c := range []struct {
		n int
		p float64
	}{{500, 0.95}, {500, 0.5}, {500, 0.99}, {2000, 0.99}} {
		n, p := c.n, c.p
		x := make([]float64, n)
		truth := distuv.UnitNormal.Quantile(p)
		var covered int
		var cover float64
		est, ses := make([]float64, reps), make([]float64, reps)
		for r := range reps {
			for i := range x {
				x[i] = rng.NormFloat64()
			}
			q := Quantile(x, p)
			if q.Lo <= truth && truth <= q.Hi {
				covered++
			}
			cover, est[r], ses[r] = q.Coverage, q.Value, q.SE
		}
		// The count of covering intervals is Binomial(reps, Coverage).
		mean, sd := reps*cover, math.Sqrt(reps*cover*(1-cover))
		if math.Abs(float64(covered)-mean) > zBinomial*sd {
			t.Errorf("N = %d, p = %g: %d of %d intervals cover, expected %.0f ± %.0f", n, p, covered, reps, mean, zBinomial*sd)
		}
		if cover < IntervalLevel {
			t.Errorf("N = %d, p = %g: exact coverage %g below %g", n, p, cover, IntervalLevel)
		}
		// The s.e. from the interval width against the spread of the
		// estimates, where the doc comment says it is meaningful.
		if float64(n)*min(p, 1-p) < 20 {
			continue
		}
		if got, want := stat.Mean(ses, nil), stat.StdDev(est, nil); math.Abs(got/want-1) > tolSE {
			t.Errorf("N = %d, p = %g: mean s.e. %.4f, sd of estimates %.4f", n, p, got, want)
		}
	}
}

func TestShortfallSEBySimulation(t *testing.T) {
	t.Parallel()
	const (
		reps, n, alpha = 2000, 2000, 0.05
		tolSE          = 0.1 // relative, about 6 s.e. of an sd from 2000 repetitions, plus finite-N bias
	)
	// True asymptotic σ/√N from the formula with population values:
	// normal: v = z, ES = φ(z)/α = λ, Var(X | X > v) = 1 + zλ − λ²;
	// exponential: v = −ln α, ES = v + 1, Var(X | X > v) = 1 (memoryless).
	z := distuv.UnitNormal.Quantile(1 - alpha)
	lam := distuv.UnitNormal.Prob(z) / alpha
	normalSE := math.Sqrt((1 + z*lam - lam*lam + (1-alpha)*(lam-z)*(lam-z)) / (alpha * n))
	expSE := math.Sqrt((1 + (1 - alpha)) / (alpha * n))
	rng := rand.New(rand.NewPCG(11, 12))
	for _, c := range []struct {
		name   string
		draw   func() float64
		trueSE float64
		high   bool
	}{
		{"normal", rng.NormFloat64, normalSE, true},
		{"exponential", rng.ExpFloat64, expSE, true},
		{"normal, low adverse", func() float64 { return -rng.NormFloat64() }, normalSE, false},
	} {
		x := make([]float64, n)
		est, ses := make([]float64, reps), make([]float64, reps)
		for r := range reps {
			for i := range x {
				x[i] = c.draw()
			}
			e := Shortfall(x, alpha, c.high)
			est[r], ses[r] = e.Value, e.SE
		}
		sd := stat.StdDev(est, nil)
		if got := stat.Mean(ses, nil); math.Abs(got/sd-1) > tolSE {
			t.Errorf("%s: mean estimated s.e. %.4f, sd of ES over repetitions %.4f", c.name, got, sd)
		}
		if math.Abs(c.trueSE/sd-1) > tolSE {
			t.Errorf("%s: asymptotic s.e. %.4f, sd of ES over repetitions %.4f", c.name, c.trueSE, sd)
		}
	}
}

func TestPathsNeeded(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		se     float64
		n      int
		target float64
		want   int
	}{
		{6.3, 10_000, 2, 99_225}, // 10 000 · 3.15² = 99 225 exactly
		{2, 1000, 1, 4000},
		{0.1, 1000, 0.05, 4000}, // ratio 2 with rounding noise must not give 4001
		{1, 1000, 3, 112},       // 111.1… rounds up
		{0, 1000, 1, 0},
		{math.Inf(1), 1000, 1, math.MaxInt},
		{1e200, 1000, 1, math.MaxInt},
	} {
		if got := PathsNeeded(c.se, c.n, c.target); got != c.want {
			t.Errorf("PathsNeeded(%g, %d, %g) = %d, want %d", c.se, c.n, c.target, got, c.want)
		}
	}
}

func TestPathsNeededReachesTarget(t *testing.T) {
	t.Parallel()
	// The 1/√N law: the s.e. at the recommended count is near the target.
	const tolReach = 0.15 // relative: about 3 s.e. of the tail-variance estimate with 900 tail paths
	rng := rand.New(rand.NewPCG(15, 16))
	draw := func(n int) []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = rng.ExpFloat64()
		}
		return x
	}
	// Asymptotic s.e. of ES at α = 0.05 for the unit exponential with 2000
	// paths: √{[1 + 0.95·1²]/(0.05·2000)} (see TestShortfallSEBySimulation).
	se := math.Sqrt(1.95 / 100)
	target := se / 3
	n := PathsNeeded(se, 2000, target)
	if n != 18_000 {
		t.Fatalf("PathsNeeded = %d, want 18 000", n)
	}
	if got := Shortfall(draw(n), 0.05, true).SE; math.Abs(got/target-1) > tolReach {
		t.Errorf("s.e. with %d paths %.4g, target %.4g", n, got, target)
	}
}

// TestVerdictSmallSampleBias: below MinCases the spread is not judged, but
// a sign test that rejects (9 of 9 realised values above the forecast
// median, exact two-sided p = 2·0.5⁹ = 0.0039) is still reported.
func TestVerdictSmallSampleBias(t *testing.T) {
	got := verdict(PITSummary{Cases: 9, Above: 9, Untied: 9, AboveP: 2 * math.Pow(0.5, 9)})
	if want := "too few cases to judge the spread: 9 (at least 10 needed); forecast too low: realised values fall " +
		"above the forecast median 9 of 9 times (expected 4.5, p 0.0039)"; got != want {
		t.Errorf("verdict %q,\nwant %q", got, want)
	}
	if got := verdict(PITSummary{Cases: 5, Above: 3, Untied: 5, AboveP: 1}); got != "too few cases to judge the spread: 5 (at least 10 needed)" {
		t.Errorf("verdict %q", got)
	}
}

// TestFewCaseSigns: with too few cases to judge the spread, a backtest
// still says that every realised value fell on one side of the median and
// that its CRPS is far above the climatology's.
func TestFewCaseSigns(t *testing.T) {
	var cases []Case
	for i := range 4 {
		sample := make([]float64, 200)
		for j := range sample {
			sample[j] = float64(j) / 200 // uniform on [0, 1)
		}
		// Realised values far above the forecasts, spread like them: the
		// climatology of the other cases beats the model.
		cases = append(cases, Case{Sample: sample, Observed: 5 + 0.1*float64(i)})
	}
	b, err := Evaluate(cases)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(b.Verdict, "too few cases to judge the spread: 4") ||
		!strings.Contains(b.Verdict, "all 4 realised values fell above the forecast median") ||
		!strings.Contains(b.Verdict, "times the climatology's") {
		t.Errorf("verdict %q", b.Verdict)
	}
}
