package shocks

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat/distuv"
)

// Bounds of the maximum-likelihood search.
const (
	MinNu = 2.05 // lower bound of ν
	MaxNu = 300  // upper bound of ν; a fit at the bound is practically normal
	MinXi = 0.2  // lower bound of ξ
	MaxXi = 5    // upper bound of ξ, 1/MinXi
)

// MinFitLen is the fewest shocks FitStudentT and FitSkewT accept.
const MinFitLen = 10

// Fit is a fitted shock distribution.
type Fit struct {
	Dist   Dist
	LogLik float64 // maximized log-likelihood, Σ log f(zᵢ)
	Params int     // number of estimated shape parameters: 0, 1 or 2
}

// AIC returns the Akaike information criterion of the shock part of a model,
// 2·Params − 2·LogLik. Families fitted to the same shocks compare by it; the
// parameters the families share (mean, variance) are left out.
func (f Fit) AIC() float64 { return 2*float64(f.Params) - 2*f.LogLik }

// FitNormal returns the standard normal with the log-likelihood of z. There
// is nothing to estimate. A non-finite z gives a non-finite LogLik.
func FitNormal(z []float64) Fit {
	var ll float64
	for _, x := range z {
		ll += distuv.UnitNormal.LogProb(x)
	}
	return Fit{Dist: Normal{}, LogLik: ll}
}

// FitStudentT returns the maximum-likelihood StudentT for the unit-variance
// shocks z, with ν in (MinNu, MaxNu). A ν at the upper bound means the
// shocks are as thin-tailed as a normal. It returns an error if z is shorter
// than MinFitLen, holds a non-finite value, or the search does not converge.
func FitStudentT(z []float64) (Fit, error) {
	if err := checkShocks(z); err != nil {
		return Fit{}, err
	}
	n := float64(len(z))
	objective := func(x []float64) float64 {
		return -tLogLik(z, nuOf(x[0])) / n
	}
	var (
		best      = math.Inf(1)
		bestStart float64
	)
	for _, nu := range []float64{2.5, 3, 4, 5, 7, 10, 20, 50, 150} {
		a := unNu(nu)
		if f := objective([]float64{a}); f < best {
			best, bestStart = f, a
		}
	}
	x, err := minimize(objective, []float64{bestStart})
	if err != nil {
		return Fit{}, fmt.Errorf("shocks: student-t fit: %w", err)
	}
	nu := nuOf(x[0])
	return Fit{Dist: StudentT{Nu: nu}, LogLik: tLogLik(z, nu), Params: 1}, nil
}

// FitSkewT returns the joint maximum-likelihood SkewT for the unit-variance
// shocks z, with ν in (MinNu, MaxNu) and ξ in (MinXi, MaxXi). It returns an
// error if z is shorter than MinFitLen, holds a non-finite value, or the
// search does not converge.
func FitSkewT(z []float64) (Fit, error) {
	if err := checkShocks(z); err != nil {
		return Fit{}, err
	}
	n := float64(len(z))
	objective := func(x []float64) float64 {
		return -SkewT{Nu: nuOf(x[0]), Xi: xiOf(x[1])}.params().logLik(z) / n
	}
	var (
		best  = math.Inf(1)
		start []float64
	)
	for _, nu := range []float64{2.5, 3.5, 5, 8, 15, 40, 150} {
		for _, xi := range []float64{0.4, 0.6, 0.8, 1, 1.25, 1.7, 2.5} {
			x := []float64{unNu(nu), unXi(xi)}
			if f := objective(x); f < best {
				best, start = f, x
			}
		}
	}
	x, err := minimize(objective, start)
	if err != nil {
		return Fit{}, fmt.Errorf("shocks: skewed-t fit: %w", err)
	}
	d := SkewT{Nu: nuOf(x[0]), Xi: xiOf(x[1])}
	return Fit{Dist: d, LogLik: d.params().logLik(z), Params: 2}, nil
}

func checkShocks(z []float64) error {
	if len(z) < MinFitLen {
		return fmt.Errorf("shocks: need at least %d shocks to fit, got %d", MinFitLen, len(z))
	}
	for i, x := range z {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("shocks: shock %d is not finite (%v)", i, x)
		}
	}
	return nil
}

// tLogLik is Σ log f(zᵢ) for the unit-variance t of ν degrees of freedom.
func tLogLik(z []float64, nu float64) float64 {
	c := unitT(nu).LogProb(0)
	inv := 1 / (nu - 2)
	var acc float64
	i := 0
	// Σ log1p as the logarithms of products over blocks of 8 (one logarithm
	// in 8, the fits' inner loop). Each factor lies between 1 and about
	// 1 + 10⁴ for standardized shocks and ν above 2, so a product of 8 is far
	// from overflow; rounding 1 + a for small a moves the sum by about 10⁻¹⁶
	// a term.
	for ; i+8 <= len(z); i += 8 {
		b := z[i : i+8 : i+8]
		acc += math.Log((1 + b[0]*b[0]*inv) * (1 + b[1]*b[1]*inv) * (1 + b[2]*b[2]*inv) * (1 + b[3]*b[3]*inv) *
			(1 + b[4]*b[4]*inv) * (1 + b[5]*b[5]*inv) * (1 + b[6]*b[6]*inv) * (1 + b[7]*b[7]*inv))
	}
	for ; i < len(z); i++ {
		acc += math.Log1p(z[i] * z[i] * inv)
	}
	return float64(len(z))*c - (nu+1)/2*acc
}

// logLik is Σ log f(zᵢ).
func (k skewT) logLik(z []float64) float64 {
	nu := k.t.Nu
	c := k.logScale + k.t.LogProb(0)
	inv := 1 / (nu - 2)
	s, mu, invXi, xi := k.s, k.mu, k.invXi, k.xi
	// a is the day's log1p argument, y²/(ν − 2) with y scaled by 1/ξ above
	// the mode and by ξ below.
	// The scale is picked by y's sign bit (half and half: a branch would
	// miss often): A + B·sign(y) is 1/ξ for y ≥ 0 and ξ below.
	A, B := (invXi+xi)/2, (invXi-xi)/2
	a := func(x float64) float64 {
		y := s*x + mu
		y *= A + B*math.Copysign(1, y)
		return y * y * inv
	}
	var acc float64
	i := 0
	// As tLogLik: logarithms of products over blocks of 8.
	for ; i+8 <= len(z); i += 8 {
		b := z[i : i+8 : i+8]
		acc += math.Log((1 + a(b[0])) * (1 + a(b[1])) * (1 + a(b[2])) * (1 + a(b[3])) *
			(1 + a(b[4])) * (1 + a(b[5])) * (1 + a(b[6])) * (1 + a(b[7])))
	}
	for ; i < len(z); i++ {
		acc += math.Log1p(a(z[i]))
	}
	return float64(len(z))*c - (nu+1)/2*acc
}

// The search runs over unbounded coordinates mapped smoothly into the bounds:
//
//	ν = 2 + exp(w),  w = wₗ + (wᵤ − wₗ)/(1 + e⁻ᵃ),  wₗ = log(MinNu − 2), wᵤ = log(MaxNu − 2)
//	ξ = exp(log(MaxXi)·tanh(b))
var (
	logNuLo = math.Log(MinNu - 2)
	logNuHi = math.Log(MaxNu - 2)
	logXiHi = math.Log(MaxXi)
)

// nuOf and xiOf clamp to the bounds, which rounding can overstep.
func nuOf(a float64) float64 {
	return min(max(2+math.Exp(logNuLo+(logNuHi-logNuLo)/(1+math.Exp(-a))), MinNu), MaxNu)
}

func unNu(nu float64) float64 {
	u := (math.Log(nu-2) - logNuLo) / (logNuHi - logNuLo)
	return math.Log(u / (1 - u))
}

func xiOf(b float64) float64 { return min(max(math.Exp(logXiHi*math.Tanh(b)), MinXi), MaxXi) }

func unXi(xi float64) float64 { return math.Atanh(math.Log(xi) / logXiHi) }

// errNoConvergence is wrapped by fit errors when the search stops early.
var errNoConvergence = errors.New("likelihood search did not converge")

// minimize runs Nelder–Mead from x0, then restarts it from the result with a
// fresh simplex, the usual guard against a simplex that collapsed early.
func minimize(f func([]float64) float64, x0 []float64) ([]float64, error) {
	x := x0
	for _, size := range []float64{0.5, 0.05} {
		settings := &optimize.Settings{
			Converger:       &optimize.FunctionConverge{Absolute: 1e-13, Relative: 1e-13, Iterations: 60},
			MajorIterations: 5000,
		}
		res, err := optimize.Minimize(optimize.Problem{Func: f}, x, settings, &optimize.NelderMead{SimplexSize: size})
		if err != nil {
			return nil, fmt.Errorf("%w: %w", errNoConvergence, err)
		}
		if res.Status != optimize.FunctionConvergence {
			return nil, fmt.Errorf("%w: %v after %d evaluations", errNoConvergence, res.Status, res.Stats.FuncEvaluations)
		}
		x = res.X
	}
	return x, nil
}
