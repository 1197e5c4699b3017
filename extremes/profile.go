package extremes

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// maxBracketSE is how far from the estimate, in standard errors, the search
// for a profile-likelihood bound goes before it reports that there is none.
const maxBracketSE = 1024

// ReturnLevelInterval returns the profile-likelihood confidence interval of
// the T-block return level at the given level (0.95 for 95 %), as in Coles
// 2001 §3.3.4. The location is written in terms of the return
// level, μ = z_p + σ/ξ·[1 − y_p^(−ξ)]; for each z_p the log-likelihood is
// maximised over (σ, ξ), and the bounds are the two values of z_p where the
// deviance 2{ℓ̂ − ℓ_p(z_p)} reaches the χ²₁ quantile of level (3.8415 at
// 0.95), found by root finding on either side of ẑ_p.
//
// It returns an error when a bound does not exist within 1024 standard
// errors of ẑ_p (the likelihood then sets no limit on that side) or an inner
// maximisation fails. It panics unless T > 1 and 0 < level < 1.
func (r *FitResult) ReturnLevelInterval(T, level float64) (lo, hi float64, err error) {
	ly := logYp(T)
	cut := chiSquareCut(level)
	pp := profileProblem{
		// Free parameters (log σ, ξ); z on the standardised scale.
		negLL: func(z float64, p, g []float64) float64 {
			sigma, xi := math.Exp(p[0]), p[1]
			c := growth(xi, ly)
			mu := z - sigma*c
			if g == nil {
				return negLogLik(r.std, mu, sigma, xi, nil)
			}
			var full [3]float64
			v := negLogLik(r.std, mu, sigma, xi, full[:])
			// μ moves with log σ and ξ: ∂μ/∂log σ = −σc(ξ), ∂μ/∂ξ = −σc′(ξ).
			g[0] = full[1] - full[0]*sigma*c
			g[1] = full[2] - full[0]*sigma*growthSlope(xi, ly)
			return v
		},
		sigmaIndex: 0,
		start:      []float64{r.stdEst[1], r.stdEst[2]},
		est:        (r.ReturnLevel(T) - r.center) / r.scale,
		step:       r.ReturnLevelSE(T) / r.scale,
		what:       fmt.Sprintf("the %g-block return level", T),
		dataUnits:  func(z float64) float64 { return r.center + r.scale*z },
	}
	lo, hi, err = r.profileInterval(pp, cut)
	if err != nil {
		return math.NaN(), math.NaN(), err
	}
	return r.center + r.scale*lo, r.center + r.scale*hi, nil
}

// ShapeInterval returns the profile-likelihood confidence interval of the
// shape ξ at the given level (Coles 2001, §3.3.4): for each ξ the
// log-likelihood is maximised over (μ, σ), and the bounds are where the
// deviance reaches the χ²₁ quantile of level. Errors and panics as for
// ReturnLevelInterval.
func (r *FitResult) ShapeInterval(level float64) (lo, hi float64, err error) {
	cut := chiSquareCut(level)
	pp := profileProblem{
		// Free parameters (μ, log σ) on the standardised scale.
		negLL: func(xi float64, p, g []float64) float64 {
			sigma := math.Exp(p[1])
			if g == nil {
				return negLogLik(r.std, p[0], sigma, xi, nil)
			}
			var full [3]float64
			v := negLogLik(r.std, p[0], sigma, xi, full[:])
			g[0], g[1] = full[0], full[1]
			return v
		},
		sigmaIndex: 1,
		start:      []float64{r.stdEst[0], r.stdEst[1]},
		est:        r.Xi,
		step:       r.SE[2],
		what:       "the shape",
		dataUnits:  func(xi float64) float64 { return xi },
	}
	return r.profileInterval(pp, cut)
}

func chiSquareCut(level float64) float64 {
	if !(level > 0 && level < 1) {
		panic("extremes: confidence level outside (0, 1)")
	}
	return distuv.ChiSquared{K: 1}.Quantile(level)
}

// profileProblem is one profile likelihood on the standardised scale:
// negLL(v, p, g) is −ℓ with the profiled quantity at v and the two free
// parameters at p, storing the gradient in p into g when g is not nil.
type profileProblem struct {
	negLL      func(v float64, p, g []float64) float64
	sigmaIndex int                     // index of log σ among the free parameters
	start      []float64               // the free parameters at the maximum
	est, step  float64                 // the estimate of the profiled quantity and its s.e.
	what       string                  // for errors
	dataUnits  func(v float64) float64 // v in the caller's units, for errors
}

// profileInterval finds where the profile deviance crosses cut on each side
// of pp.est: it steps out by 1, 2, 4, … standard errors until the deviance
// exceeds cut, then finds the root of √deviance − √cut inside the last step.
func (r *FitResult) profileInterval(pp profileProblem, cut float64) (lo, hi float64, err error) {
	step := pp.step
	if !(step > 0) || math.IsInf(step, 0) {
		step = 0.1 * (1 + math.Abs(pp.est))
	}
	n := len(r.std)
	rootCut := math.Sqrt(cut)
	var bounds [2]float64
	for side, dir := range [2]float64{-1, 1} {
		warm := append([]float64(nil), pp.start...)
		excess := func(v float64) (float64, error) {
			obj := func(p []float64) float64 { return pp.negLL(v, p, nil) }
			grad := func(g, p []float64) { pp.negLL(v, p, g) }
			p0 := append([]float64(nil), warm...)
			// A start outside the support is moved in by growing σ: as σ → ∞
			// every observation's 1 + ξ(x − μ)/σ tends to a positive limit.
			for i := 0; i < 64 && math.IsInf(obj(p0), 1); i++ {
				p0[pp.sigmaIndex] += math.Ln2
			}
			p, f, err := minimise(obj, grad, p0, n)
			if err != nil {
				return 0, fmt.Errorf("extremes: profiling %s at %.6g: %w", pp.what, pp.dataUnits(v), err)
			}
			copy(warm, p)
			// The signed root of the deviance is close to linear in v, which
			// the root finder converges on in a few steps.
			return math.Sqrt(math.Max(2*(f+r.stdLogLik), 0)) - rootCut, nil
		}
		inner, fInner := pp.est, -rootCut
		var outer, fOuter float64
		for k := 1.0; ; k *= 2 {
			if k > maxBracketSE {
				side := "lower"
				if dir > 0 {
					side = "upper"
				}
				return math.NaN(), math.NaN(), fmt.Errorf(
					"extremes: the profile likelihood of %s has no %s bound within %d standard errors",
					pp.what, side, maxBracketSE)
			}
			outer = pp.est + dir*k*step
			if fOuter, err = excess(outer); err != nil {
				return math.NaN(), math.NaN(), err
			}
			if fOuter >= 0 {
				break
			}
			inner, fInner = outer, fOuter
		}
		if bounds[side], err = findRoot(excess, inner, fInner, outer, fOuter, 1e-10*(math.Abs(pp.est)+step), 1e-10); err != nil {
			return math.NaN(), math.NaN(), err
		}
	}
	return bounds[0], bounds[1], nil
}

// findRoot returns a root of f in the bracket [a, b] (either order) with
// fa = f(a) < 0 ≤ fb = f(b): secant steps from the two latest points, kept
// inside the bracket, with a bisection whenever a step would leave it or the
// bracket has not halved in three steps. It stops when |f| ≤ ftol or the
// bracket is narrower than tol.
func findRoot(f func(float64) (float64, error), a, fa, b, fb, tol, ftol float64) (float64, error) {
	if fb == 0 {
		return b, nil
	}
	p0, f0, p1, f1 := a, fa, b, fb // the two latest points
	width := math.Abs(b - a)
	slow := 0
	for iter := 0; iter < 200 && math.Abs(b-a) > tol; iter++ {
		c := p1 - f1*(p1-p0)/(f1-f0)
		if slow >= 3 || !(math.Min(a, b) < c && c < math.Max(a, b)) {
			c, slow = (a+b)/2, 0
		}
		fc, err := f(c)
		if err != nil {
			return 0, err
		}
		if math.Abs(fc) <= ftol {
			return c, nil
		}
		if fc < 0 {
			a, fa = c, fc
		} else {
			b, fb = c, fc
		}
		p0, f0, p1, f1 = p1, f1, c, fc
		if w := math.Abs(b - a); w > width/2 {
			slow++
		} else {
			width, slow = w, 0
		}
	}
	return a - fa*(b-a)/(fb-fa), nil
}
