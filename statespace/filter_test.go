package statespace

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distmv"
)

// TestFilterMatchesDenseGaussian checks the filter against the exact
// Gaussian likelihood computed the textbook way: the observed days' joint
// covariance Σ(t, s) = γ_Y(|t − s|) + s_F² φ_sᶦᵗ⁻ˢᶦ (stationary with one σ),
// evaluated by gonum's multivariate normal (a Cholesky factorization). AR
// orders 1 to 5, with and without the slow part, with gaps.
func TestFilterMatchesDenseGaussian(t *testing.T) {
	t.Parallel()
	const n = 80
	const tol = 1e-8
	for _, tc := range []Params{
		{Phi: []float64{0.7}},
		{Phi: []float64{0.7}, PhiSlow: 0.97, SDSlow: 0.8},
		{Phi: []float64{0.9, -0.2}, PhiSlow: 0.95, SDSlow: 1.2},
		{Phi: []float64{0.6, 0.1, -0.05}},
		{Phi: []float64{0.5, 0.1, 0.05, -0.05, 0.02}, PhiSlow: 0.99, SDSlow: 0.5},
	} {
		tc.Sigma = sigmas(nil, 2.1)
		x, month := simulate(tc, n, 3)
		for _, i := range []int{5, 6, 7, 40} {
			x[i] = math.NaN()
		}
		var obs []int
		for i, v := range x {
			if !math.IsNaN(v) {
				obs = append(obs, i)
			}
		}
		g := autocovN(tc.Phi, 2.1*2.1, n)
		cov := mat.NewSymDense(len(obs), nil)
		xs := make([]float64, len(obs))
		for a, i := range obs {
			xs[a] = x[i]
			for b, j := range obs[:a+1] {
				lag := i - j
				v := g[lag]
				if tc.HasSlow() {
					v += tc.SDSlow * tc.SDSlow * math.Pow(tc.PhiSlow, float64(lag))
				}
				cov.SetSym(a, b, v)
			}
		}
		normal, ok := distmv.NewNormal(make([]float64, len(obs)), cov, nil)
		if !ok {
			t.Fatalf("%+v: covariance not positive definite", tc)
		}
		want := normal.LogProb(xs)
		if got := run(x, month, tc, nil, nil).LogLik; math.Abs(got-want) > tol {
			t.Errorf("AR(%d) slow %v: general filter %.10f, dense Gaussian %.10f", len(tc.Phi), tc.HasSlow(), got, want)
		}
		if got := LogLik(x, month, tc); math.Abs(got-want) > tol {
			t.Errorf("AR(%d) slow %v: LogLik %.10f, dense Gaussian %.10f", len(tc.Phi), tc.HasSlow(), got, want)
		}
	}
}

// autocovN returns γ₀..γₙ₋₁ of the AR with innovation variance s2.
func autocovN(phi []float64, s2 float64, n int) []float64 {
	psi := []float64{1}
	for j := 1; j < 5000; j++ {
		v := 0.0
		for i, c := range phi {
			if j-i-1 >= 0 {
				v += c * psi[j-i-1]
			}
		}
		psi = append(psi, v)
	}
	g := make([]float64, n)
	for k := range g {
		for j := 0; j+k < len(psi); j++ {
			g[k] += s2 * psi[j] * psi[j+k]
		}
	}
	return g
}
