package extremes

import "math"

// GEV is the generalized extreme value distribution (Coles 2001, eq. 3.2)
//
//	G(z) = exp{−[1 + ξ(z − μ)/σ]^(−1/ξ)}  on 1 + ξ(z − μ)/σ > 0,
//
// with the Gumbel form G(z) = exp{−exp[−(z − μ)/σ]} as its limit ξ → 0.
// Mu and Sigma are in the data's units, Xi is dimensionless. ξ > 0 gives a
// lower end point μ − σ/ξ and a heavy upper tail, ξ < 0 an upper end point
// μ − σ/ξ. The zero value is not a valid distribution: Sigma must be positive,
// and the methods panic otherwise.
type GEV struct {
	Mu    float64 // location μ
	Sigma float64 // scale σ > 0
	Xi    float64 // shape ξ
}

// seriesCut is where the expansions in ξ replace the closed forms: below it
// the truncated series are exact to rounding, above it the closed forms lose
// nothing. It covers ξ = 0 exactly and every |ξ| < 1e-6 at moderate z.
const seriesCut = 1e-4

// reducedLog returns L = log(1 + ξs)/ξ, which tends to s as ξ → 0, and false
// when 1 + ξs ≤ 0 (s outside the support). Then [1 + ξs]^(−1/ξ) = exp(−L).
func reducedLog(xi, s float64) (float64, bool) {
	u := xi * s
	if !(u > -1) {
		return math.NaN(), false
	}
	if math.Abs(u) < seriesCut {
		// log1p(u)/ξ = s(1 − u/2 + u²/3 − u³/4 + …)
		return s * (1 - u*(1.0/2-u*(1.0/3-u/4))), true
	}
	return math.Log1p(u) / xi, true
}

// growth returns c(ξ) = (y^(−ξ) − 1)/ξ for ly = log y, which tends to −log y
// as ξ → 0, so that z_p = μ + σ·c(ξ).
func growth(xi, ly float64) float64 {
	v := -xi * ly
	if math.Abs(v) < seriesCut {
		// expm1(v)/ξ = −log y·(1 + v/2 + v²/6 + v³/24 + …)
		return -ly * (1 + v*(1.0/2+v*(1.0/6+v/24)))
	}
	return math.Expm1(v) / xi
}

// growthSlope returns dc/dξ for c of growth: [v·e^v − expm1(v)]/ξ² with
// v = −ξ·log y, which tends to (log y)²/2 as ξ → 0.
func growthSlope(xi, ly float64) float64 {
	v := -xi * ly
	if math.Abs(v) < 0.05 {
		// (log y)²·Σ_{k≥2} (k−1)/k!·v^(k−2), truncated at k = 10.
		s := 0.0
		fact := 1.0
		for k := 2; k <= 10; k++ {
			fact *= float64(k)
			s += float64(k-1) / fact * math.Pow(v, float64(k-2))
		}
		return ly * ly * s
	}
	return (v*math.Exp(v) - math.Expm1(v)) / (xi * xi)
}

func (g GEV) check() {
	if !(g.Sigma > 0) || math.IsInf(g.Sigma, 1) || math.IsNaN(g.Mu) || math.IsNaN(g.Xi) {
		panic("extremes: GEV needs a finite positive scale and non-NaN location and shape")
	}
}

// CDF returns G(z) = P(Z ≤ z): 0 below a lower end point, 1 above an upper one.
func (g GEV) CDF(z float64) float64 {
	g.check()
	l, ok := reducedLog(g.Xi, (z-g.Mu)/g.Sigma)
	if !ok {
		if g.Xi > 0 {
			return 0
		}
		return 1
	}
	return math.Exp(-math.Exp(-l))
}

// LogProb returns the log density
//
//	log g(z) = −log σ − (1 + 1/ξ)·log[1 + ξ(z − μ)/σ] − [1 + ξ(z − μ)/σ]^(−1/ξ),
//
// −Inf outside the support.
func (g GEV) LogProb(z float64) float64 {
	g.check()
	l, ok := reducedLog(g.Xi, (z-g.Mu)/g.Sigma)
	if !ok {
		return math.Inf(-1)
	}
	// (1 + 1/ξ)·log(1 + ξs) = (1 + ξ)·L
	return -math.Log(g.Sigma) - (1+g.Xi)*l - math.Exp(-l)
}

// Quantile returns z with G(z) = p (Coles 2001, eq. 3.4 with 1 − p for p):
//
//	z = μ − σ/ξ·[1 − (−log p)^(−ξ)],  z = μ − σ·log(−log p) when ξ = 0.
//
// p = 0 and p = 1 give the end points (possibly infinite). It panics unless
// 0 ≤ p ≤ 1.
func (g GEV) Quantile(p float64) float64 {
	g.check()
	if !(p >= 0 && p <= 1) {
		panic("extremes: probability outside [0, 1]")
	}
	switch {
	case p == 0:
		if g.Xi > 0 {
			return g.Mu - g.Sigma/g.Xi
		}
		return math.Inf(-1)
	case p == 1:
		if g.Xi < 0 {
			return g.Mu - g.Sigma/g.Xi
		}
		return math.Inf(1)
	}
	return g.Mu + g.Sigma*growth(g.Xi, math.Log(-math.Log(p)))
}

// ReturnLevel returns the T-block return level z_p, p = 1/T, the level
// exceeded by the block maximum with probability p in any one block (Coles
// 2001, eq. 3.4):
//
//	z_p = μ − σ/ξ·[1 − y_p^(−ξ)],  y_p = −log(1 − p),
//
// and z_p = μ − σ·log y_p in the Gumbel limit. It panics unless T > 1.
func (g GEV) ReturnLevel(T float64) float64 {
	g.check()
	return g.Mu + g.Sigma*growth(g.Xi, logYp(T))
}

// logYp returns log y_p, y_p = −log(1 − 1/T).
func logYp(T float64) float64 {
	if !(T > 1) || math.IsInf(T, 1) {
		panic("extremes: return period must be finite and greater than 1")
	}
	return math.Log(-math.Log1p(-1 / T))
}

// LogLik returns the log-likelihood of the sample x (Coles 2001, eq. 3.7),
//
//	ℓ(μ, σ, ξ) = −n·log σ − (1 + 1/ξ)·Σ log[1 + ξ(xᵢ − μ)/σ] − Σ [1 + ξ(xᵢ − μ)/σ]^(−1/ξ),
//
// −Inf if any xᵢ lies outside the support.
func (g GEV) LogLik(x []float64) float64 {
	g.check()
	return -negLogLik(x, g.Mu, g.Sigma, g.Xi, nil)
}

// negLogLik returns −ℓ(μ, σ, ξ) (+Inf outside the support) and, when grad is
// not nil, stores its gradient with respect to (μ, log σ, ξ) in grad. With
// s = (x − μ)/σ, t = 1 + ξs, L = log t/ξ and w = t^(−1/ξ) = e^(−L), one
// observation contributes ℓᵢ = −log σ − (1 + ξ)L − w and
//
//	∂ℓᵢ/∂μ     = (1 + ξ − w)/(σt)
//	∂ℓᵢ/∂log σ = −1 + s(1 + ξ − w)/t
//	∂ℓᵢ/∂ξ     = −s/t − (1 − w)·∂L/∂ξ,  ∂L/∂ξ = [ξs/t − log t]/ξ².
func negLogLik(x []float64, mu, sigma, xi float64, grad []float64) float64 {
	var ll, gMu, gEta, gXi float64
	logSigma := math.Log(sigma)
	for _, z := range x {
		s := (z - mu) / sigma
		l, ok := reducedLog(xi, s)
		if !ok {
			if grad != nil {
				grad[0], grad[1], grad[2] = math.NaN(), math.NaN(), math.NaN()
			}
			return math.Inf(1)
		}
		w := math.Exp(-l)
		ll += -logSigma - (1+xi)*l - w
		if grad == nil {
			continue
		}
		t := 1 + xi*s
		a := (1 + xi - w) / t
		gMu += a / sigma
		gEta += -1 + s*a
		gXi += -s/t - (1-w)*reducedLogSlope(xi, s, t)
	}
	if grad != nil {
		grad[0], grad[1], grad[2] = -gMu, -gEta, -gXi
	}
	return -ll
}

// reducedLogSlope returns ∂L/∂ξ = [u/t − log1p(u)]/ξ² for u = ξs, t = 1 + u,
// which tends to −s²/2 as ξ → 0.
func reducedLogSlope(xi, s, t float64) float64 {
	u := xi * s
	if math.Abs(u) < 0.01 {
		// s²·Σ_{k≥2} (−1)^(k+1)·(k−1)/k·u^(k−2), truncated at k = 10.
		sum, pow := 0.0, 1.0
		for k := 2; k <= 10; k++ {
			c := float64(k-1) / float64(k)
			if k%2 == 0 {
				c = -c
			}
			sum += c * pow
			pow *= u
		}
		return s * s * sum
	}
	return (u/t - math.Log1p(u)) / (xi * xi)
}
