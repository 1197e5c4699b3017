package statespace

import (
	"errors"
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
)

// Bounds of the slow part's e-folding time, in days: from a week (a part
// faster than that is the fast AR's business) to ten years (slower than
// that, a record of decades cannot tell it from the trend).
const (
	MinEFolding = 7.0
	MaxEFolding = 3650.0
)

// ErrFit is wrapped by errors from a likelihood that cannot be maximised.
var ErrFit = errors.New("statespace: maximum likelihood failed")

// Fitted is a maximum-likelihood fit.
type Fitted struct {
	Params Params
	LogLik float64
	N      int // observed days
	K      int // estimated parameters: p + 12, plus 2 with the slow part
	// SE holds standard errors from the numerical Hessian of the
	// log-likelihood at the optimum, for (φ₁..φₚ, φ_s, s_F); NaN where the
	// Hessian is not positive definite there. The slow entries are absent
	// without a slow part.
	SE []float64
}

// BIC returns −2 log L + K log N.
func (f *Fitted) BIC() float64 { return -2*f.LogLik + float64(f.K)*math.Log(float64(f.N)) }

// AIC returns −2 log L + 2K.
func (f *Fitted) AIC() float64 { return -2*f.LogLik + 2*float64(f.K) }

// Fit maximises the exact Gaussian likelihood of x over the fast AR of
// order len(start.Phi), the 12 monthly σ and, when slow is set, φ_s and s_F,
// by BFGS from start. The fast AR is kept stationary through its partial
// autocorrelations (Jones 1980, Technometrics 22), φ_s inside the e-folding
// bounds, and every scale positive. The likelihood of a slow part can have
// a second, lower maximum at short e-folding times, so the slow fit starts
// from e-folding times of 30 and 180 days (and from start's own, when it
// has one) and keeps the best.
func Fit(x []float64, month []uint8, start Params, slow bool) (*Fitted, error) {
	start.check()
	p := len(start.Phi)
	nll := nllOf(x, month, p, slow)
	var starts []Params
	if slow {
		if tau := start.EFolding(); start.HasSlow() && tau > MinEFolding && tau < MaxEFolding {
			starts = append(starts, start)
		}
		for _, tau := range []float64{30, 180} {
			s := start
			s.PhiSlow, s.SDSlow = math.Exp(-1/tau), 0.25*meanSigma(start.Sigma)
			starts = append(starts, s)
		}
	} else {
		start.SDSlow, start.PhiSlow = 0, 0
		starts = []Params{start}
	}
	best, err := bestOf(nll, starts, slow, 1e-10)
	if err != nil {
		return nil, err
	}
	prm, _ := decode(best.X, p, slow)
	return newFitted(x, month, prm, -best.F, slow), nil
}

// LeanSecondStartDays is the record length (30 years) below which FitLean
// also starts the slow part from an e-folding time of 180 days.
const LeanSecondStartDays = 30 * 365

// FitLean is the lean path of Fit for repeated refits (backtests,
// bootstraps): BFGS from start (a previous fit's parameters) and, with the
// slow part on a record shorter than LeanSecondStartDays, also from an
// e-folding time of 180 days (there the likelihood of a slow part can have
// a second maximum that a single warm start misses; on longer records the
// warm start holds), keeping the better; no standard errors (SE is nil).
func FitLean(x []float64, month []uint8, start Params, slow bool) (*Fitted, error) {
	start.check()
	p := len(start.Phi)
	starts := []Params{start}
	if !slow {
		starts[0].SDSlow, starts[0].PhiSlow = 0, 0
	} else {
		alt := start
		alt.PhiSlow, alt.SDSlow = math.Exp(-1/180.0), 0.25*meanSigma(start.Sigma)
		tau := start.EFolding()
		switch {
		case !start.HasSlow() || !(tau > MinEFolding && tau < MaxEFolding):
			starts = []Params{alt}
		case len(x) < LeanSecondStartDays:
			starts = append(starts, alt)
		}
	}
	best, err := bestOf(nllOf(x, month, p, slow), starts, slow, 1e-9)
	if err != nil {
		return nil, err
	}
	prm, _ := decode(best.X, p, slow)
	out := &Fitted{Params: prm, LogLik: -best.F, N: countObserved(x), K: p + 12}
	if slow {
		out.K += 2
	}
	return out, nil
}

// ProfileOrder returns the log-likelihood of a fast AR of order q with the
// slow part and the shape of the monthly σ held at base's estimates: the
// φ are maximised by BFGS and the common scale of all variances in closed
// form (scaling every variance by c² leaves the Kalman gains unchanged, so
// ĉ² is the mean of v²/f). It is a lower bound on the full maximum at order
// q and costs a fraction of it: the lean path for order tables.
func ProfileOrder(x []float64, month []uint8, base Params, q int) (float64, error) {
	if q < 1 || q > MaxOrder {
		panic(fmt.Sprintf("statespace: AR order %d outside 1..%d", q, MaxOrder))
	}
	phi0 := make([]float64, q)
	copy(phi0, base.Phi)
	start := base
	start.Phi = phi0
	nll := func(th []float64) float64 {
		r := make([]float64, q)
		for i := range r {
			r[i] = math.Tanh(th[i])
		}
		prm := base
		prm.Phi = fromPACF(r)
		n, logs, quad := sums(x, month, prm)
		if n == 0 || !(quad > 0) || math.IsInf(logs, 0) || math.IsNaN(logs) {
			return math.Inf(1)
		}
		// −log L at ĉ² = quad/n: ½[n log 2π + logs + n log ĉ² + n]... with
		// 2·halfLog2Pi = log 2π.
		return float64(n)*halfLog2Pi + 0.5*(logs+float64(n)*math.Log(quad/float64(n))+float64(n))
	}
	th := encode(start, false)[:q]
	// A BIC table needs the maximum to a few hundredths, not to 1e-8 of
	// the log-likelihood: 1e-7 relative is about 0.006 on a 70-year record.
	res, err := minimizeWith(objective{f: nll}, th, 1e-7, fd.Forward)
	if err != nil {
		return 0, err
	}
	return -res.F, nil
}

func newFitted(x []float64, month []uint8, prm Params, ll float64, slow bool) *Fitted {
	out := &Fitted{Params: prm, LogLik: ll, N: countObserved(x), K: len(prm.Phi) + 12}
	if slow {
		out.K += 2
	}
	out.SE = standardErrors(x, month, prm, slow)
	return out
}

// bestOf minimizes nll from each start and returns the lowest result; an
// error only when no start gave one.
func bestOf(nll objective, starts []Params, slow bool, rel float64) (*optimize.Result, error) {
	// The starts run concurrently (the likelihood is a pure function): a
	// BFGS line search evaluates one point at a time, and the other start
	// fills the idle processor. The choice below is in start order, so the
	// result does not depend on which finishes first.
	results := make([]*optimize.Result, len(starts))
	errs := make([]error, len(starts))
	var wg sync.WaitGroup
	for i, st := range starts {
		wg.Go(func() { results[i], errs[i] = minimize(nll, encode(st, slow), rel) })
	}
	wg.Wait()
	var best *optimize.Result
	var firstErr error
	for i, res := range results {
		if errs[i] != nil {
			firstErr = errs[i]
			continue
		}
		if best == nil || res.F < best.F {
			best = res
		}
	}
	if best == nil {
		return nil, firstErr
	}
	return best, nil
}

// minimize runs BFGS with forward-difference gradients until the objective
// changes by less than rel (relative) over 3 iterations. A line search that
// stalls at the optimum reports an error with a usable point; only a result
// that got nowhere is a failure. Forward differences (step 1e-7 on the
// unconstrained scale) cost half the likelihoods of central ones; their
// gradient error, about 1e-4 on a log-likelihood of 10⁴–10⁵, moves the
// optimum by about 1e-7 in each parameter, far inside its standard error
// (on the demo record and New York and Seattle 2012–2015 the maximum agrees
// with the central-difference search to 1e-9 in log L).
func minimize(f objective, x0 []float64, rel float64) (*optimize.Result, error) {
	return minimizeWith(f, x0, rel, fd.Forward)
}

// minimizeWith is minimize with the given finite-difference formula.
func minimizeWith(f objective, x0 []float64, rel float64, formula fd.Formula) (*optimize.Result, error) {
	step := 1e-5
	if formula.Stencil[0].Loc == 0 { // forward: √ε-sized steps
		step = 1e-7
	}
	prob := optimize.Problem{
		Func: f.f,
		Grad: func(g, th []float64) { f.gradient(g, th, formula, step) },
	}
	set := &optimize.Settings{
		Converger:       &optimize.FunctionConverge{Absolute: 1e-9, Relative: rel, Iterations: 3},
		MajorIterations: 400,
	}
	res, err := optimize.Minimize(prob, x0, set, &optimize.BFGS{})
	if res == nil || math.IsInf(res.F, 0) || math.IsNaN(res.F) {
		if err == nil {
			return nil, fmt.Errorf("%w: the likelihood is not finite at the end of the search", ErrFit)
		}
		return nil, fmt.Errorf("%w: %w", ErrFit, err)
	}
	return res, nil
}

// standardErrors returns the standard errors of (φ₁..φₚ[, φ_s, s_F]) from
// the inverse of the observed information in those parameters, with the
// monthly σ held at their estimates (their coupling with φ is weak).
func standardErrors(x []float64, month []uint8, prm Params, slow bool) []float64 {
	p := len(prm.Phi)
	k := p
	if slow {
		k += 2
	}
	get := func(v []float64) Params {
		q := prm
		q.Phi = append([]float64(nil), v[:p]...)
		if slow {
			q.PhiSlow, q.SDSlow = v[p], v[p+1]
		}
		return q
	}
	f := func(v []float64) float64 {
		q := get(v)
		if slow && !(q.PhiSlow > 0 && q.PhiSlow < 1 && q.SDSlow > 0) {
			return math.NaN()
		}
		return -LogLik(x, month, q)
	}
	v := append([]float64(nil), prm.Phi...)
	if slow {
		v = append(v, prm.PhiSlow, prm.SDSlow)
	}
	se := make([]float64, k)
	for i := range se {
		se[i] = math.NaN()
	}
	h := mat.NewSymDense(k, nil)
	fd.Hessian(h, f, v, &fd.Settings{Formula: fd.Central, Step: 1e-4})
	var ch mat.Cholesky
	if !ch.Factorize(h) {
		return se
	}
	var inv mat.SymDense
	if err := ch.InverseTo(&inv); err != nil {
		return se
	}
	for i := range se {
		if d := inv.At(i, i); d > 0 {
			se[i] = math.Sqrt(d)
		}
	}
	return se
}

// encode maps parameters to the unconstrained vector the optimiser moves:
// atanh of the partial autocorrelations, log σ, the logit of the e-folding
// time's position between its bounds on a log scale, and log s_F.
func encode(prm Params, slow bool) []float64 {
	r := pacf(prm.Phi)
	th := make([]float64, 0, len(r)+14)
	for _, v := range r {
		th = append(th, math.Atanh(clamp(v, -0.999999, 0.999999)))
	}
	for _, s := range prm.Sigma {
		th = append(th, math.Log(s))
	}
	if slow {
		lo, hi := math.Log(MinEFolding), math.Log(MaxEFolding)
		u := (math.Log(prm.EFolding()) - lo) / (hi - lo)
		u = clamp(u, 1e-6, 1-1e-6)
		th = append(th, math.Log(u/(1-u)), math.Log(prm.SDSlow))
	}
	return th
}

func decode(th []float64, p int, slow bool) (Params, bool) {
	r := make([]float64, p)
	for i := range r {
		r[i] = math.Tanh(th[i])
	}
	prm := Params{Phi: fromPACF(r)}
	for m := range 12 {
		prm.Sigma[m] = math.Exp(th[p+m])
		if !(prm.Sigma[m] > 0) || math.IsInf(prm.Sigma[m], 0) {
			return prm, false
		}
	}
	if slow {
		lo, hi := math.Log(MinEFolding), math.Log(MaxEFolding)
		u := 1 / (1 + math.Exp(-th[p+12]))
		tau := math.Exp(lo + u*(hi-lo))
		prm.PhiSlow = math.Exp(-1 / tau)
		prm.SDSlow = math.Exp(th[p+13])
		if !(prm.SDSlow > 0) || math.IsInf(prm.SDSlow, 0) {
			return prm, false
		}
	}
	for _, v := range prm.Phi {
		if math.IsNaN(v) {
			return prm, false
		}
	}
	return prm, true
}

// fromPACF maps partial autocorrelations r (|rₖ| < 1) to the coefficients
// of a stationary AR by the Durbin–Levinson recursion.
func fromPACF(r []float64) []float64 {
	phi := make([]float64, 0, len(r))
	for k, rk := range r {
		next := make([]float64, k+1)
		for j := range k {
			next[j] = phi[j] - rk*phi[k-1-j]
		}
		next[k] = rk
		phi = next
	}
	return phi
}

// pacf inverts fromPACF (the backward Durbin–Levinson step).
func pacf(phi []float64) []float64 {
	cur := append([]float64(nil), phi...)
	r := make([]float64, len(phi))
	for k := len(phi) - 1; k >= 0; k-- {
		rk := cur[k]
		r[k] = rk
		prev := make([]float64, k)
		d := 1 - rk*rk
		for j := range k {
			prev[j] = (cur[j] + rk*cur[k-1-j]) / d
		}
		cur = prev
	}
	return r
}

func meanSigma(s [12]float64) float64 {
	v := 0.0
	for _, x := range s {
		v += x
	}
	return v / 12
}

func countObserved(x []float64) int {
	n := 0
	for _, v := range x {
		if !math.IsNaN(v) {
			n++
		}
	}
	return n
}

func clamp(v, lo, hi float64) float64 { return math.Min(math.Max(v, lo), hi) }
