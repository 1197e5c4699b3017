package statespace

import (
	"fmt"
	"math"

	"wxstress/model"
)

//go:generate go run ./internal/genfilter

// MaxOrder is the largest fast AR order.
const MaxOrder = 5

// maxState is the largest state dimension: p fast lags and the slow part.
const maxState = MaxOrder + 1

// Params are the anomaly model's parameters. SDSlow = 0 means no slow part
// (PhiSlow is then ignored).
type Params struct {
	Phi     []float64   // φ₁..φₚ of the fast part, 1 ≤ p ≤ MaxOrder
	Sigma   [12]float64 // σ of the fast part's innovations, January..December
	PhiSlow float64     // φ_s, in [0, 1)
	SDSlow  float64     // s_F, the stationary standard deviation of F
}

// HasSlow reports whether the slow part is present.
func (p Params) HasSlow() bool { return p.SDSlow > 0 }

// EFolding returns the slow part's e-folding time −1/ln φ_s in days: the lag
// at which its autocorrelation has fallen to 1/e.
func (p Params) EFolding() float64 { return -1 / math.Log(p.PhiSlow) }

// check panics on parameters no caller should pass.
func (p Params) check() {
	if len(p.Phi) < 1 || len(p.Phi) > MaxOrder {
		panic(fmt.Sprintf("statespace: AR order %d outside 1..%d", len(p.Phi), MaxOrder))
	}
	if p.SDSlow < 0 || p.HasSlow() && !(p.PhiSlow >= 0 && p.PhiSlow < 1) {
		panic(fmt.Sprintf("statespace: slow part φ_s = %v, s_F = %v", p.PhiSlow, p.SDSlow))
	}
}

// Filtered is the output of a filter run.
type Filtered struct {
	LogLik float64 // exact Gaussian log-likelihood, with the ½log 2π terms
	N      int     // observed days
	// Z holds the standardized one-step innovations v(t)/√f(t) on the
	// series' grid (NaN where x is missing); nil unless asked for.
	Z          []float64
	logs, quad float64 // Σ log f(t), Σ v(t)²/f(t)
	// State and Cov are the filtered mean and covariance of the state
	// (Y(T), …, Y(T−p+1), F(T)) at the last day T.
	State []float64
	Cov   [][]float64
}

// SlowState returns the filtered mean and standard deviation of F at the
// last day; zeros without a slow part.
func (f *Filtered) SlowState(p Params) (mean, sd float64) {
	if !p.HasSlow() {
		return 0, 0
	}
	k := len(p.Phi)
	return f.State[k], math.Sqrt(math.Max(f.Cov[k][k], 0))
}

// LogLik returns the exact Gaussian log-likelihood of the anomalies x (NaN
// for a missing day) whose day t falls in calendar month month[t] (0..11).
func LogLik(x []float64, month []uint8, p Params) float64 {
	n, logs, quad := sums(x, month, p)
	return loglik(n, logs, quad)
}

const halfLog2Pi = 0.9189385332046727 // ½ log 2π

func loglik(n int, logs, quad float64) float64 {
	if math.IsNaN(logs+quad) || math.IsInf(logs, 0) {
		return math.Inf(-1)
	}
	return -float64(n)*halfLog2Pi - 0.5*(logs+quad)
}

// sums returns the filter's number of observed days, Σ log f(t) and
// Σ v(t)²/f(t), from which the log-likelihood and, for a common scale of all
// variances, its maximum over the scale follow.
func sums(x []float64, month []uint8, p Params) (n int, logs, quad float64) {
	p.check()
	if len(p.Phi) == 1 {
		return sums1(x, month, p)
	}
	if n, logs, quad, ok := sumsAR(x, month, p); ok {
		return n, logs, quad
	}
	r := run(x, month, p, nil, nil)
	return r.N, r.logs, r.quad
}

// sums1 is the filter of run for a fast AR(1), with or without the slow
// part, on scalars: the likelihood of every fit's inner loop. The state
// covariance is [[a, b], [b, c]] (fast, slow); without the slow part b and
// c stay 0. It sums log f as the log of the product of f, renormalised
// every 8 days (renorm), which takes the logarithms out of the loop.
func sums1(x []float64, month []uint8, prm Params) (int, float64, float64) {
	phi, phiS := prm.Phi[0], prm.PhiSlow
	var sig2 [12]float64
	for i, s := range prm.Sigma {
		sig2[i] = s * s
	}
	q := prm.SDSlow * prm.SDSlow * (1 - phiS*phiS)
	if len(x) == 0 {
		return 0, 0, 0
	}
	a := sig2[month[0]] / (1 - phi*phi)
	b, c := 0.0, prm.SDSlow*prm.SDSlow
	y, f := 0.0, 0.0
	phi2, phiS2, cross := phi*phi, phiS*phiS, phi*phiS
	quad, prod, lowest := 0.0, 1.0, math.Inf(1)
	n, inBlock, exp := 0, 0, 0
	for t, xt := range x {
		if t > 0 {
			y *= phi
			f *= phiS
			a = phi2*a + sig2[month[t]]
			b *= cross
			c = phiS2*c + q
		}
		if xt != xt { // NaN: missing
			continue
		}
		ab, bc := a+b, b+c
		fv := ab + bc
		lowest = min(lowest, fv)
		v := xt - y - f
		inv := 1 / fv
		quad += v * v * inv
		prod *= fv
		if inBlock++; inBlock == 8 {
			var e int
			prod, e = renorm(prod)
			exp, inBlock = exp+e, 0
		}
		n++
		g := v * inv
		y += ab * g
		f += bc * g
		a -= ab * ab * inv
		b -= ab * bc * inv
		c -= bc * bc * inv
	}
	if !(lowest > 0) {
		return n, math.Inf(1), quad // degenerate parameters (a variance at or below 0), as run reports them
	}
	return n, logOf(prod, exp), quad
}

// renorm splits p into a mantissa in [1, 2) and its binary exponent, so that
// a product of many variances can be carried without overflow and its
// logarithm taken once (logOf); zero, subnormal, infinite and NaN p come
// back unchanged with exponent 0, and reach the logarithm as they are.
func renorm(p float64) (float64, int) {
	b := math.Float64bits(p)
	e := int(b>>52) & 0x7ff
	if e == 0 || e == 0x7ff {
		return p, 0
	}
	return math.Float64frombits(b&^(0x7ff<<52) | 1023<<52), e - 1023
}

// logOf returns log(p·2^exp).
func logOf(p float64, exp int) float64 { return math.Log(p) + float64(exp)*math.Ln2 }

// Filter runs the Kalman filter over x and returns the log-likelihood, the
// final state and, when withZ is set, the standardized innovations.
func Filter(x []float64, month []uint8, p Params, withZ bool) *Filtered {
	var z []float64
	if withZ {
		z = make([]float64, len(x))
	}
	out := &Filtered{}
	r := run(x, month, p, z, out)
	r.Z = z
	return r
}

// run is the filter. State layout: indices 0..p−1 the fast lags, p the
// slow part when present. The observation picks Y(t) + F(t).
func run(x []float64, month []uint8, prm Params, z []float64, out *Filtered) *Filtered {
	prm.check()
	if len(month) != len(x) {
		panic("statespace: month and x differ in length")
	}
	p := len(prm.Phi)
	slow := prm.HasSlow()
	m := p
	if slow {
		m++
	}
	var phi [MaxOrder]float64
	copy(phi[:], prm.Phi)
	var sig2 [12]float64
	for i, s := range prm.Sigma {
		sig2[i] = s * s
	}
	phiS := prm.PhiSlow
	q := prm.SDSlow * prm.SDSlow * (1 - phiS*phiS)

	var a [maxState]float64
	var P [maxState][maxState]float64
	if len(x) > 0 {
		g := autocov(prm.Phi, sig2[month[0]])
		for i := range p {
			for j := range p {
				P[i][j] = g[abs(i-j)]
			}
		}
	}
	if slow {
		P[p][p] = prm.SDSlow * prm.SDSlow
	}

	quad, prod := 0.0, 1.0
	n, inBlock, exp := 0, 0, 0
	for t, xt := range x {
		if t > 0 {
			// a ← T a
			y := 0.0
			for i := range p {
				y += phi[i] * a[i]
			}
			for i := p - 1; i > 0; i-- {
				a[i] = a[i-1]
			}
			a[0] = y
			if slow {
				a[p] *= phiS
			}
			// P ← T P T' + Q, using the companion form: with r = φᵀP (the
			// first row of T P), the lag block shifts down the diagonal, the
			// first row and column become r (and φᵀr at the corner), and
			// the slow row and column scale by φ_s. O(p·m) instead of O(m³).
			var r [maxState]float64
			for j := range m {
				v := 0.0
				for k := range p {
					v += phi[k] * P[k][j]
				}
				r[j] = v
			}
			corner := 0.0
			for k := range p {
				corner += phi[k] * r[k]
			}
			for i := p - 1; i > 0; i-- {
				for j := p - 1; j > 0; j-- {
					P[i][j] = P[i-1][j-1]
				}
			}
			if slow {
				for i := p - 1; i > 0; i-- {
					P[i][p] = phiS * P[i-1][p]
					P[p][i] = P[i][p]
				}
				P[p][p] *= phiS * phiS
				P[0][p] = phiS * r[p]
				P[p][0] = P[0][p]
			}
			for j := 1; j < p; j++ {
				P[0][j] = r[j-1]
				P[j][0] = r[j-1]
			}
			P[0][0] = corner
			P[0][0] += sig2[month[t]]
			if slow {
				P[p][p] += q
			}
		}
		if math.IsNaN(xt) {
			if z != nil {
				z[t] = math.NaN()
			}
			continue
		}
		// v = x − Z a, f = Z P Z', PZ = P Z'.
		var pz [maxState]float64
		pred := a[0]
		for i := range m {
			pz[i] = P[i][0]
		}
		if slow {
			pred += a[p]
			for i := range m {
				pz[i] += P[i][p]
			}
		}
		f := pz[0]
		if slow {
			f += pz[p]
		}
		v := xt - pred
		if !(f > 0) {
			// Only reachable for degenerate parameters (all σ zero).
			return &Filtered{LogLik: math.Inf(-1), logs: math.Inf(1)}
		}
		// Σ log f as the log of the product, as in sums1; one division a
		// day.
		inv := 1 / f
		prod *= f
		if inBlock++; inBlock == 8 {
			var e int
			prod, e = renorm(prod)
			exp, inBlock = exp+e, 0
		}
		quad += v * v * inv
		n++
		if z != nil {
			z[t] = v / math.Sqrt(f)
		}
		vf := v * inv
		for i := range m {
			a[i] += pz[i] * vf
		}
		for i := range m {
			ki := pz[i] * inv
			for j := range m {
				P[i][j] -= ki * pz[j]
			}
		}
	}
	logs := logOf(prod, exp)
	ll := loglik(n, logs, quad)
	if out == nil {
		return &Filtered{LogLik: ll, N: n, logs: logs, quad: quad}
	}
	out.LogLik, out.N, out.logs, out.quad = ll, n, logs, quad
	out.State = make([]float64, m)
	out.Cov = make([][]float64, m)
	for i := range m {
		out.State[i] = a[i]
		out.Cov[i] = make([]float64, m)
		copy(out.Cov[i], P[i][:m])
	}
	return out
}

// autocov returns γ₀..γₚ₋₁ of a stationary AR with coefficients phi and
// innovation variance s2: γₖ = s2 Σⱼ ψⱼ ψⱼ₊ₖ, ψ the impulse response.
func autocov(phi []float64, s2 float64) []float64 {
	psi := model.ImpulseResponse(phi)
	g := make([]float64, len(phi))
	for k := range g {
		v := 0.0
		for j := 0; j+k < len(psi); j++ {
			v += psi[j] * psi[j+k]
		}
		g[k] = s2 * v
	}
	return g
}

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}
