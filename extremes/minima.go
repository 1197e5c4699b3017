package extremes

import "math"

// MinimaFit is a GEV fit to block minima (Coles 2001, §3.2): if M is the
// minimum of a block, −M is the maximum of the negated values, so the GEV is
// fitted to −x and every level is negated back. Negated holds that fit, in
// the units of −x. A MinimaFit is safe for concurrent use.
type MinimaFit struct {
	Negated *FitResult
}

// FitMinima fits block minima x by fitting the GEV to −x with Fit; its errors
// are Fit's.
func FitMinima(x []float64) (*MinimaFit, error) {
	// Checked before negating so that errors show the values as given.
	if err := checkSample(x); err != nil {
		return nil, err
	}
	neg := make([]float64, len(x))
	for i, v := range x {
		neg[i] = -v
	}
	r, err := Fit(neg)
	if err != nil {
		return nil, err
	}
	return &MinimaFit{Negated: r}, nil
}

// CDF returns P(M ≤ z) = 1 − G(−z), G the GEV fitted to the negated values.
func (m *MinimaFit) CDF(z float64) float64 {
	return 1 - m.Negated.CDF(-z)
}

// ReturnLevel returns the T-block return level of the minima: the level the
// block minimum falls below with probability 1/T in any one block, −z_p of the
// negated fit. It panics unless T > 1.
func (m *MinimaFit) ReturnLevel(T float64) float64 {
	return -m.Negated.ReturnLevel(T)
}

// ReturnLevelSE returns the delta-method standard error of ReturnLevel(T),
// the same as the negated fit's.
func (m *MinimaFit) ReturnLevelSE(T float64) float64 {
	return m.Negated.ReturnLevelSE(T)
}

// ReturnLevelInterval returns the profile-likelihood interval of
// ReturnLevel(T): the negated fit's interval (lo, hi) becomes (−hi, −lo).
// Errors and panics as for FitResult.ReturnLevelInterval.
func (m *MinimaFit) ReturnLevelInterval(T, level float64) (lo, hi float64, err error) {
	nlo, nhi, err := m.Negated.ReturnLevelInterval(T, level)
	if err != nil {
		return math.NaN(), math.NaN(), err
	}
	return -nhi, -nlo, nil
}
