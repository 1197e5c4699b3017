package shocks

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mathext"
	"gonum.org/v1/gonum/stat/distuv"
)

// Dist is a zero-mean, unit-variance shock distribution.
type Dist interface {
	// LogProb returns the natural logarithm of the density at z.
	LogProb(z float64) float64
	// CDF returns P(ε ≤ z).
	CDF(z float64) float64
	// Quantile returns the z with CDF(z) = p, for p in [0, 1]; it panics
	// for p outside [0, 1].
	Quantile(p float64) float64
}

// UpperQuantiler is implemented by distributions that can invert the upper
// tail without forming 1 − q: UpperQuantile(q) is Quantile(1 − q) computed
// accurately for q down to the smallest normal float64. NewTable uses it to
// build the upper tail; all distributions of this package implement it.
type UpperQuantiler interface {
	UpperQuantile(q float64) float64
}

var (
	_ Dist           = Normal{}
	_ Dist           = StudentT{}
	_ Dist           = SkewT{}
	_ UpperQuantiler = Normal{}
	_ UpperQuantiler = StudentT{}
	_ UpperQuantiler = SkewT{}
)

// checkProb panics unless p is in [0, 1].
func checkProb(p float64) {
	if !(p >= 0 && p <= 1) {
		panic(fmt.Sprintf("shocks: probability %v outside [0, 1]", p))
	}
}

// Normal is the standard normal distribution,
//
//	f(z) = exp(−z²/2) / √(2π).
type Normal struct{}

// LogProb returns log f(z).
func (Normal) LogProb(z float64) float64 { return distuv.UnitNormal.LogProb(z) }

// CDF returns Φ(z).
func (Normal) CDF(z float64) float64 { return distuv.UnitNormal.CDF(z) }

// Quantile returns Φ⁻¹(p).
func (Normal) Quantile(p float64) float64 {
	checkProb(p)
	return distuv.UnitNormal.Quantile(p)
}

// UpperQuantile returns Φ⁻¹(1 − q) = −Φ⁻¹(q).
func (Normal) UpperQuantile(q float64) float64 {
	checkProb(q)
	return -distuv.UnitNormal.Quantile(q)
}

// StudentT is Student's t distribution with Nu degrees of freedom scaled to
// unit variance: ε = √((ν−2)/ν)·T with T ~ t_ν, so
//
//	f(z) = Γ((ν+1)/2) / (Γ(ν/2) √(π(ν−2))) · (1 + z²/(ν−2))^(−(ν+1)/2),
//
// defined for finite ν > 2; other values of Nu make the methods panic. Its
// excess kurtosis is 6/(ν−4) for ν > 4.
type StudentT struct{ Nu float64 }

// unitT returns the unit-variance t as a gonum distribution.
func unitT(nu float64) distuv.StudentsT {
	if !(nu > 2) || math.IsInf(nu, 1) {
		panic(fmt.Sprintf("shocks: student-t needs finite nu > 2, got %v", nu))
	}
	return distuv.StudentsT{Mu: 0, Sigma: math.Sqrt((nu - 2) / nu), Nu: nu}
}

// LogProb returns log f(z).
func (d StudentT) LogProb(z float64) float64 { return unitT(d.Nu).LogProb(z) }

// CDF returns P(ε ≤ z).
func (d StudentT) CDF(z float64) float64 { return unitT(d.Nu).CDF(z) }

// Quantile returns the p-quantile.
func (d StudentT) Quantile(p float64) float64 {
	checkProb(p)
	t := unitT(d.Nu)
	if p > 0.5 {
		return -lowerQuantile(t, 1-p)
	}
	return lowerQuantile(t, p)
}

// UpperQuantile returns the (1 − q)-quantile, −Quantile(q) by symmetry.
func (d StudentT) UpperQuantile(q float64) float64 {
	checkProb(q)
	t := unitT(d.Nu)
	if q > 0.5 {
		return lowerQuantile(t, 1-q)
	}
	return -lowerQuantile(t, q)
}

// lowerQuantile returns the p-quantile of the zero-mean t for p in [0, ½];
// it returns 0 for p > ½.
//
// gonum's StudentsT.Quantile inverts the incomplete beta function, which
// loses accuracy in the far tail for large ν (at ν = 300 and p = 10⁻¹⁵ it is
// off by 10⁻³ relative, at p = 10⁻²⁰ it is wrong altogether), while the
// CDF stays accurate. So its value only starts a safeguarded Newton iteration
// on log F(x) = log p: Newton steps while they stay inside a bracket
// [lo, hi] with F(lo) < p < F(hi), bisection otherwise.
func lowerQuantile(t distuv.StudentsT, p float64) float64 {
	switch {
	case p == 0:
		return math.Inf(-1)
	case p >= 0.5: // exactly ½, or above it by a rounding error
		return 0
	case p < 1e-300:
		// log F and its slope lose meaning near underflow.
		return t.Quantile(p)
	}
	logP := math.Log(p)
	// The t quantile lies beyond the normal one with the same scale.
	hi := t.Sigma * distuv.UnitNormal.Quantile(p)
	if t.CDF(hi) < p {
		hi = 0
	}
	lo := 2*hi - t.Sigma // negative: hi ≤ 0
	for t.CDF(lo) > p {
		lo *= 2
	}
	x := t.Quantile(p)
	if !(x > lo && x < hi) {
		x = lo/2 + hi/2
	}
	for range 200 {
		g := math.Log(t.CDF(x)) - logP
		switch {
		case g > 0:
			hi = x
		case g < 0:
			lo = x
		default:
			return x
		}
		// d log F / dx = f(x)/F(x).
		next := x - g/math.Exp(t.LogProb(x)-(g+logP))
		if !(next > lo && next < hi) {
			next = lo/2 + hi/2
		}
		if math.Abs(next-x) <= 4*epsilon*math.Abs(x) {
			return next
		}
		x = next
	}
	return x
}

// epsilon is the float64 machine epsilon, 2⁻⁵².
const epsilon = 0x1p-52

// SkewT is the Fernández–Steel two-piece skewed Student-t with Nu degrees of
// freedom and skew Xi, standardized to mean 0 and variance 1 (the
// parameterization of R fGarch's dsstd with mean = 0, sd = 1). With g the
// unit-variance t density of ν degrees of freedom,
//
//	m₁ = 2√(ν−2) / ((ν−1) B(½, ν/2))          E|ε| under g
//	μ  = m₁ (ξ − 1/ξ)
//	s  = √((1 − m₁²)(ξ² + 1/ξ²) + 2m₁² − 1)
//	y  = s·z + μ
//	f(z) = 2s/(ξ + 1/ξ) · g(y/ξ)   for y ≥ 0
//	f(z) = 2s/(ξ + 1/ξ) · g(y·ξ)   for y < 0.
//
// ξ = 1 is the symmetric StudentT; ξ < 1 skews to the left (longer lower
// tail), ξ > 1 to the right, and ξ ↔ 1/ξ mirrors the distribution. The mode is
// at z = −μ/s, where CDF = 1/(1 + ξ²). Defined for finite ν > 2 and finite
// ξ > 0; other values make the methods panic.
type SkewT struct{ Nu, Xi float64 }

// skewT holds the constants of a SkewT.
type skewT struct {
	xi, invXi float64
	t         distuv.StudentsT // unit-variance t, g above
	mu, s     float64          // y = s·z + μ
	g         float64          // 2/(ξ + 1/ξ)
	logScale  float64          // log(g·s)
	split     float64          // CDF at the mode, 1/(1 + ξ²)
}

func (d SkewT) params() skewT {
	t := unitT(d.Nu)
	xi := d.Xi
	if !(xi > 0) || math.IsInf(xi, 1) {
		panic(fmt.Sprintf("shocks: skewed t needs finite xi > 0, got %v", xi))
	}
	nu := d.Nu
	m1 := 2 * math.Sqrt(nu-2) / (nu - 1) / math.Exp(mathext.Lbeta(0.5, nu/2))
	invXi := 1 / xi
	s := math.Sqrt((1-m1*m1)*(xi*xi+invXi*invXi) + 2*m1*m1 - 1)
	g := 2 / (xi + invXi)
	return skewT{
		xi:       xi,
		invXi:    invXi,
		t:        t,
		mu:       m1 * (xi - invXi),
		s:        s,
		g:        g,
		logScale: math.Log(g * s),
		split:    1 / (1 + xi*xi),
	}
}

// LogProb returns log f(z).
func (d SkewT) LogProb(z float64) float64 {
	k := d.params()
	y := k.s*z + k.mu
	if y >= 0 {
		y *= k.invXi
	} else {
		y *= k.xi
	}
	return k.logScale + k.t.LogProb(y)
}

// CDF returns P(ε ≤ z):
//
//	F(z) = (g/ξ)·G(ξy)           for y < 0
//	F(z) = 1 − g·ξ·G(−y/ξ)       for y ≥ 0
//
// with G the unit-variance t distribution function and g = 2/(ξ + 1/ξ).
func (d SkewT) CDF(z float64) float64 {
	k := d.params()
	y := k.s*z + k.mu
	if y < 0 {
		return k.g * k.invXi * k.t.CDF(y*k.xi)
	}
	return 1 - k.g*k.xi*k.t.CDF(-y*k.invXi)
}

// Quantile returns the p-quantile, inverting CDF piecewise on either side of
// the mode.
func (d SkewT) Quantile(p float64) float64 {
	checkProb(p)
	k := d.params()
	if p < k.split {
		return k.lower(p)
	}
	return k.upper(1 - p)
}

// UpperQuantile returns the (1 − q)-quantile without forming 1 − q in the
// upper tail.
func (d SkewT) UpperQuantile(q float64) float64 {
	checkProb(q)
	k := d.params()
	if q <= 1-k.split {
		return k.upper(q)
	}
	return k.lower(1 - q)
}

// lower inverts F(z) = p below the mode.
func (k skewT) lower(p float64) float64 {
	y := lowerQuantile(k.t, p*k.xi/k.g) * k.invXi
	return (y - k.mu) / k.s
}

// upper inverts 1 − F(z) = q above the mode.
func (k skewT) upper(q float64) float64 {
	y := -k.xi * lowerQuantile(k.t, q*k.invXi/k.g)
	return (y - k.mu) / k.s
}
