package calibrate

import (
	"fmt"
	"maps"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"sync"
	"time"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"wxstress/calendar"
	"wxstress/model"
	"wxstress/statespace"
)

// Slow-part settings.
const (
	SlowAuto = "auto" // keep it when the likelihood-ratio test or the spread check asks for it
	SlowOn   = "on"
	SlowNone = "none"
)

// SlowLevel is the likelihood-ratio test's size for keeping the slow part.
const SlowLevel = 0.05

// SlowAdviceGain is the widening of the model's annual spread (0.05 is
// 5 %) beyond which a slow part that auto left out is named in the fit's
// warnings: the test's power on a few decades is limited, and the cost of
// a missed slow part (narrow seasonal and annual tails) is the one a risk
// reader cares about.
const SlowAdviceGain = 0.05

// SpreadWindows are the window lengths (days) of the spread check;
// selectionWindows are those whose spread decides on the slow part.
var (
	SpreadWindows    = [...]int{30, 91, 151, 365}
	selectionWindows = []int{151, 365}
)

// spreadReplicates is the number of simulated records behind each band: the
// 5 % and 95 % points of 200 draws are within about ±1.5 percentage points
// of their level (binomial), enough for a flag.
const spreadReplicates = 200

// anomalyFit is the outcome of fitting the anomaly's fast and slow parts.
type anomalyFit struct {
	chosen   *statespace.Fitted
	fastOnly *statespace.Fitted
	filtered *statespace.Filtered
}

// monthsOf returns the calendar month (0..11) of each day of s.
func monthsOf(s *Series) []uint8 {
	m := make([]uint8, len(s.Temps))
	for i := range m {
		m[i] = uint8(s.Date(i).Month() - 1)
	}
	return m
}

// fitAnomaly fits the fast AR (order by BIC unless fixed) and the slow part
// by exact likelihood, decides on the slow part, and fills the order table,
// the slow-part evidence and the window-spread check.
func fitAnomaly(s *Series, x []float64, set *Settings, start statespace.Params, clsPhi [][]float64,
	proj *projector, d *model.Diagnostics) (*anomalyFit, error) {
	months := monthsOf(s)
	consider := set.Slow != SlowNone
	fail := func(what string, err error) error {
		return fmt.Errorf("%s: %w: %s: %w", s.Name, ErrFit, what, err)
	}

	// Order table: AR(1) fitted in full, higher orders profiled with the
	// slow part and the σ pattern held (a lower bound on their maximum).
	base, err := statespace.Fit(x, months, start, consider)
	if err != nil {
		return nil, fail("AR(1)", err)
	}
	extra := 12
	if consider {
		extra += 2
	}
	logN := math.Log(float64(base.N))
	lls := make([]float64, MaxAROrder)
	lls[0] = base.LogLik
	var g errgroup.Group
	// The fast-only AR(1), wanted for the likelihood-ratio test when the
	// order comes out 1 (the usual case), is fitted beside the order table
	// rather than after it.
	var fastOnly1 *statespace.Fitted
	var fastOnly1Err error
	start1 := start
	start1.Phi = clsPhi[0]
	if consider && set.AROrder <= 1 {
		g.Go(func() error {
			fastOnly1, fastOnly1Err = statespace.Fit(x, months, start1, false)
			return nil
		})
	}
	for q := 2; q <= MaxAROrder; q++ {
		g.Go(func() error {
			ll, err := statespace.ProfileOrder(x, months, base.Params, q)
			if err != nil {
				return fail(fmt.Sprintf("AR(%d)", q), err)
			}
			lls[q-1] = ll
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	for q := 1; q <= MaxAROrder; q++ {
		d.ARTable = append(d.ARTable, model.OrderScore{Order: q, BIC: -2*lls[q-1] + float64(q+extra)*logN})
	}
	best := 0
	for i, r := range d.ARTable {
		if r.BIC < d.ARTable[best].BIC {
			best = i
		}
	}
	p := best + 1
	if set.AROrder > 0 {
		p = set.AROrder
		if gap := d.ARTable[p-1].BIC - d.ARTable[best].BIC; best+1 != p && gap > ARAdviceMargin {
			d.ARAdvice = fmt.Sprintf("BIC prefers AR(%d) over the fitted AR(%d) by %.0f; consider --ar %d or --ar auto",
				best+1, p, gap, best+1)
		}
	}
	d.ARTable[p-1].Chosen = true

	startP := start
	startP.Phi = clsPhi[p-1]
	withSlow := base
	if p > 1 && consider {
		st := startP
		st.Sigma, st.PhiSlow, st.SDSlow = base.Params.Sigma, base.Params.PhiSlow, base.Params.SDSlow
		if withSlow, err = statespace.Fit(x, months, st, true); err != nil {
			return nil, fail(fmt.Sprintf("AR(%d) with the slow part", p), err)
		}
	}
	var fastOnly *statespace.Fitted
	switch {
	case !consider && p == 1:
		fastOnly = base
	case p == 1 && (fastOnly1 != nil || fastOnly1Err != nil):
		if fastOnly, err = fastOnly1, fastOnly1Err; err != nil {
			return nil, fail("AR(1)", err)
		}
	default:
		if fastOnly, err = statespace.Fit(x, months, startP, false); err != nil {
			return nil, fail(fmt.Sprintf("AR(%d)", p), err)
		}
	}

	out := &anomalyFit{chosen: fastOnly, fastOnly: fastOnly}
	ch := &model.SlowChoice{Setting: set.Slow, LogLikWithout: fastOnly.LogLik, BICWithout: fastOnly.BIC()}
	if ch.Setting == "" {
		ch.Setting = SlowAuto
	}
	d.SlowChoice = ch
	if consider {
		ch.LogLikWith, ch.BICWith = withSlow.LogLik, withSlow.BIC()
		ch.LR = math.Max(2*(withSlow.LogLik-fastOnly.LogLik), 0)
		ch.P = 0.5*(1-distuv.ChiSquared{K: 1}.CDF(ch.LR)) + 0.5*(1-distuv.ChiSquared{K: 2}.CDF(ch.LR))
	}
	bandsFast := spreadBands(s, x, months, fastOnly.Params, proj)
	var narrow []int
	for i, L := range SpreadWindows {
		if slices.Contains(selectionWindows, L) && bandsFast[i].ok && bandsFast[i].observed > bandsFast[i].hi {
			narrow = append(narrow, L)
		}
	}
	ch.SpreadTooNarrow = narrow
	if consider {
		// What leaving the slow part out costs at the annual scale: the
		// likelihood-ratio test has limited power on a few decades, and a
		// missed slow part narrows every seasonal and annual tail.
		if i := slices.Index(SpreadWindows[:], 365); bandsFast[i].ok {
			with := modelWindowSD(s, withSlow.Params, 365, bandsFast[i].starts)
			without := modelWindowSD(s, fastOnly.Params, 365, bandsFast[i].starts)
			ch.AnnualSpreadGain = with/without - 1
		}
	}
	switch ch.Setting {
	case SlowNone:
		ch.Rule = "slow part not requested (--slow none)"
	case SlowOn:
		ch.Kept, ch.Rule = true, "kept as requested (--slow on)"
	default:
		switch {
		case ch.P < SlowLevel:
			ch.Kept = true
			ch.Rule = fmt.Sprintf("auto: kept, likelihood-ratio test p %s, below the %.2f level", pText(ch.P), SlowLevel)
		case len(narrow) > 0:
			ch.Kept = true
			ch.Rule = fmt.Sprintf("auto: kept, without it the %s-day spread lies above its 90 %% band (likelihood-ratio test p %s)",
				joinInts(narrow), pText(ch.P))
		default:
			ch.Rule = fmt.Sprintf("auto: left out, likelihood-ratio test p %s, not below the %.2f level, and the 151- and 365-day spreads lie inside the band without it",
				pText(ch.P), SlowLevel)
		}
	}
	if ch.Kept {
		out.chosen = withSlow
	} else if ch.Setting == SlowAuto && ch.AnnualSpreadGain > SlowAdviceGain {
		d.SlowAdvice = fmt.Sprintf("the slow part was left out (likelihood-ratio test p %s), but with it the model's spread of "+
			"365-day means would be %.0f %% wider: if seasonal or annual tails matter, compare with --slow on",
			pText(ch.P), 100*ch.AnnualSpreadGain)
	}
	out.filtered = statespace.Filter(x, months, out.chosen.Params, true)

	// The spread table of the chosen model, with the fast-only band beside it.
	bands := bandsFast
	if ch.Kept {
		bands = spreadBands(s, x, months, out.chosen.Params, proj)
	}
	for i, L := range SpreadWindows {
		b := bands[i]
		ws := model.WindowSpread{Days: L, Windows: b.windows}
		if !b.ok {
			d.Spread = append(d.Spread, ws)
			continue
		}
		ws.Observed, ws.Band = b.observed, [2]float64{b.lo, b.hi}
		ws.Model = modelWindowSD(s, out.chosen.Params, L, b.starts)
		if ch.Kept {
			bf := [2]float64{bandsFast[i].lo, bandsFast[i].hi}
			ws.BandFastOnly = &bf
		}
		switch {
		case b.observed > b.hi:
			ws.Verdict = "too narrow"
		case b.observed < b.lo:
			ws.Verdict = "too wide"
		default:
			ws.Verdict = "inside"
		}
		d.Spread = append(d.Spread, ws)
	}
	return out, nil
}

// band is one window length's spread check.
type band struct {
	ok               bool
	windows          int
	starts           []int // first day of each window used
	observed, lo, hi float64
}

// spreadBands returns, for each of SpreadWindows, the observed sd of the
// window means of x and the 5–95 % range of that sd over records simulated
// from prm with x's gaps, each detrended by the mean model as the data were.
func spreadBands(s *Series, x []float64, months []uint8, prm statespace.Params, proj *projector) []band {
	out := make([]band, len(SpreadWindows))
	for i, L := range SpreadWindows {
		sd, starts := windowSD(x, L)
		out[i] = band{ok: len(starts) >= 2, windows: len(starts), starts: starts, observed: sd}
	}
	sims := make([][]float64, len(SpreadWindows))
	for i := range sims {
		sims[i] = make([]float64, spreadReplicates)
	}
	// The replicates (each its own seed) are shared out among the
	// processors; each writes its own slot, so the result does not depend
	// on their number.
	workers := runtime.GOMAXPROCS(0)
	var wg sync.WaitGroup
	for w := range workers {
		wg.Go(func() {
			rec := make([]float64, len(x))
			obsVals := make([]float64, len(proj.idx))
			for r := w; r < spreadReplicates; r += workers {
				simulateAnomaly(prm, months, rec, uint64(r))
				for j, i := range proj.idx {
					obsVals[j] = rec[i]
				}
				res := proj.residuals(obsVals)
				for i := range rec {
					rec[i] = math.NaN()
				}
				for j, i := range proj.idx {
					rec[i] = res[j]
				}
				for i, L := range SpreadWindows {
					if out[i].ok {
						sims[i][r], _ = windowSD(rec, L)
					}
				}
			}
		})
	}
	wg.Wait()
	for i := range out {
		if !out[i].ok {
			continue
		}
		slices.Sort(sims[i])
		out[i].lo = stat.Quantile(0.05, stat.LinInterp, sims[i], nil)
		out[i].hi = stat.Quantile(0.95, stat.LinInterp, sims[i], nil)
	}
	return out
}

// windowSD returns the sd of the means of non-overlapping L-day windows of
// x from its first day, skipping windows that miss more than a tenth of
// their days, and the first day of each window used.
func windowSD(x []float64, L int) (float64, []int) {
	var means []float64
	var starts []int
	for a := 0; a+L <= len(x); a += L {
		sum, n := 0.0, 0
		for _, v := range x[a : a+L] {
			if !math.IsNaN(v) {
				sum += v
				n++
			}
		}
		if n < L*9/10 {
			continue
		}
		means = append(means, sum/float64(n))
		starts = append(starts, a)
	}
	if len(means) < 2 {
		return 0, starts
	}
	return stat.StdDev(means, nil), starts
}

// simulateAnomaly fills rec with one record of the anomaly model (normal
// shocks: window means are sums of many days, so the shock family hardly
// matters) from its stationary law, the fast part after a burn-in.
func simulateAnomaly(prm statespace.Params, months []uint8, rec []float64, seed uint64) {
	r := rand.New(rand.NewPCG(seed, 0x5b1d))
	p := len(prm.Phi)
	var lags [statespace.MaxOrder]float64
	f := prm.SDSlow * r.NormFloat64()
	q := prm.SDSlow * math.Sqrt(1-prm.PhiSlow*prm.PhiSlow)
	burn := 200
	for t := -burn; t < len(rec); t++ {
		m := months[max(t, 0)]
		y := prm.Sigma[m] * r.NormFloat64()
		for i := range p {
			y += prm.Phi[i] * lags[i]
		}
		copy(lags[1:p], lags[:p-1])
		lags[0] = y
		f = prm.PhiSlow*f + q*r.NormFloat64()
		if t >= 0 {
			rec[t] = y + f
		}
	}
}

// modelWindowSD is the model's sd of L-day window means over the windows
// starting at starts, averaged in variance:
//
//	Var(Σ_{t∈W} Y_t) = Σ_s σ²(s) · (Σ_{t∈W, t≥s} ψ_{t−s})²
//	Var(Σ_{t∈W} F_t) = s_F² · [L + 2 Σ_{k=1..L−1} (L − k) φ_sᵏ]
//
// with ψ the fast AR's impulse response.
func modelWindowSD(s *Series, prm statespace.Params, L int, starts []int) float64 {
	psi := model.ImpulseResponse(prm.Phi)
	cum := make([]float64, len(psi))
	acc := 0.0
	for j, v := range psi {
		acc += v
		cum[j] = acc
	}
	at := func(j int) float64 { // Σ_{k=0..j} ψ_k
		if j < 0 {
			return 0
		}
		return cum[min(j, len(cum)-1)]
	}
	slowVar := 0.0
	if prm.HasSlow() {
		sum, pk := float64(L), 1.0
		for k := 1; k < L; k++ {
			pk *= prm.PhiSlow
			sum += 2 * float64(L-k) * pk
		}
		slowVar = prm.SDSlow * prm.SDSlow * sum
	}
	varSum := 0.0
	for _, a := range starts {
		end := a + L - 1
		v := slowVar
		for s0 := a - len(psi); s0 <= end; s0++ {
			w := at(end-s0) - at(a-1-s0)
			sg := prm.Sigma[s.Date(s0).Month()-1]
			v += sg * sg * w * w
		}
		varSum += v / float64(L*L)
	}
	return math.Sqrt(varSum / float64(len(starts)))
}

// projector removes the mean model's fit from values on the observed days:
// r = y − X(XᵀX)⁻¹Xᵀy.
type projector struct {
	idx []int // observed days
	x   *mat.Dense
	ch  mat.Cholesky
}

func newProjector(x *mat.Dense, idx []int) (*projector, error) {
	p := &projector{idx: idx, x: x}
	var xtx mat.SymDense
	xtx.SymOuterK(1, x.T())
	if !p.ch.Factorize(&xtx) {
		return nil, fmt.Errorf("mean model's design is singular")
	}
	return p, nil
}

func (p *projector) residuals(y []float64) []float64 {
	yv := mat.NewVecDense(len(y), y)
	var xty, beta, fit mat.VecDense
	xty.MulVec(p.x.T(), yv)
	if err := p.ch.SolveVecTo(&beta, &xty); err != nil {
		panic("calibrate: " + err.Error())
	}
	fit.MulVec(p.x, &beta)
	r := make([]float64, len(y))
	for i := range r {
		r[i] = y[i] - fit.AtVec(i)
	}
	return r
}

// annualSlope regresses calendar-year mean anomalies (temperature minus the
// seasonal cycle, over years with at least 90 % of their days) on the year
// and returns the slope and its ordinary standard error, per decade.
func annualSlope(s *Series, seasonal model.Seasonal) (slope, se float64, years int) {
	type acc struct {
		sum float64
		n   int
	}
	byYear := map[int]*acc{}
	for i, v := range s.Temps {
		if math.IsNaN(v) {
			continue
		}
		d := s.Date(i)
		a := byYear[d.Year()]
		if a == nil {
			a = &acc{}
			byYear[d.Year()] = a
		}
		a.sum += v - seasonal.At(d.ModelTime())
		a.n++
	}
	var xs, ys []float64
	order := slices.Sorted(maps.Keys(byYear)) // a fixed order: the sums do not depend on map iteration
	for _, y := range order {
		a := byYear[y]
		days := int(calendar.FromYMD(y+1, time.January, 1) - calendar.FromYMD(y, time.January, 1))
		if a.n >= days*9/10 {
			xs = append(xs, float64(y))
			ys = append(ys, a.sum/float64(a.n))
		}
	}
	if len(xs) < 3 {
		return 0, 0, len(xs)
	}
	_, b := stat.LinearRegression(xs, ys, nil, false)
	mx := stat.Mean(xs, nil)
	rss, sxx := 0.0, 0.0
	a0 := stat.Mean(ys, nil) - b*mx
	for i := range xs {
		r := ys[i] - a0 - b*xs[i]
		rss += r * r
		sxx += (xs[i] - mx) * (xs[i] - mx)
	}
	se = math.Sqrt(rss / float64(len(xs)-2) / sxx)
	return 10 * b, 10 * se, len(xs)
}

// pText writes a p-value for people: "< 0.0001" or "= 0.0123".
func pText(p float64) string {
	if p < 1e-4 {
		return "< 0.0001"
	}
	return fmt.Sprintf("= %.4f", p)
}

func joinInts(v []int) string {
	s := ""
	for i, x := range v {
		if i > 0 {
			s += " and "
		}
		s += fmt.Sprint(x)
	}
	return s
}
