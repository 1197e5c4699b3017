package sim

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/stat/distuv"

	"wxstress/calendar"
	"wxstress/model"
	"wxstress/shocks"
)

// Start modes.
const (
	StartClimate     = "climate"     // stationary state after a burn-in
	StartConditional = "conditional" // the last observed anomalies
)

// Bases are the thresholds of the degree-day and cold-day indices, in the
// model's units.
type Bases struct {
	HDD, CDD  float64 // degree-day bases
	ColdBelow float64 // a day is cold when its mean is below this
}

// BasesFor returns the usual bases of degree-day indices in units u, 18 °C or
// 65 °F for both degree-day bases, and the freezing point (0 °C, 32 °F) as
// the cold threshold: see model.Units.DegreeDayBase and ColdThreshold. It
// panics if u is not valid.
func BasesFor(u model.Units) Bases {
	b := u.DegreeDayBase()
	return Bases{HDD: b, CDD: b, ColdBelow: u.ColdThreshold()}
}

// Plausible degree-day bases and cold thresholds, in °C: degree-day bases
// in use run from about 10 °C (cooling in some markets) to 25 °C, the cold
// threshold from −30 °C to 10 °C (common practice; wider than any
// convention, so only a value in the other scale falls outside).
var (
	plausibleBaseC = [2]float64{5, 30}
	plausibleColdC = [2]float64{-40, 15}
)

// Implausible returns a warning for each base of b that lies outside the
// plausible range in units u but inside it in the other scale (an 18 given
// to a °F model, a 65 to a °C one), with the value it probably means.
func (b Bases) Implausible(u model.Units) []string {
	other := model.Fahrenheit
	if u == model.Fahrenheit {
		other = model.Celsius
	}
	var out []string
	for _, c := range []struct {
		name   string
		v      float64
		rangeC [2]float64
	}{{"HDD base", b.HDD, plausibleBaseC}, {"CDD base", b.CDD, plausibleBaseC}, {"cold-day threshold", b.ColdBelow, plausibleColdC}} {
		inC := func(x float64, from model.Units) float64 { return from.Convert(x, model.Celsius) }
		here, there := inC(c.v, u), inC(c.v, other)
		if (here < c.rangeC[0] || here > c.rangeC[1]) && there >= c.rangeC[0] && there <= c.rangeC[1] {
			out = append(out, fmt.Sprintf("%s %g °%s is implausible for a °%s model; it reads like °%s (%g °%s = %.1f °%s)",
				c.name, c.v, u, u, other, c.v, other, other.Convert(c.v, u), u))
		}
	}
	return out
}

// segment is a run of accumulated days [lo, hi) that no period boundary
// splits; periods are unions of consecutive segments.
type segment struct{ lo, hi int }

// plan is everything about a run that does not depend on the path: the
// per-day constants are computed once so the day loop only draws, steps
// the AR and accumulates.
type plan struct {
	first   calendar.Date // first simulated day
	n       int           // simulated days
	acc     int           // index of the first accumulated day
	mean    []float64     // S(t) per day
	sd      []float64     // σ(month) times the shock scale, per day
	poolOff []int32       // bootstrap: offset of the day's month in pool
	poolLen []uint64      // bootstrap: size of that month's pool
	pool    []float64     // bootstrap: standardized innovations by month
	table   *shocks.Table // parametric shocks
	p       int           // AR order
	phi     [maxAR]float64
	x0      [maxAR]float64 // AR state before the first day, most recent first
	// obs are the observed days a season under way starts with (Config.
	// Observed): every path has them as they were, and is simulated from the
	// day after.
	// Cold snaps (Config.SnapDays): the window length and the position of
	// ColdSnap (SnapEnergy follows it) among a period's indices; the
	// periods' day ranges [lo, hi) in the run's days.
	snapDays, snapPos int
	periodDays        [][2]int
	topDays           int     // Config.TopDays, with demand
	growth            float64 // Config.Growth, 1 when unset
	obs               []float64
	obsLoad           []float64 // the observed loads of the same days, with demand
	// The slow part F (slow false without one): F(t) = phiS·F(t−1) +
	// slowQ·η(t), η from the low bits of the day's 32 random bits; F starts
	// from N(f0Mean, f0SD²) (its stationary law, or the filtered state at
	// the data end for a conditional start).
	slow         bool
	phiS, slowQ  float64
	f0Mean, f0SD float64
	qEta         [etaLevels]float64 // slowQ·η for each level (zero without a slow part)
	startNormal  *shocks.Table      // unit normal, for F's start
	conditional  bool               // the fast lags in x0 are anomalies X, from which F is taken
	segs         []segment
	pspan        [][2]int // per period: segments [s0, s1)
	bases        Bases
	events       []planEvent
	indices      []Index // per period, in output order

	// Demand (nil without a demand model).
	demand   *model.Demand
	normal   *shocks.Table // unit normal, for the demand noise
	u0       float64       // demand noise before the first day
	capacity float64
	// The expected load's terms (model.Demand.Expected): per day the
	// intercept, weekday and holiday effects; the change points, with the
	// slopes halved (and zero for an absent side) for the branch-free form.
	dayBase                []float64
	heatBP, coolBP         float64
	heatSlope2, coolSlope2 float64
	// The noise's scale (model.DemandNoise.NoiseSigma).
	noiseKind            int
	loadSigma            float64 // σ/Ē, the load scale
	bandEdges, bandSigma []float64
}

// Kinds of demand noise scale.
const (
	noiseConstant = iota
	noiseLoad
	noiseBands
)

// planEvent is a scenario event resolved to the run's days: its start is
// drawn from [lo, hi].
type planEvent struct {
	lo, hi int
	days   int
	delta  float64
	// threshold is Probability·2⁶⁴ (saturating): the event happens when a
	// uniform 64-bit draw is below it.
	threshold uint64
	always    bool
}

const maxAR = 5

// etaBits low bits of each day's 32 random bits, which the fast part's
// shock does not read (shockWord), pick the slow part's shock η: one of
// etaLevels equally likely normal quantiles at the cell midpoints
// Φ⁻¹((k + ½)/32), scaled to unit variance. The slow part sums hundreds of
// them before it moves appreciably (its e-folding time is weeks to months),
// so its law is normal to well within sampling error (TestSlowPartLaw).
const (
	etaBits   = 5
	etaLevels = 1 << etaBits
)

var etaGrid = sync.OnceValue(func() *[etaLevels]float64 {
	g := new([etaLevels]float64)
	n := distuv.UnitNormal
	ss := 0.0
	for k := range g {
		g[k] = n.Quantile((float64(k) + 0.5) / etaLevels)
		ss += g[k] * g[k]
	}
	c := 1 / math.Sqrt(ss/etaLevels)
	for k := range g {
		g[k] *= c
	}
	return g
})

func slowGrid() *[etaLevels]float64 { return etaGrid() }

// burnInDays returns how many days a climatological run simulates before its
// first accumulated day, starting from X = 0: enough for the start's
// influence on the variance to fall below 1e-6 of the stationary value
// (ρ^(2B) < 1e-6 for the AR's spectral radius ρ), at least 30 days.
func burnInDays(phi []float64) int {
	r := model.SpectralRadius(phi)
	if r <= 0 {
		return 30
	}
	b := int(math.Ceil(3 * math.Ln10 / -math.Log(r)))
	return min(max(b, 30), 5000)
}

// ErrStart is wrapped by the errors for periods that a conditional start
// cannot simulate (they began before the data end, with no season so far
// given, or without its loads for a demand run): the choice of --year,
// --period, --start or the inputs given.
var ErrStart = errors.New("sim: start")

// ErrObserved is wrapped by the errors for an observed record (a season
// under way) that lacks a day it needs; its text starts "the observed
// record", for the caller to name the file.
var ErrObserved = errors.New("the observed record")

// simulatedSpan returns the first simulated day and the first and last day
// of the periods: a conditional start begins the day after the data end, a
// climatological one a burn-in before the periods.
func simulatedSpan(m *model.File, cfg *Config, periods []Period) (first, from, to calendar.Date, err error) {
	from, to = periods[0].From, periods[0].To
	for _, p := range periods[1:] {
		from, to = min(from, p.From), max(to, p.To)
	}
	if cfg.Start != StartConditional {
		return from - calendar.Date(burnInDays(m.AR.Phi)), from, to, nil
	}
	if from <= m.Data.LastDate {
		if o := cfg.Observed; o != nil {
			if to <= m.Data.LastDate {
				return 0, 0, 0, fmt.Errorf("%w: every period has ended by the data end (%s): nothing is left to simulate; "+
					"choose a later --year", ErrStart, m.Data.LastDate)
			}
			if o.From > from || o.From+calendar.Date(len(o.Temps))-1 < m.Data.LastDate {
				return 0, 0, 0, fmt.Errorf("%w (%s to %s) does not cover %s to the data end %s", ErrObserved,
					o.From, o.From+calendar.Date(len(o.Temps))-1, from, m.Data.LastDate)
			}
			for d := from; d <= m.Data.LastDate; d++ {
				if v := o.Temps[int(d-o.From)]; math.IsNaN(v) || math.IsInf(v, 0) {
					return 0, 0, 0, fmt.Errorf("%w has no value on %s, inside %s: "+
						"a season under way needs every day so far", ErrObserved, d, periodStarting(periods, from))
				}
			}
			// The run starts at the first period's start; the days to the
			// data end are the observed ones.
			return from, from, to, nil
		}
		return 0, 0, 0, fmt.Errorf("%w: a conditional start needs periods after the data end (%s), but %s starts on %s: "+
			"give the season so far with --observed, a later --year, periods that start after the data end, "+
			"or --start climate", ErrStart, m.Data.LastDate, periodStarting(periods, from), from)
	}
	return m.Data.LastDate + 1, from, to, nil
}

func newPlan(m *model.File, cfg *Config, periods []Period) (*plan, error) {
	pl := &plan{bases: cfg.Bases}
	pl.p = len(m.AR.Phi)
	copy(pl.phi[:], m.AR.Phi)
	first, from, to, err := simulatedSpan(m, cfg, periods)
	if err != nil {
		return nil, err
	}
	pl.first = first
	if cfg.Start == StartConditional {
		copy(pl.x0[:], m.AR.Last)
		if first <= m.Data.LastDate {
			o := cfg.Observed
			lo, hi := int(first-o.From), int(m.Data.LastDate-o.From)+1
			pl.obs = o.Temps[lo:hi]
			if cfg.Demand != nil {
				if len(o.Loads) < hi {
					return nil, fmt.Errorf("%w: a season under way with demand needs its observed loads from %s to the data end %s "+
						"(--observed-load)", ErrStart, first, m.Data.LastDate)
				}
				pl.obsLoad = o.Loads[lo:hi]
				for i, v := range pl.obsLoad {
					if math.IsNaN(v) || math.IsInf(v, 0) {
						return nil, fmt.Errorf("sim: no observed load on %s, inside a season under way", first+calendar.Date(i))
					}
				}
			}
		}
	}
	if sl := m.Slow; sl != nil {
		pl.slow, pl.phiS, pl.slowQ = true, sl.Phi, sl.SD*math.Sqrt(1-sl.Phi*sl.Phi)
		for k, v := range slowGrid() {
			pl.qEta[k] = pl.slowQ * v
		}
		pl.startNormal = shocks.TableFor(shocks.Normal{})
		pl.f0SD = sl.SD
		if cfg.Start == StartConditional {
			pl.f0Mean, pl.f0SD, pl.conditional = sl.State, sl.StateSD, true
		}
	}
	pl.n = int(to-pl.first) + 1
	pl.acc = int(from - pl.first)

	pl.mean = make([]float64, pl.n)
	pl.sd = make([]float64, pl.n)
	months := make([]int, pl.n)
	var shift [12]float64
	if m.Scenario != nil {
		shift = m.Scenario.MonthlyShift
	}
	for i := range pl.n {
		d := pl.first + calendar.Date(i)
		months[i] = int(d.Month()) - 1
		pl.mean[i] = m.Mean(d.ModelTime()) + shift[months[i]]
		pl.sd[i] = m.Volatility.Monthly[months[i]]
	}
	if err := pl.setEvents(m, cfg.Year); err != nil {
		return nil, err
	}
	for x := range numTempIndices {
		pl.indices = append(pl.indices, x)
	}
	if cfg.Demand != nil {
		pl.setDemand(cfg)
	}
	if cfg.SnapDays > 0 {
		pl.snapDays = cfg.SnapDays
		pl.snapPos = len(pl.indices)
		pl.indices = append(pl.indices, ColdSnap)
		if cfg.Demand != nil {
			pl.indices = append(pl.indices, SnapEnergy)
		}
	}
	if cfg.TopDays > 0 && cfg.Demand != nil {
		pl.topDays = cfg.TopDays
	}
	if err := pl.setShocks(m.Shocks, months); err != nil {
		return nil, err
	}

	// Elementary segments between all period boundaries.
	cuts := []int{}
	for _, p := range periods {
		cuts = append(cuts, int(p.From-pl.first), int(p.To-pl.first)+1)
	}
	slices.Sort(cuts)
	cuts = slices.Compact(cuts)
	for i := 0; i+1 < len(cuts); i++ {
		pl.segs = append(pl.segs, segment{cuts[i], cuts[i+1]})
	}
	for _, p := range periods {
		lo, hi := int(p.From-pl.first), int(p.To-pl.first)+1
		pl.periodDays = append(pl.periodDays, [2]int{lo, hi})
		s0 := slices.IndexFunc(pl.segs, func(s segment) bool { return s.lo == lo })
		s1 := slices.IndexFunc(pl.segs, func(s segment) bool { return s.hi == hi }) + 1
		pl.pspan = append(pl.pspan, [2]int{s0, s1})
	}
	return pl, nil
}

func periodStarting(ps []Period, d calendar.Date) string {
	for _, p := range ps {
		if p.From == d {
			return "period " + p.Name
		}
	}
	return "a period"
}

func (pl *plan) setShocks(s model.Shocks, months []int) error {
	fam, ok := model.LookupFamily(s.Family)
	if !ok {
		return fmt.Errorf("sim: unknown shock family %q", s.Family)
	}
	if !fam.Parametric() {
		offs := make([]int32, 12)
		for m, z := range s.ByMonth {
			offs[m] = int32(len(pl.pool))
			pl.pool = append(pl.pool, z...)
		}
		pl.poolOff = make([]int32, pl.n)
		pl.poolLen = make([]uint64, pl.n)
		for i, m := range months {
			pl.poolOff[i], pl.poolLen[i] = offs[m], uint64(len(s.ByMonth[m]))
		}
		return nil
	}
	pl.table = shocks.TableFor(fam.New(s))
	// The days' 32 random bits cut the tails beyond 2⁻³³ (2⁻²⁸ with a slow
	// part): negligible for ν above about 5, but for ν near 2 much of the
	// variance lies out there. Rescale so the shocks simulated have unit
	// variance whatever ν is. (Moments32 is that of all 32 bits; with a
	// slow part the fast shock's p sits at the midpoints of 2²⁷ cells of
	// the same grid, whose variance differs from it by far less than the
	// cut's.)
	if _, v := pl.table.Moments32(); v > 0 && v != 1 {
		c := 1 / math.Sqrt(v)
		for i := range pl.sd {
			pl.sd[i] *= c
		}
	}
	return nil
}

// setEvents resolves the scenario's events to day indices of the run.
func (pl *plan) setEvents(m *model.File, year int) error {
	if m.Scenario == nil {
		return nil
	}
	for i, e := range m.Scenario.Events {
		w, err := ParsePeriod(e.Window, year)
		if err != nil {
			return fmt.Errorf("sim: scenario %s, event %d: %w", m.Scenario.Name, i+1, err)
		}
		lo, hi := int(w.From-pl.first), int(w.To-pl.first)
		if hi < 0 || lo >= pl.n {
			return fmt.Errorf("sim: scenario %s, event %d: its window %s to %s lies outside the simulated days %s to %s",
				m.Scenario.Name, i+1, w.From, w.To, pl.first, pl.first+calendar.Date(pl.n-1))
		}
		ev := planEvent{lo: max(lo, 0), hi: min(hi, pl.n-1), days: e.Days, delta: e.Delta, always: e.Probability >= 1}
		if !ev.always {
			ev.threshold = uint64(e.Probability * (1 << 63) * 2)
		}
		pl.events = append(pl.events, ev)
	}
	return nil
}

// setDemand precomputes the demand model's per-day calendar.
func (pl *plan) setDemand(cfg *Config) {
	pl.demand = cfg.Demand
	pl.growth = cfg.Growth
	if pl.growth == 0 {
		pl.growth = 1
	}
	pl.normal = shocks.TableFor(shocks.Normal{})
	if cfg.Start == StartConditional {
		pl.u0 = cfg.Demand.Noise.Last
	}
	hol := map[calendar.Date]bool{}
	for _, d := range cfg.Holidays {
		hol[d] = true
	}
	pl.dayBase = make([]float64, pl.n)
	dm := cfg.Demand
	for i := range pl.n {
		d := pl.first + calendar.Date(i)
		// Expected's own order of additions: intercept, weekday, holiday.
		pl.dayBase[i] = dm.Intercept + dm.Weekday[(d.Weekday()+6)%7]
		if hol[d] {
			pl.dayBase[i] += dm.Holiday
		}
	}
	if h := dm.Heating; h.Present {
		pl.heatBP, pl.heatSlope2 = h.BalancePoint, h.Slope/2
	}
	if c := dm.Cooling; c.Present {
		pl.coolBP, pl.coolSlope2 = c.BalancePoint, c.Slope/2
	}
	nz := dm.Noise
	switch {
	case nz.Scale == "load" && nz.MeanLoad > 0:
		pl.noiseKind, pl.loadSigma = noiseLoad, nz.Sigma/nz.MeanLoad
	case nz.Scale == "bands" && len(nz.BandSigma) == len(nz.BandEdges)+1:
		pl.noiseKind, pl.bandEdges, pl.bandSigma = noiseBands, nz.BandEdges, nz.BandSigma
	default:
		pl.noiseKind = noiseConstant
	}
	pl.indices = append(pl.indices, Energy, PeakDemand, PeakDay)
	pl.capacity = math.Inf(1)
	if cfg.Capacity > 0 {
		pl.capacity = cfg.Capacity
		pl.indices = append(pl.indices, OverCapacity)
	}
}
