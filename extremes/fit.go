package extremes

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
	"gonum.org/v1/gonum/stat"
)

// MinValues is the smallest sample Fit accepts. Ten blocks already give very
// wide intervals; the bound only refuses samples on which the three-parameter
// likelihood is hopeless.
const MinValues = 10

// eulerGamma is the Euler–Mascheroni constant, the mean of the standard Gumbel.
const eulerGamma = 0.57721566490153286

// FitResult is a maximum-likelihood GEV fit. The embedded GEV holds the
// estimates; its log-likelihood method is reached as r.GEV.LogLik(x). A
// FitResult is not modified by its methods and is safe for concurrent use.
type FitResult struct {
	GEV
	LogLik float64       // maximised log-likelihood ℓ(μ̂, σ̂, ξ̂)
	SE     [3]float64    // standard errors of μ̂, σ̂, ξ̂
	Cov    [3][3]float64 // inverse observed information, order μ, σ, ξ
	N      int           // number of blocks fitted

	// The sample standardised as (x − center)/scale; the fit runs on it so
	// that the optimiser's tolerances do not depend on the data's units.
	std           []float64
	center, scale float64
	stdLogLik     float64    // maximised log-likelihood of std
	stdEst        [3]float64 // (μ, log σ, ξ) on the standardised scale
}

// Fit fits the GEV to the block maxima x by maximum likelihood (Coles 2001,
// §3.3.2). The search starts from the Gumbel method-of-moments values
// σ = √6·s/π, μ = x̄ − γσ, ξ = 0, runs BFGS with the analytic gradient on
// (μ, log σ, ξ) (with a Nelder–Mead restart should BFGS stall), and takes the standard errors from the
// inverse of the observed information, a finite-difference Jacobian of the
// analytic gradient at the maximum.
//
// It returns an error for fewer than MinValues values, a non-finite value,
// a sample without spread, an optimiser that does not converge, ξ̂ < −1 (where
// the likelihood has no maximum) or an observed information that is not
// positive definite.
func Fit(x []float64) (*FitResult, error) {
	if err := checkSample(x); err != nil {
		return nil, err
	}
	center, scale := stat.MeanStdDev(x, nil)
	if !(scale > 0) || scale < 1e-12*math.Abs(center) {
		return nil, errors.New("extremes: the values have no spread")
	}
	std := make([]float64, len(x))
	for i, v := range x {
		std[i] = (v - center) / scale
	}

	sigma0 := math.Sqrt(6) / math.Pi
	start := []float64{-eulerGamma * sigma0, math.Log(sigma0), 0}
	obj := func(p []float64) float64 { return negLogLik(std, p[0], math.Exp(p[1]), p[2], nil) }
	grad := func(g, p []float64) { negLogLik(std, p[0], math.Exp(p[1]), p[2], g) }
	est, f, err := minimise(obj, grad, start, len(x))
	if err != nil {
		return nil, fmt.Errorf("extremes: %w", err)
	}
	if est[2] < -1 {
		return nil, fmt.Errorf("extremes: shape estimate %.3g is below −1, where the likelihood has no maximum", est[2])
	}
	mu, sigma, xi := est[0], math.Exp(est[1]), est[2]

	// Observed information in (μ, σ, ξ): the Jacobian of the gradient of −ℓ.
	gradSigma := func(dst, p []float64) {
		negLogLik(std, p[0], p[1], p[2], dst)
		dst[1] /= p[1] // ∂/∂σ = (∂/∂log σ)/σ
	}
	var info mat.Dense
	info.ReuseAs(3, 3)
	fd.Jacobian(&info, gradSigma, []float64{mu, sigma, xi}, &fd.JacobianSettings{Formula: fd.Central, Step: 1e-5})
	sym := mat.NewSymDense(3, nil)
	for i := 0; i < 3; i++ {
		for j := i; j < 3; j++ {
			sym.SetSym(i, j, (info.At(i, j)+info.At(j, i))/2)
		}
	}
	var chol mat.Cholesky
	if !chol.Factorize(sym) {
		return nil, errors.New("extremes: observed information is not positive definite at the maximum")
	}
	var cov mat.SymDense
	if err := chol.InverseTo(&cov); err != nil {
		return nil, fmt.Errorf("extremes: inverting the observed information: %w", err)
	}

	r := &FitResult{
		GEV:       GEV{Mu: center + scale*mu, Sigma: scale * sigma, Xi: xi},
		LogLik:    -f - float64(len(x))*math.Log(scale),
		N:         len(x),
		std:       std,
		center:    center,
		scale:     scale,
		stdLogLik: -f,
		stdEst:    [3]float64{est[0], est[1], est[2]},
	}
	unit := [3]float64{scale, scale, 1}
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			r.Cov[i][j] = unit[i] * unit[j] * cov.At(i, j)
		}
		r.SE[i] = math.Sqrt(r.Cov[i][i])
	}
	return r, nil
}

// checkSample reports too short a sample or a non-finite value (numbered from 1).
func checkSample(x []float64) error {
	if len(x) < MinValues {
		return fmt.Errorf("extremes: %d values; a GEV fit needs at least %d", len(x), MinValues)
	}
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("extremes: value %d is %v", i+1, v)
		}
	}
	return nil
}

// ReturnLevelSE returns the delta-method standard error of the T-block
// return level (Coles 2001, §3.3.3): Var(ẑ_p) ≈ ∇z_pᵀ V ∇z_p with
//
//	∇z_p = [1, −ξ⁻¹(1 − y_p^(−ξ)), σξ⁻²(1 − y_p^(−ξ)) − σξ⁻¹y_p^(−ξ)·log y_p]
//
// evaluated at the estimates (its Gumbel limit at ξ = 0). It panics unless T > 1.
func (r *FitResult) ReturnLevelSE(T float64) float64 {
	ly := logYp(T)
	d := [3]float64{1, growth(r.Xi, ly), r.Sigma * growthSlope(r.Xi, ly)}
	v := 0.0
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			v += d[i] * r.Cov[i][j] * d[j]
		}
	}
	return math.Sqrt(v)
}

// minimise minimises f from x0 and returns the best point and its value: BFGS
// with the gradient grad first, and if that does not converge, Nelder–Mead
// followed by BFGS from Nelder–Mead's point. n, the sample size, scales the
// gradient norm that counts as converged (−ℓ is a sum of n terms). Its errors
// carry no package prefix; callers add it.
func minimise(f func([]float64) float64, grad func(g, x []float64), x0 []float64, n int) ([]float64, float64, error) {
	f0 := f(x0)
	if math.IsInf(f0, 1) {
		return nil, 0, errors.New("the likelihood is zero at the starting values")
	}
	best := append([]float64(nil), x0...)
	bestF := f0
	g := make([]float64, len(x0))
	converged := func() (bool, float64) {
		grad(g, best)
		norm := floats.Norm(g, math.Inf(1))
		return norm <= 1e-6*float64(n), norm
	}
	bfgs := func() {
		r, _ := optimize.Minimize(optimize.Problem{Func: f, Grad: grad}, best, &optimize.Settings{
			GradientThreshold: 1e-10 * float64(n),
			Converger:         &optimize.FunctionConverge{Iterations: 50},
			MajorIterations:   500,
		}, &optimize.BFGS{})
		if r != nil && r.F <= bestF {
			copy(best, r.X)
			bestF = r.F
		}
	}
	bfgs()
	if ok, _ := converged(); ok {
		return best, bestF, nil
	}
	nm, err := optimize.Minimize(optimize.Problem{Func: f}, best, &optimize.Settings{
		Converger:       &optimize.FunctionConverge{Absolute: 1e-11, Relative: 1e-13, Iterations: 60},
		FuncEvaluations: 5000,
	}, &optimize.NelderMead{})
	if err == nil && nm.F < bestF {
		copy(best, nm.X)
		bestF = nm.F
	}
	bfgs()
	if ok, norm := converged(); !ok {
		return nil, 0, fmt.Errorf("the optimizer did not converge (gradient norm %.3g)", norm)
	}
	return best, bestF, nil
}
