package calibrate

import (
	"fmt"
	"math"

	"wxstress/model"
	"wxstress/shocks"
	"wxstress/statespace"
)

// fitLean finishes a lean fit (Settings.Lean) once the mean model is in f
// and res holds the anomaly: the anomaly model by one maximum-likelihood run
// (statespace.FitLean, from set.Start when given), the monthly σ, the slow
// part's state at the data end, and the fixed shock family on the
// standardized innovations. No diagnostics.
func fitLean(res *Result, s *Series, set *Settings, f *model.File) (*Result, error) {
	for i := range s.Temps {
		res.Fitted[i] = f.Mean(s.Date(i).ModelTime())
		res.Anomaly[i] = s.Temps[i] - res.Fitted[i]
	}
	x := res.Anomaly
	p := set.AROrder
	start := statespace.Params{Phi: make([]float64, p)}
	if m := set.Start; m != nil && len(m.AR.Phi) == p {
		copy(start.Phi, m.AR.Phi)
		start.Sigma = m.Volatility.Monthly
		if m.Slow != nil {
			start.PhiSlow, start.SDSlow = m.Slow.Phi, m.Slow.SD
		}
	} else {
		xm, y := lagged(x, p, p)
		fit, err := ols(xm, y)
		if err != nil {
			return nil, fmt.Errorf("%s: %w: AR(%d): %w", s.Name, ErrFit, p, err)
		}
		if model.SpectralRadius(fit.Beta) < 0.999 {
			copy(start.Phi, fit.Beta)
		} else {
			start.Phi[0] = 0.7
		}
		var v model.Volatility
		if err := monthlySigma(s, innovations(x, start.Phi), &v); err != nil {
			return nil, err
		}
		start.Sigma = v.Monthly
	}
	months := monthsOf(s)
	fit, err := statespace.FitLean(x, months, start, set.Slow == SlowOn)
	if err != nil {
		return nil, fmt.Errorf("%s: %w: %w", s.Name, ErrFit, err)
	}
	prm := fit.Params
	filt := statespace.Filter(x, months, prm, true)
	f.AR = model.AR{Phi: prm.Phi, PhiSE: make([]float64, p), Last: lastAnomalies(x, p)}
	if prm.HasSlow() {
		mean, sd := filt.SlowState(prm)
		f.Slow = &model.Slow{Phi: prm.PhiSlow, SD: prm.SDSlow, EFoldingDays: prm.EFolding(), State: mean, StateSD: sd}
	}
	setVolatility(&f.Volatility, prm.Sigma, filt.Z, s)
	res.Z = filt.Z
	var zc []float64
	for _, v := range filt.Z {
		if !math.IsNaN(v) {
			zc = append(zc, v)
		}
	}
	f.Shocks = model.Shocks{Family: set.Shocks}
	switch set.Shocks {
	case model.FamilyStudentT:
		t, err := shocks.FitStudentT(zc)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", s.Name, err)
		}
		f.Shocks.DF = t.Dist.(shocks.StudentT).Nu
	case model.FamilySkewT:
		st, err := shocks.FitSkewT(zc)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", s.Name, err)
		}
		d := st.Dist.(shocks.SkewT)
		f.Shocks.DF, f.Shocks.Skew = d.Nu, d.Xi
	}
	f.Diagnostics = nil
	return res, nil
}
