package calibrate

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"

	"wxstress/calendar"
	"wxstress/model"
)

// The balance-point search of the change-point forms: every grid point's
// fit by least squares, reduced by the Frisch–Waugh–Lovell theorem to a 2×2
// solve (see demandFitter).

// Balance-point search.
const (
	// BalanceStep is the grid step of the balance-point search, in degrees
	// of the data's units.
	BalanceStep = 0.1
	// The search covers the balance points between these percentiles of
	// the fitted days' temperatures (R's default, type 7, definition): a
	// change point beyond them would rest on a twentieth of the days.
	searchLow, searchHigh = 0.05, 0.95
)

// demandFitter holds what the grid search shares between grid points: the
// fixed regressors Z (intercept, weekday dummies, holiday), the load y and
// both residualised on Z, and, for every grid value g, the heating column
// h = max(g − T, 0) and cooling column c = max(T − g, 0) reduced to the
// few numbers the least-squares solution needs.
//
// By the Frisch–Waugh–Lovell theorem the residual sum of squares of y on
// [Z, h, c] is that of ỹ on [h̃, c̃], where ˜ is the residual on Z, so each
// grid point costs a 2×2 solve: h̃ᵀh̃, c̃ᵀc̃, h̃ᵀỹ and c̃ᵀỹ depend on one
// balance point only, and h̃ᵀc̃ = hᵀc − (Zᵀh)ᵀ(ZᵀZ)⁻¹(Zᵀc) where hᵀc = 0
// whenever TbH ≤ TbC (no day is both below TbH and above TbC).
type demandFitter struct {
	n, k   int
	dates  []calendar.Date
	temp   []float64
	y      []float64
	hol    []bool
	z      *mat.Dense
	qr     mat.QR
	wdCol  [7]int // column of each weekday's dummy (Monday = 0), -1 for none
	holCol int    // column of the holiday dummy, -1 for none
	yy     float64
	yt     []float64 // ỹ
	lo10   int       // first grid value in tenths of a degree
	heat   []gridSide
	cool   []gridSide
}

// gridSide is one change-point column at one grid value, reduced.
type gridSide struct {
	ok  bool      // the column is not (numerically) within the span of Z
	zt  []float64 // Zᵀx
	w   []float64 // (ZᵀZ)⁻¹Zᵀx, the least-squares coefficients of x on Z
	xx  float64   // x̃ᵀx̃
	xy  float64   // x̃ᵀỹ
	max float64   // largest |x|, for the scale of xx
}

func newDemandFitter(dates []calendar.Date, temp, load []float64, hol []bool) (*demandFitter, error) {
	n := len(dates)
	f := &demandFitter{n: n, dates: dates, temp: temp, y: load, hol: hol, holCol: -1}
	var count [7]int
	anyHol := false
	for i, d := range dates {
		count[(d.Weekday()+6)%7]++
		anyHol = anyHol || hol[i]
	}
	f.k = 1
	f.wdCol[0] = -1
	for wd := 1; wd < 7; wd++ {
		f.wdCol[wd] = -1
		if count[wd] > 0 {
			f.wdCol[wd] = f.k
			f.k++
		}
	}
	if anyHol {
		f.holCol = f.k
		f.k++
	}
	if n <= f.k+4 {
		return nil, fmt.Errorf("%w: %d days are too few for %d coefficients", ErrFit, n, f.k+4)
	}
	f.z = mat.NewDense(n, f.k, nil)
	for i, d := range dates {
		row := f.z.RawRowView(i)
		row[0] = 1
		if c := f.wdCol[(d.Weekday()+6)%7]; c > 0 {
			row[c] = 1
		}
		if hol[i] && f.holCol > 0 {
			row[f.holCol] = 1
		}
	}
	f.qr.Factorize(f.z)
	if err := f.checkCalendarTerms(hol); err != nil {
		return nil, err
	}
	w, err := f.project(load)
	if err != nil {
		return nil, err
	}
	f.yt = make([]float64, n)
	for i := range load {
		f.yt[i] = load[i] - f.fitZ(i, w)
		f.yy += f.yt[i] * f.yt[i]
	}

	lo, hi := quantile7(temp, searchLow), quantile7(temp, searchHigh)
	f.lo10 = int(math.Ceil(roundTo(lo*10, 6)))
	hi10 := int(math.Floor(roundTo(hi*10, 6)))
	if hi10 <= f.lo10 {
		return nil, fmt.Errorf("%w: the temperatures hardly vary (5th to 95th percentile %.2f to %.2f): no balance point can be found",
			ErrFit, lo, hi)
	}
	g := hi10 - f.lo10 + 1
	f.heat, f.cool = make([]gridSide, g), make([]gridSide, g)
	x := make([]float64, n)
	for j := range g {
		tb := f.gridValue(j)
		for i, t := range temp {
			x[i] = max(tb-t, 0)
		}
		f.heat[j] = f.reduce(x)
		for i, t := range temp {
			x[i] = max(t-tb, 0)
		}
		f.cool[j] = f.reduce(x)
	}
	return f, nil
}

// checkCalendarTerms refuses calendar terms the data cannot tell apart (a
// holiday column that marks every day, or every day of the weekdays it
// marks): the least-squares coefficients would be arbitrary, of the order
// of 10¹⁵ with opposite signs. A column whose diagonal entry of R is below
// 10⁻⁹ of the largest lies numerically in the span of the others.
func (f *demandFitter) checkCalendarTerms(hol []bool) error {
	var r mat.Dense
	f.qr.RTo(&r)
	big := 0.0
	for j := range f.k {
		big = max(big, math.Abs(r.At(j, j)))
	}
	for j := 1; j < f.k; j++ {
		if math.Abs(r.At(j, j)) > 1e-9*big {
			continue
		}
		if j == f.holCol {
			marked := 0
			for _, h := range hol {
				if h {
					marked++
				}
			}
			return fmt.Errorf("%w: the holiday column marks %d of %d days, which the base load and weekday effects already "+
				"describe: a holiday effect cannot be told apart from them (mark only the holidays)", ErrFit, marked, f.n)
		}
		return fmt.Errorf("%w: the calendar terms of the demand model cannot be told apart on these days (term %d)", ErrFit, j)
	}
	return nil
}

// gridValue returns the j-th grid balance point. Dividing whole tenths
// gives the same floating-point values as (lo:hi)/10 in R.
func (f *demandFitter) gridValue(j int) float64 { return float64(f.lo10+j) / 10 }

func roundTo(v float64, digits int) float64 {
	s := math.Pow(10, float64(digits))
	return math.Round(v*s) / s
}

// quantile7 is the p-quantile by linear interpolation between order
// statistics, R's quantile(type = 7). gonum's stat.Quantile offers types 1
// and 4 only; type 7 (R's and NumPy's default) keeps the balance-point search
// range identical to the R script that checks it.
func quantile7(x []float64, p float64) float64 {
	s := slices.Clone(x)
	slices.Sort(s)
	h := float64(len(s)-1) * p
	lo := int(math.Floor(h))
	if lo+1 >= len(s) {
		return s[len(s)-1]
	}
	return s[lo] + (h-float64(lo))*(s[lo+1]-s[lo])
}

// project returns the least-squares coefficients of v on Z.
func (f *demandFitter) project(v []float64) ([]float64, error) {
	var w mat.Dense
	if err := f.qr.SolveTo(&w, false, mat.NewVecDense(f.n, v)); err != nil {
		return nil, fmt.Errorf("%w: weekday and holiday terms: %w", ErrFit, errRankDeficient)
	}
	out := make([]float64, f.k)
	for j := range out {
		out[j] = w.At(j, 0)
	}
	return out, nil
}

// fitZ returns row i of Z times w.
func (f *demandFitter) fitZ(i int, w []float64) float64 {
	v := 0.0
	for j, zj := range f.z.RawRowView(i) {
		v += zj * w[j]
	}
	return v
}

// reduce residualises a change-point column x on Z.
func (f *demandFitter) reduce(x []float64) gridSide {
	s := gridSide{zt: make([]float64, f.k)}
	for i, v := range x {
		s.max = max(s.max, math.Abs(v))
		for j, zj := range f.z.RawRowView(i) {
			s.zt[j] += zj * v
		}
	}
	if s.max == 0 {
		return s
	}
	w, err := f.project(x)
	if err != nil {
		return s
	}
	s.w = w
	for i, v := range x {
		r := v - f.fitZ(i, w)
		s.xx += r * r
		s.xy += r * f.yt[i]
	}
	// A column (nearly) within the span of Z, e.g. nonzero on a single
	// day, carries no information about a slope.
	s.ok = s.xx > 1e-10*s.max*s.max*float64(f.n)
	return s
}

// gridBest is a form's best grid point.
type gridBest struct {
	ok       bool
	i, j     int // heating and cooling grid indexes (-1 when the form has no such side)
	tbH, tbC float64
	bH, bC   float64 // slopes
	rss      float64
	profH    []float64 // minimum RSS at each heating grid value (heating-and-cooling-band: over the cooling one)
	profC    []float64
}

// pair returns the RSS and slopes of y on [Z, h_i, c_j] for grid indexes
// with i ≤ j; ok is false for a degenerate pair.
func (f *demandFitter) pair(i, j int) (rss, bH, bC float64, ok bool) {
	h, c := &f.heat[i], &f.cool[j]
	if !h.ok || !c.ok {
		return 0, 0, 0, false
	}
	x := 0.0 // h̃ᵀc̃ = −(Zᵀh)ᵀ(ZᵀZ)⁻¹(Zᵀc), since hᵀc = 0 for TbH ≤ TbC
	for k, v := range h.zt {
		x -= v * c.w[k]
	}
	det := h.xx*c.xx - x*x
	if !(det > 1e-12*h.xx*c.xx) {
		return 0, 0, 0, false
	}
	bH = (c.xx*h.xy - x*c.xy) / det
	bC = (h.xx*c.xy - x*h.xy) / det
	return f.yy - (bH*h.xy + bC*c.xy), bH, bC, true
}

// search finds the form's grid point of least RSS (the first on ties).
func (f *demandFitter) search(form string) gridBest {
	g := len(f.heat)
	b := gridBest{i: -1, j: -1, rss: math.Inf(1)}
	profile := func() []float64 {
		p := make([]float64, g)
		for k := range p {
			p[k] = math.Inf(1)
		}
		return p
	}
	take := func(rss float64, i, j int, bH, bC float64) {
		if rss < b.rss {
			b = gridBest{ok: true, i: i, j: j, bH: bH, bC: bC, rss: rss, profH: b.profH, profC: b.profC}
		}
	}
	switch form {
	case model.FormHeatingOnly, model.FormCoolingOnly:
		sides := f.heat
		if form == model.FormCoolingOnly {
			sides = f.cool
		}
		prof := profile()
		for k, s := range sides {
			if !s.ok {
				continue
			}
			beta := s.xy / s.xx
			prof[k] = f.yy - beta*s.xy
			if form == model.FormHeatingOnly {
				take(prof[k], k, -1, beta, 0)
			} else {
				take(prof[k], -1, k, 0, beta)
			}
		}
		if form == model.FormHeatingOnly {
			b.profH = prof
		} else {
			b.profC = prof
		}
	case model.FormHeatingCooling:
		prof := profile()
		for k := range g {
			if rss, bH, bC, ok := f.pair(k, k); ok {
				prof[k] = rss
				take(rss, k, k, bH, bC)
			}
		}
		b.profH = prof
	case model.FormHeatingCoolingBand:
		ph, pc := profile(), profile()
		for i := range g {
			for j := i; j < g; j++ {
				if rss, bH, bC, ok := f.pair(i, j); ok {
					ph[i] = min(ph[i], rss)
					pc[j] = min(pc[j], rss)
					take(rss, i, j, bH, bC)
				}
			}
		}
		b.profH, b.profC = ph, pc
	default:
		panic("calibrate: unknown demand form " + form)
	}
	if b.i >= 0 {
		b.tbH = f.gridValue(b.i)
	}
	if b.j >= 0 {
		b.tbC = f.gridValue(b.j)
	}
	return b
}

func (b gridBest) score(form string, f *demandFitter) model.FormScore {
	s := model.FormScore{Form: form, Parameters: f.k + model.DemandForm(form).Params()}
	if !b.ok {
		s.Note = "no usable balance point in the search range"
		return s
	}
	s.RSS = b.rss
	s.BIC = demandBIC(f.n, b.rss, s.Parameters)
	var bad []string
	switch form {
	case model.FormHeatingOnly:
		s.BalancePoints, s.Slopes = []float64{b.tbH}, []float64{b.bH}
	case model.FormCoolingOnly:
		s.BalancePoints, s.Slopes = []float64{b.tbC}, []float64{b.bC}
	case model.FormHeatingCooling:
		s.BalancePoints, s.Slopes = []float64{b.tbH}, []float64{b.bH, b.bC}
	case model.FormHeatingCoolingBand:
		s.BalancePoints, s.Slopes = []float64{b.tbH, b.tbC}, []float64{b.bH, b.bC}
	}
	if model.DemandForm(form).HasHeating() && !(b.bH > 0) {
		bad = append(bad, fmt.Sprintf("heating slope %.4g is not positive", b.bH))
	}
	if model.DemandForm(form).HasCooling() && !(b.bC > 0) {
		bad = append(bad, fmt.Sprintf("cooling slope %.4g is not positive", b.bC))
	}
	s.Valid = len(bad) == 0
	s.Note = strings.Join(bad, "; ")
	return s
}

// profiles returns the RSS profiles of a form's search, with grid points
// that had no fit set to the largest value found (JSON has no infinity).
func (f *demandFitter) profiles(form string, b gridBest) []model.DemandProfile {
	var out []model.DemandProfile
	for _, p := range []struct {
		side string
		rss  []float64
	}{{"heating", b.profH}, {"cooling", b.profC}} {
		if p.rss == nil {
			continue
		}
		side := p.side
		if form == model.FormHeatingCooling {
			side = "both"
		}
		top := 0.0
		for _, v := range p.rss {
			if !math.IsInf(v, 1) {
				top = max(top, v)
			}
		}
		rss := slices.Clone(p.rss)
		for k, v := range rss {
			if math.IsInf(v, 1) {
				rss[k] = top
			}
		}
		out = append(out, model.DemandProfile{Form: form, Side: side, Start: f.gridValue(0), Step: BalanceStep, RSS: rss})
	}
	return out
}

// design returns [Z, h, c] for the form at the balance points (columns
// absent from the form are left out).
func (f *demandFitter) design(form string, tbH, tbC float64) *mat.Dense {
	cols := f.k + model.DemandForm(form).Slopes()
	x := mat.NewDense(f.n, cols, nil)
	for i, t := range f.temp {
		row := x.RawRowView(i)
		copy(row, f.z.RawRowView(i))
		c := f.k
		if model.DemandForm(form).HasHeating() {
			row[c] = max(tbH-t, 0)
			c++
		}
		if model.DemandForm(form).HasCooling() {
			if form == model.FormHeatingCooling {
				tbC = tbH
			}
			row[c] = max(t-tbC, 0)
		}
	}
	return x
}

// olsAt fits the form at fixed balance points by QR least squares.
func (f *demandFitter) olsAt(form string, tbH, tbC float64) (olsFit, error) {
	return ols(f.design(form, tbH, tbC), f.y)
}

// fill copies a fit's coefficients into the model.
func (f *demandFitter) fill(m *model.Demand, form string, fit olsFit, tbH, tbC float64) {
	m.Intercept, m.SE.Intercept = fit.Beta[0], fit.SE[0]
	for wd := 1; wd < 7; wd++ {
		m.Weekday[wd], m.SE.Weekday[wd] = 0, 0
		if c := f.wdCol[wd]; c > 0 {
			m.Weekday[wd], m.SE.Weekday[wd] = fit.Beta[c], fit.SE[c]
		}
	}
	m.Holiday, m.SE.Holiday = 0, 0
	if f.holCol > 0 {
		m.Holiday, m.SE.Holiday = fit.Beta[f.holCol], fit.SE[f.holCol]
	}
	c := f.k
	m.Heating, m.Cooling = model.ChangePoint{}, model.ChangePoint{}
	if model.DemandForm(form).HasHeating() {
		m.Heating = model.ChangePoint{Present: true, BalancePoint: tbH, Slope: fit.Beta[c], SlopeSE: fit.SE[c]}
		c++
	}
	if model.DemandForm(form).HasCooling() {
		if form == model.FormHeatingCooling {
			tbC = tbH
		}
		m.Cooling = model.ChangePoint{Present: true, BalancePoint: tbC, Slope: fit.Beta[c], SlopeSE: fit.SE[c]}
	}
}

func (f *demandFitter) meanLoad() float64 {
	s := 0.0
	for _, v := range f.y {
		s += v
	}
	return s / float64(f.n)
}
