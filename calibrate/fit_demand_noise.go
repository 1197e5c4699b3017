package calibrate

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/stat"

	"wxstress/model"
)

// coldShare is the share of the record's coldest days on which the noise
// model's spread is checked.
const coldShare = 0.05

// chooseNoiseScale decides how the demand noise's innovations scale with
// the day, by Gaussian log-likelihood of the innovations e(t) = u(t) −
// φ·u(t−1): a constant σ, or σ·E(t)/Ē in proportion to the day's expected
// load, or one σ for each quarter of the days by temperature — by AIC
// unless setting names one; and
// checks the chosen scale on the coldest 5 % of days.
func chooseNoiseScale(m *model.Demand, days *DemandDays, fitted, resid []float64, setting string) {
	phi := m.Noise.Phi
	var e, load, temp []float64
	for i := 1; i < len(resid); i++ {
		if days.Dates[i] == days.Dates[i-1]+1 {
			e = append(e, resid[i]-phi*resid[i-1])
			load = append(load, fitted[i])
			temp = append(temp, days.Temp[i])
		}
	}
	n := float64(len(e))
	if n < 30 {
		return
	}
	mean := stat.Mean(load, nil)
	// Constant: σ̂² = Σe²/n. Load: e/r with r = E/Ē, σ̂² = Σ(e/r)²/n, and
	// log L adds −Σ log r.
	ll := func(scaled []float64, logJac float64) (float64, float64) {
		ss := 0.0
		for _, v := range scaled {
			ss += v * v
		}
		s2 := ss / n
		return -0.5*n*(math.Log(2*math.Pi*s2)+1) - logJac, math.Sqrt(s2)
	}
	llConst, _ := ll(e, 0)
	scaled := make([]float64, len(e))
	logJac := 0.0
	ok := mean > 0
	for i, v := range e {
		r := load[i] / mean
		if !(r > 0) {
			ok = false
			break
		}
		scaled[i] = v / r
		logJac += math.Log(r)
	}
	m.Noise.Scale, m.Noise.MeanLoad = "constant", 0
	cands := []model.NoiseScore{{Scale: "constant", Sigma: m.Noise.Sigma, LogLik: llConst, Params: 1}}
	if ok {
		llLoad, sLoad := ll(scaled, logJac)
		cands = append(cands, model.NoiseScore{Scale: "load", Sigma: sLoad, LogLik: llLoad, Params: 1})
	}
	// Bands: one σ for each quarter of the days by temperature.
	sortedT := slices.Clone(temp)
	slices.Sort(sortedT)
	edges := []float64{stat.Quantile(0.25, stat.LinInterp, sortedT, nil), stat.Quantile(0.5, stat.LinInterp, sortedT, nil),
		stat.Quantile(0.75, stat.LinInterp, sortedT, nil)}
	bandOf := func(t float64) int {
		i := 0
		for i < len(edges) && t >= edges[i] {
			i++
		}
		return i
	}
	var ss [4]float64
	var cnt [4]int
	for i, v := range e {
		b := bandOf(temp[i])
		ss[b] += v * v
		cnt[b]++
	}
	bandSigma := make([]float64, 4)
	llBands, bandsOK := 0.0, true
	for b := range ss {
		if cnt[b] < 10 || !(ss[b] > 0) {
			bandsOK = false
			break
		}
		s2 := ss[b] / float64(cnt[b])
		bandSigma[b] = math.Sqrt(s2)
		llBands -= 0.5 * float64(cnt[b]) * (math.Log(2*math.Pi*s2) + 1)
	}
	if bandsOK && edges[0] < edges[1] && edges[1] < edges[2] {
		cands = append(cands, model.NoiseScore{Scale: "bands", Sigma: m.Noise.Sigma, LogLik: llBands, Params: 4})
	}
	best := 0
	for i := range cands {
		cands[i].AIC = -2*cands[i].LogLik + 2*float64(cands[i].Params)
		if cands[i].AIC < cands[best].AIC {
			best = i
		}
	}
	for i, c := range cands {
		if c.Scale == setting {
			best = i // fixed by the user
		}
	}
	cands[best].Chosen = true
	m.Noise.Choice = cands
	switch cands[best].Scale {
	case "load":
		m.Noise.Scale, m.Noise.Sigma, m.Noise.MeanLoad = "load", cands[best].Sigma, mean
	case "bands":
		m.Noise.Scale, m.Noise.BandEdges, m.Noise.BandSigma = "bands", edges, bandSigma
	}
	// The coldest 5 % of days: the innovations' sd against the model's.
	sorted := slices.Clone(temp)
	slices.Sort(sorted)
	below := stat.Quantile(coldShare, stat.LinInterp, sorted, nil)
	var cold, modelVar []float64
	for i, t := range temp {
		if t <= below {
			cold = append(cold, e[i])
			s := m.Noise.NoiseSigma(load[i], t)
			modelVar = append(modelVar, s*s)
		}
	}
	if len(cold) >= 10 {
		m.Noise.Cold = &model.NoiseCheck{Days: len(cold), Below: below,
			Observed: math.Sqrt(stat.Mean(squares(cold), nil)), Model: math.Sqrt(stat.Mean(modelVar, nil))}
	}
}

func squares(v []float64) []float64 {
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x * x
	}
	return out
}
