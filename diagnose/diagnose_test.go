package diagnose

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"wxstress/model"

	"gonum.org/v1/gonum/stat/distuv"
)

const (
	// tolExact is the absolute tolerance for identities that hold exactly in
	// real arithmetic and lose only a few roundings in floating point.
	tolExact = 1e-12
	// tolTable is the absolute tolerance against four-digit printed tables.
	tolTable = 1e-4
)

// From memory of the Box–Jenkins textbook: an AR(1) with coefficient φ has
// ρ_k = φ^k, and its PACF is φ at lag 1 and zero after.
func TestPACFOfAR1(t *testing.T) {
	t.Parallel()
	const phi = 0.7
	rho := make([]float64, 12)
	for k := range rho {
		rho[k] = math.Pow(phi, float64(k+1))
	}
	got := PACF(rho)
	for k, v := range got {
		want := 0.0
		if k == 0 {
			want = phi
		}
		if math.Abs(v-want) > tolExact {
			t.Errorf("PACF lag %d = %.15g, want %g", k+1, v, want)
		}
	}
}

// Yule–Walker for an AR(2) (Box, Jenkins and Reinsel, Time Series Analysis,
// §3.2): ρ_1 = φ1/(1 − φ2), ρ_k = φ1 ρ_{k−1} + φ2 ρ_{k−2}; the PACF is ρ_1,
// then φ2, then zero.
func TestPACFOfAR2(t *testing.T) {
	t.Parallel()
	const phi1, phi2 = 0.5, 0.3
	rho := make([]float64, 10)
	rho[0] = phi1 / (1 - phi2)
	rho[1] = phi1*rho[0] + phi2
	for k := 2; k < len(rho); k++ {
		rho[k] = phi1*rho[k-1] + phi2*rho[k-2]
	}
	got := PACF(rho)
	want := make([]float64, len(rho))
	want[0], want[1] = rho[0], phi2
	for k := range got {
		if math.Abs(got[k]-want[k]) > tolExact {
			t.Errorf("PACF lag %d = %.15g, want %.15g", k+1, got[k], want[k])
		}
	}
}

// Autocorrelation does not depend on location or scale, and missing days at
// either end of the series change no pair and no divisor.
func TestACFInvariance(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, 300)
	for i := 1; i < len(x); i++ {
		x[i] = 0.6*x[i-1] + rng.NormFloat64()
	}
	x[40], x[41], x[200] = math.NaN(), math.NaN(), math.NaN()
	base := ACF(x, 15)

	scaled := make([]float64, len(x))
	for i, v := range x {
		scaled[i] = 12 + 3.5*v
	}
	padded := slices.Concat([]float64{math.NaN(), math.NaN()}, x, []float64{math.NaN()})
	for name, got := range map[string][]float64{
		"12 + 3.5x":    ACF(scaled, 15),
		"NaN-padded x": ACF(padded, 15),
	} {
		for k := range base {
			if math.Abs(got[k]-base[k]) > tolExact {
				t.Errorf("%s: lag %d = %.15g, want %.15g", name, k+1, got[k], base[k])
			}
		}
	}
}

// Critical values of the Kolmogorov distribution, from memory of the standard
// table (Smirnov 1948): P(K > 1.2239) = 0.10, P(K > 1.3581) = 0.05,
// P(K > 1.6276) = 0.01, P(K > 1.9495) = 0.001.
func TestKolmogorovSurvivalTable(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ t, p float64 }{
		{1.2239, 0.10}, {1.3581, 0.05}, {1.6276, 0.01}, {1.9495, 0.001},
	} {
		if got := kolmogorovSurvival(c.t); math.Abs(got-c.p) > tolTable {
			t.Errorf("P(K > %g) = %.6g, want %g", c.t, got, c.p)
		}
	}
	// The two series meet at t = 1; the density there is about 1.1, so a
	// step of 1e-12 moves the value by about that much.
	if a, b := kolmogorovSurvival(math.Nextafter(1, 0)), kolmogorovSurvival(1); math.Abs(a-b) > tolExact {
		t.Errorf("P(K > t) jumps at t = 1: %.17g below, %.17g at", a, b)
	}
	if got := kolmogorovSurvival(0.05); got != 1 {
		t.Errorf("P(K > 0.05) = %.17g, want 1", got)
	}
	if got := kolmogorovSurvival(40); got != 0 {
		t.Errorf("P(K > 40) = %.17g, want 0", got)
	}
}

// Under the null hypothesis a test's p-values are uniform, so about 5 % fall
// below 0.05. Fixed seeds make this deterministic; the band is about ±3.5
// binomial standard errors for 2000 replications.
func TestNullRejectionRate(t *testing.T) {
	t.Parallel()
	const (
		reps   = 2000
		n      = 250
		lo, hi = 0.035, 0.065
	)
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, n)
	var lb, ks int
	for range reps {
		for i := range x {
			x[i] = rng.NormFloat64()
		}
		if LjungBox(x, 10, 0).P < 0.05 {
			lb++
		}
		if KolmogorovSmirnov(x, distuv.UnitNormal.CDF).P < 0.05 {
			ks++
		}
	}
	for name, count := range map[string]int{"Ljung–Box": lb, "Kolmogorov–Smirnov": ks} {
		if rate := float64(count) / reps; rate < lo || rate > hi {
			t.Errorf("%s rejects %.3f of white-noise samples at 5 %%, want within [%g, %g]", name, rate, lo, hi)
		}
	}
}

// The sample moments of {0, 0, 0, 1} are those of a Bernoulli(1/4) variable:
// skewness (1 − 2p)/√(p(1−p)) = 2/√3 and excess kurtosis
// (1 − 6p(1−p))/(p(1−p)) = −2/3 (textbook Bernoulli moments).
func TestMomentsOfBernoulliSample(t *testing.T) {
	t.Parallel()
	x := []float64{0, math.NaN(), 0, 1, 0}
	if got, want := Skewness(x), 2/math.Sqrt(3); math.Abs(got-want) > tolExact {
		t.Errorf("Skewness = %.15g, want %.15g", got, want)
	}
	if got, want := ExcessKurtosis(x), -2.0/3; math.Abs(got-want) > tolExact {
		t.Errorf("ExcessKurtosis = %.15g, want %.15g", got, want)
	}
	// JB = n/6 (g1² + g2²/4) = 4/6 (4/3 + 1/9) = 26/27, p = exp(−JB/2) for χ²(2).
	jb := JarqueBera(x)
	if math.Abs(jb.Stat-26.0/27) > tolExact || jb.DF != 2 || math.Abs(jb.P-math.Exp(-13.0/27)) > tolExact {
		t.Errorf("JarqueBera = %+v, want Stat 26/27, DF 2, P exp(-13/27)", jb)
	}
}

func TestConstantSeriesGivesNaN(t *testing.T) {
	t.Parallel()
	// 0.1 and 20.3 are not exact binary fractions, so a computed mean differs
	// from them by a rounding and a naive ratio would be finite garbage.
	for _, c := range []float64{0.1, 20.3} {
		x := make([]float64, 200)
		for i := range x {
			x[i] = c
		}
		x[17] = math.NaN()
		checkAllNaN(t, "ACF(constant)", ACF(x, 5))
		checkAllNaN(t, "PACF(ACF(constant))", PACF(ACF(x, 5)))
		checkNaNTest(t, "LjungBox(constant)", LjungBox(x, 10, 1), 9)
		checkNaNTest(t, "JarqueBera(constant)", JarqueBera(x), 2)
		checkAllNaN(t, "Skewness(constant)", []float64{Skewness(x)})
		checkAllNaN(t, "ExcessKurtosis(constant)", []float64{ExcessKurtosis(x)})
		// D is defined for a constant sample: F(c) against a jump from 0 to 1.
		ks := KolmogorovSmirnov(x, distuv.UnitNormal.CDF)
		if want := max(distuv.UnitNormal.CDF(c), 1-distuv.UnitNormal.CDF(c)); math.Abs(ks.Stat-want) > tolExact || ks.DF != 199 {
			t.Errorf("KolmogorovSmirnov(constant %g) = %+v, want D %.15g, DF 199", c, ks, want)
		}
	}
}

func TestNoPresentValues(t *testing.T) {
	t.Parallel()
	for name, x := range map[string][]float64{
		"all NaN": {math.NaN(), math.NaN(), math.NaN()},
		"empty":   {},
		"nil":     nil,
	} {
		checkAllNaN(t, name+": ACF", ACF(x, 4))
		if got := len(ACF(x, 4)); got != 4 {
			t.Errorf("%s: ACF returned %d lags, want 4", name, got)
		}
		checkNaNTest(t, name+": LjungBox", LjungBox(x, 2, 0), 2)
		checkNaNTest(t, name+": JarqueBera", JarqueBera(x), 2)
		checkNaNTest(t, name+": KolmogorovSmirnov", KolmogorovSmirnov(x, distuv.UnitNormal.CDF), 0)
		checkAllNaN(t, name+": moments", []float64{Skewness(x), ExcessKurtosis(x)})
		if th, s := QQ(x, distuv.UnitNormal.Quantile); len(th) != 0 || len(s) != 0 {
			t.Errorf("%s: QQ returned %d and %d points, want none", name, len(th), len(s))
		}
	}
	if !math.IsNaN(ConfidenceBound(0)) {
		t.Errorf("ConfidenceBound(0) = %g, want NaN", ConfidenceBound(0))
	}
}

// Lags with no complete pair of days — all lags ≥ len(x), or a lag that
// every gap straddles — are NaN; the lags before them are unaffected.
func TestLagsBeyondTheData(t *testing.T) {
	t.Parallel()
	x := []float64{1, 3, 2, 5, 4}
	short := ACF(x, 4)
	long := ACF(x, 8)
	for k := range 4 {
		if long[k] != short[k] || math.IsNaN(long[k]) {
			t.Errorf("ACF(x, 8) lag %d = %g, want %g from ACF(x, 4)", k+1, long[k], short[k])
		}
	}
	checkAllNaN(t, "ACF lags 5..8 of 5 values", long[4:])

	// Present only on days 0, 1 and 4: no pair is 2 days apart.
	gappy := []float64{1, 2, math.NaN(), math.NaN(), 4}
	r := ACF(gappy, 4)
	if !math.IsNaN(r[1]) || math.IsNaN(r[0]) || math.IsNaN(r[2]) {
		t.Errorf("ACF(%v) = %v, want NaN only at lag 2", gappy, r)
	}
	if got := ACF(x, 0); got == nil || len(got) != 0 {
		t.Errorf("ACF(x, 0) = %#v, want an empty slice", got)
	}

	// Ljung–Box needs more present values than lags.
	checkNaNTest(t, "LjungBox with lags = n", LjungBox(x, 5, 0), 5)
	if lb := LjungBox(x, 4, 0); math.IsNaN(lb.Stat) {
		t.Errorf("LjungBox with lags = n-1 = %+v, want a number", lb)
	}
}

func TestInputsUnchanged(t *testing.T) {
	t.Parallel()
	x := []float64{3, math.NaN(), 1, 2, 5, 4, math.NaN(), 0}
	orig := slices.Clone(x)
	ACF(x, 3)
	LjungBox(x, 2, 0)
	JarqueBera(x)
	KolmogorovSmirnov(x, distuv.UnitNormal.CDF)
	QQ(x, distuv.UnitNormal.Quantile)
	acf := []float64{0.5, 0.2, 0.1}
	PACF(acf)
	if !slices.EqualFunc(x, orig, func(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) }) {
		t.Errorf("input modified: %v, was %v", x, orig)
	}
	if !slices.Equal(acf, []float64{0.5, 0.2, 0.1}) {
		t.Errorf("PACF modified its input: %v", acf)
	}
}

func TestMisusePanics(t *testing.T) {
	t.Parallel()
	x := []float64{1, 2, 3, 4, 5}
	for name, f := range map[string]func(){
		"ACF negative maxLag":        func() { ACF(x, -1) },
		"LjungBox zero lags":         func() { LjungBox(x, 0, 0) },
		"LjungBox negative fitdf":    func() { LjungBox(x, 2, -1) },
		"LjungBox fitdf = lags":      func() { LjungBox(x, 2, 2) },
		"KolmogorovSmirnov nil cdf":  func() { KolmogorovSmirnov(x, nil) },
		"QQ nil quantile":            func() { QQ(x, nil) },
		"ConfidenceBound negative n": func() { ConfidenceBound(-1) },
	} {
		func() {
			defer func() {
				r := recover()
				msg, ok := r.(string)
				if !ok || !strings.HasPrefix(msg, "diagnose: ") {
					t.Errorf("%s: recovered %#v, want a panic string prefixed \"diagnose: \"", name, r)
				}
			}()
			f()
		}()
	}
}

func checkAllNaN(t *testing.T, what string, v []float64) {
	t.Helper()
	for i, x := range v {
		if !math.IsNaN(x) {
			t.Errorf("%s[%d] = %g, want NaN", what, i, x)
		}
	}
}

func checkNaNTest(t *testing.T, what string, got model.Test, df float64) {
	t.Helper()
	if !math.IsNaN(got.Stat) || !math.IsNaN(got.P) || got.DF != df {
		t.Errorf("%s = %+v, want NaN statistic and p-value, DF %g", what, got, df)
	}
}
