package extremes

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

// gumbelLogLik is the ξ = 0 log-likelihood written out from Coles (2001),
// eq. 3.9 (from memory): ℓ = −n·log σ − Σ (zᵢ − μ)/σ − Σ exp{−(zᵢ − μ)/σ}.
func gumbelLogLik(x []float64, mu, sigma float64) float64 {
	ll := 0.0
	for _, z := range x {
		s := (z - mu) / sigma
		ll += -math.Log(sigma) - s - math.Exp(-s)
	}
	return ll
}

var sample = []float64{83, 91.5, 79.2, 88, 85.1, 94, 81.7, 86.6, 90.2, 84.4, 77.9, 87.3}

// TestSmoothAcrossZeroShape checks that the likelihood, return levels and
// their derivatives pass through ξ = 0 without a step: at ξ = 0 they equal
// the Gumbel forms, and for tiny ξ they differ from them by the first-order
// term only.
func TestSmoothAcrossZeroShape(t *testing.T) {
	t.Parallel()
	const mu, sigma = 85, 4
	g0 := gumbelLogLik(sample, mu, sigma)
	// Gumbel limit, exact up to rounding.
	if got := (GEV{mu, sigma, 0}).LogLik(sample); math.Abs(got-g0) > 1e-12*math.Abs(g0) {
		t.Errorf("LogLik at ξ = 0: %.17g, Gumbel form %.17g", got, g0)
	}
	// Slope in ξ at 0 from the analytic gradient; ℓ(ξ) − ℓ(0) − ξ·ℓ′(0) is
	// O(ξ²) on both sides of 0, through the series and the log1p forms.
	var grad [3]float64
	negLogLik(sample, mu, sigma, 0, grad[:])
	slope := -grad[2]
	for _, xi := range []float64{-1e-3, -1e-5, -1e-7, -1e-9, 1e-9, 1e-7, 1e-5, 1e-3} {
		got := (GEV{mu, sigma, xi}).LogLik(sample)
		rem := got - g0 - xi*slope
		// The second-order term is below 10·Σs⁴·ξ² here (|s| < 2.5).
		if bound := 400*xi*xi + 1e-13*math.Abs(g0); math.Abs(rem) > bound {
			t.Errorf("ξ = %g: ℓ − ℓ_Gumbel − ξℓ′ = %.3g, bound %.3g", xi, rem, bound)
		}
	}
	// The return level's Gumbel form μ − σ·log y_p (Coles 2001, eq. 3.4),
	// plus the first-order term ξ·σ·(log y_p)²/2 of its expansion in ξ.
	for _, T := range []float64{2, 20, 100, 1e4} {
		ly := math.Log(-math.Log(1 - 1/T))
		gumbel := mu - sigma*ly
		for _, xi := range []float64{0, 1e-12, -1e-12, 1e-9, -1e-9} {
			want := gumbel + xi*sigma*ly*ly/2
			if got := (GEV{mu, sigma, xi}).ReturnLevel(T); math.Abs(got-want) > 1e-14*gumbel {
				t.Errorf("T=%g ξ=%g: return level %.17g, Gumbel expansion %.17g", T, xi, got, want)
			}
		}
	}
}

// TestSeriesMeetClosedForms compares each power series with its closed form
// just inside the series' range, where both are accurate.
func TestSeriesMeetClosedForms(t *testing.T) {
	t.Parallel()
	const tol = 1e-13
	s := 2.0
	for _, u := range []float64{0.99e-4, -0.99e-4} {
		xi := u / s
		got, _ := reducedLog(xi, s)
		if want := math.Log1p(u) / xi; relDiff(got, want) > tol {
			t.Errorf("reducedLog series at u=%g: %.17g, log1p form %.17g", u, got, want)
		}
	}
	for _, u := range []float64{0.0099, -0.0099} {
		xi := u / s
		got := reducedLogSlope(xi, s, 1+u)
		if want := (u/(1+u) - math.Log1p(u)) / (xi * xi); relDiff(got, want) > tol {
			t.Errorf("reducedLogSlope series at u=%g: %.17g, closed form %.17g", u, got, want)
		}
	}
	ly := 1.5
	for _, v := range []float64{0.99e-4, -0.99e-4} {
		xi := -v / ly
		if got, want := growth(xi, ly), math.Expm1(v)/xi; relDiff(got, want) > tol {
			t.Errorf("growth series at v=%g: %.17g, expm1 form %.17g", v, got, want)
		}
	}
	for _, v := range []float64{0.0499, -0.0499} {
		xi := -v / ly
		if got, want := growthSlope(xi, ly), (v*math.Exp(v)-math.Expm1(v))/(xi*xi); relDiff(got, want) > tol {
			t.Errorf("growthSlope series at v=%g: %.17g, closed form %.17g", v, got, want)
		}
	}
}

// TestGradient compares the analytic gradient of −ℓ with central finite
// differences (gonum diff/fd), on both sides of ξ = 0 and at it.
func TestGradient(t *testing.T) {
	t.Parallel()
	const tol = 1e-7
	for _, xi := range []float64{-0.4, -0.05, -1e-6, 0, 1e-8, 0.003, 0.2} {
		p := []float64{84, math.Log(4), xi}
		f := func(q []float64) float64 { return negLogLik(sample, q[0], math.Exp(q[1]), q[2], nil) }
		want := fd.Gradient(nil, f, p, &fd.Settings{Formula: fd.Central, Step: 1e-6})
		got := make([]float64, 3)
		negLogLik(sample, p[0], math.Exp(p[1]), p[2], got)
		for i := range got {
			if d := math.Abs(got[i] - want[i]); d > tol*(1+math.Abs(want[i]))*10 {
				t.Errorf("ξ=%g: ∂/∂θ%d = %.12g, finite difference %.12g", xi, i, got[i], want[i])
			}
		}
	}
}

// TestQuantileFormulas checks Quantile and ReturnLevel against Coles (2001)
// eq. 3.4 written out directly, and CDF(Quantile(p)) = p.
func TestQuantileFormulas(t *testing.T) {
	t.Parallel()
	for _, g := range []GEV{{10, 2, 0.3}, {10, 2, -0.3}, {-3, 0.5, 0.05}, {100, 7, -0.9}} {
		for _, T := range []float64{1.5, 10, 100, 1000} {
			y := -math.Log(1 - 1/T)
			want := g.Mu - g.Sigma/g.Xi*(1-math.Pow(y, -g.Xi))
			if got := g.ReturnLevel(T); relDiff(got, want) > 1e-13 {
				t.Errorf("%+v T=%g: return level %.17g, eq. 3.4 %.17g", g, T, got, want)
			}
			if got := g.CDF(g.ReturnLevel(T)); math.Abs(got-(1-1/T)) > 1e-13 {
				t.Errorf("%+v T=%g: CDF(return level) = %.17g, want %.17g", g, T, got, 1-1/T)
			}
		}
		// End points: μ − σ/ξ below (ξ > 0) or above (ξ < 0).
		end := g.Mu - g.Sigma/g.Xi
		if g.Xi > 0 {
			if g.Quantile(0) != end || g.CDF(end-1) != 0 || !math.IsInf(g.LogProb(end-1), -1) {
				t.Errorf("%+v: lower end point %g not honoured", g, end)
			}
		} else if g.Quantile(1) != end || g.CDF(end+1) != 1 || !math.IsInf(g.LogProb(end+1), -1) {
			t.Errorf("%+v: upper end point %g not honoured", g, end)
		}
	}
}

func TestFitErrors(t *testing.T) {
	t.Parallel()
	ten := func(f func(i int) float64) []float64 {
		x := make([]float64, 10)
		for i := range x {
			x[i] = f(i)
		}
		return x
	}
	cases := []struct {
		name string
		x    []float64
		want string
	}{
		{"too few", sample[:9], "9 values"},
		{"NaN", ten(func(i int) float64 { return []float64{1, math.NaN()}[i%2] }), "value 2 is NaN"},
		{"Inf", ten(func(i int) float64 { return math.Inf(2*(i%2) - 1) }), "value 1 is -Inf"},
		{"constant", ten(func(int) float64 { return 41 }), "no spread"},
	}
	for _, c := range cases {
		_, err := Fit(c.x)
		if err == nil || !strings.HasPrefix(err.Error(), "extremes: ") || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
		if _, err := FitMinima(c.x); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: FitMinima error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

func TestMisusePanics(t *testing.T) {
	t.Parallel()
	r, err := Fit(sample)
	if err != nil {
		t.Fatal(err)
	}
	for name, f := range map[string]func(){
		"zero scale":     func() { GEV{Mu: 1}.CDF(0) },
		"probability":    func() { GEV{0, 1, 0}.Quantile(1.5) },
		"period 1":       func() { GEV{0, 1, 0}.ReturnLevel(1) },
		"level 1":        func() { r.ReturnLevelInterval(10, 1) },
		"shape level 0":  func() { r.ShapeInterval(0) },
		"period NaN":     func() { r.ReturnLevelSE(math.NaN()) },
		"negative scale": func() { GEV{0, -1, 0}.LogLik(sample) },
	} {
		func() {
			defer func() {
				if v := recover(); v == nil || !strings.HasPrefix(fmt.Sprint(v), "extremes: ") {
					t.Errorf("%s: recovered %v, want an extremes panic", name, v)
				}
			}()
			f()
		}()
	}
}

// TestProfileCoverage simulates 100 samples of 50 block maxima from a known
// GEV and counts how often the 95 % profile interval of the 50-block return
// level and of ξ covers the true value. With 100 trials a correct 95 %
// interval covers between 88 and 100 times with probability above 99 %
// (binomial); the test fails only below 85, which a mistaken cut-off
// (χ²₁ at 0.90, or the deviance halved) would give.
func TestProfileCoverage(t *testing.T) {
	t.Parallel()
	const trials, n, minCover = 100, 50, 85
	truth := GEV{Mu: 20, Sigma: 3, Xi: -0.1}
	zTrue := truth.ReturnLevel(50)
	rng := rand.New(rand.NewPCG(1, 2))
	x := make([]float64, n)
	coverLevel, coverShape := 0, 0
	for trial := 0; trial < trials; trial++ {
		for i := range x {
			u := rng.Float64()
			for u == 0 {
				u = rng.Float64()
			}
			x[i] = truth.Quantile(u)
		}
		r, err := Fit(x)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		lo, hi, err := r.ReturnLevelInterval(50, 0.95)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if !(lo < r.ReturnLevel(50) && r.ReturnLevel(50) < hi) {
			t.Errorf("trial %d: estimate %g outside its interval [%g, %g]", trial, r.ReturnLevel(50), lo, hi)
		}
		if lo <= zTrue && zTrue <= hi {
			coverLevel++
		}
		slo, shi, err := r.ShapeInterval(0.95)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if slo <= truth.Xi && truth.Xi <= shi {
			coverShape++
		}
	}
	t.Logf("coverage in %d trials: return level %d, shape %d", trials, coverLevel, coverShape)
	if coverLevel < minCover || coverShape < minCover {
		t.Errorf("coverage of 95 %% intervals: return level %d, shape %d of %d; want at least %d",
			coverLevel, coverShape, trials, minCover)
	}
}
