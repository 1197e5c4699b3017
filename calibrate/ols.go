package calibrate

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// olsFit is an ordinary least-squares fit y ≈ Xβ.
type olsFit struct {
	Beta []float64
	SE   []float64 // standard errors, σ̂²(XᵀX)⁻¹ with σ̂² = RSS/(n − k)
	RSS  float64
	TSS  float64 // total sum of squares about the mean of y
	N    int
}

// BIC is the Bayesian information criterion of the Gaussian likelihood,
// n·ln(2π·RSS/n) + n + (k + 1)·ln n, counting σ² as a parameter: the value R's
// BIC() gives for an lm fit, so tables can be checked against it.
func (f olsFit) BIC() float64 { return lsBIC(f.RSS, f.N, len(f.Beta)) }

// R2 is the coefficient of determination about the mean.
func (f olsFit) R2() float64 { return 1 - f.RSS/f.TSS }

var errRankDeficient = errors.New("design matrix is rank deficient")

// ols solves the least-squares problem by QR factorisation (gonum mat.QR)
// and derives the coefficient covariance from R: (XᵀX)⁻¹ = R⁻¹R⁻ᵀ.
func ols(x *mat.Dense, y []float64) (olsFit, error) {
	n, k := x.Dims()
	if n <= k {
		return olsFit{}, errRankDeficient
	}
	var qr mat.QR
	qr.Factorize(x)
	var beta mat.Dense
	if err := qr.SolveTo(&beta, false, mat.NewVecDense(n, y)); err != nil {
		return olsFit{}, errRankDeficient
	}
	f := olsFit{Beta: make([]float64, k), SE: make([]float64, k), N: n}
	for j := range k {
		f.Beta[j] = beta.At(j, 0)
	}
	mean := 0.0
	for _, v := range y {
		mean += v
	}
	mean /= float64(n)
	for i := range n {
		fit := 0.0
		for j := range k {
			fit += x.At(i, j) * f.Beta[j]
		}
		r := y[i] - fit
		f.RSS += r * r
		f.TSS += (y[i] - mean) * (y[i] - mean)
	}
	var r mat.Dense
	qr.RTo(&r)
	tri := mat.NewTriDense(k, mat.Upper, nil)
	for i := range k {
		for j := i; j < k; j++ {
			tri.SetTri(i, j, r.At(i, j))
		}
	}
	var inv mat.TriDense
	if err := inv.InverseTri(tri); err != nil {
		return olsFit{}, errRankDeficient
	}
	s2 := f.RSS / float64(n-k)
	for j := range k {
		v := 0.0
		for c := j; c < k; c++ {
			v += inv.At(j, c) * inv.At(j, c)
		}
		f.SE[j] = math.Sqrt(s2 * v)
	}
	return f, nil
}

// k returns the number of regression coefficients of a fit.
func (o olsFit) k() int { return len(o.Beta) }
