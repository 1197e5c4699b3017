package scenarios

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strings"
	"time"

	"wxstress/calendar"
	"wxstress/model"
)

// Scenario is a set of changes to a fitted model. Nil parts change nothing.
type Scenario struct {
	Name        string       `toml:"name"`
	Description string       `toml:"description"`
	Units       model.Units  `toml:"units"` // "" = the model's units
	Shift       *Shift       `toml:"shift"`
	Trend       *Trend       `toml:"trend"`
	Volatility  *Volatility  `toml:"volatility"`
	Persistence *Persistence `toml:"persistence"`
	Tails       *Tails       `toml:"tails"`
	Events      []Event      `toml:"event"`

	// Where the name was set, for messages about repeated names: the file
	// and the line of its name key (0 when named after the file); "" for a
	// built-in.
	file string
	line int
}

// Shift moves the seasonal mean: Uniform on every day, plus Monthly[m] in
// calendar month m (January first).
type Shift struct {
	Uniform *float64  `toml:"uniform"`
	Monthly []float64 `toml:"monthly"`
}

// Trend moves the climate along the fitted trend to TargetYear (the
// simulated calendar stays the same; the level is that of TargetYear), or
// replaces the slope with SlopePerDecade, keeping the level at the end of
// the data, so the new slope applies from there on.
type Trend struct {
	TargetYear     *int     `toml:"target_year"`
	SlopePerDecade *float64 `toml:"slope_per_decade"`
}

// Volatility scales σ: by Scale in every month and by MonthlyScale[m] in
// month m.
type Volatility struct {
	Scale        *float64  `toml:"scale"`
	MonthlyScale []float64 `toml:"monthly_scale"`
}

// Persistence sets φ (Phi) or scales every φᵢ (Scale). With KeepVariance
// the innovation σ is rescaled so the daily anomaly keeps its variance:
// only the persistence changes.
type Persistence struct {
	Phi          []float64 `toml:"phi"`
	Scale        *float64  `toml:"scale"`
	KeepVariance bool      `toml:"keep_variance"`
}

// scaled returns a copy of phi multiplied by Scale, when given.
func (p *Persistence) scaled(phi []float64) []float64 {
	out := slices.Clone(phi)
	if p.Scale != nil {
		for i := range out {
			out[i] *= *p.Scale
		}
	}
	return out
}

// Tails sets the shocks' ν (a normal model becomes Student-t) and skew ξ
// (a normal or Student-t model becomes skewed t).
type Tails struct {
	DF   *float64 `toml:"df"`
	Skew *float64 `toml:"skew"`
}

// Event injects a spell of Days days moved by Anomaly degrees, colder
// (Kind "cold", the default) or warmer ("hot"), on top of the simulated
// anomaly, starting on Start (MM-DD) or on a day drawn uniformly from Window
// (MM-DD:MM-DD; crossing the year end means starting in the year before the
// target year), in a year with probability Probability (default 1).
type Event struct {
	Kind        string   `toml:"kind"`
	Days        int      `toml:"days"`
	Anomaly     float64  `toml:"anomaly"`
	Start       string   `toml:"start"`
	Window      string   `toml:"window"`
	Probability *float64 `toml:"probability"`
}

// Apply returns a copy of m transformed by s for target year year. It
// refuses results the simulator cannot run (a non-stationary AR, ν ≤ 2,
// shape changes to a bootstrap model).
func (s *Scenario) Apply(m *model.File, year int) (*model.File, error) {
	out, err := clone(m)
	if err != nil {
		return nil, err
	}
	fail := func(key, format string, a ...any) error {
		if s.file != "" { // a file's scenario: where it is, for the reader to fix
			return fmt.Errorf("%s: scenario %s: key %s: %s", s.file, s.Name, key, fmt.Sprintf(format, a...))
		}
		// A built-in that does not suit this model: the choice of scenario.
		return fmt.Errorf("%w: scenario %s does not suit this model: %s", ErrUnsuited, s.Name, fmt.Sprintf(format, a...))
	}
	k := s.factor(model.Units(m.Data.Units)) // converts the scenario's degrees to the model's
	out.Diagnostics = nil
	sc := &model.Scenario{Name: s.Name}

	if t := s.Trend; t != nil {
		b := m.Trend.Slope()
		if t.SlopePerDecade != nil {
			nb := k * *t.SlopePerDecade / (10 * calendar.DaysPerYear)
			end := m.Data.LastDate.ModelTime()
			out.Trend.Intercept += (b - nb) * end
			out.Trend.SlopePerYear = nb * calendar.DaysPerYear
			out.Trend.Kind = "linear"
			b = nb
		}
		if t.TargetYear != nil {
			if m.Trend.Kind != "linear" && t.SlopePerDecade == nil {
				if s.file == "" {
					return nil, fail("trend.target_year", "the model has no trend to carry on (fitted with trend %q); "+
						"fit one with --trend linear, or set a slope in a scenario file (trend.slope_per_decade)", m.Trend.Kind)
				}
				return nil, fail("trend.target_year", "the model has no trend to move along (fitted with trend %q); give trend.slope_per_decade too", m.Trend.Kind)
			}
			out.Trend.Intercept += b * float64(calendar.YearStart(*t.TargetYear)-calendar.YearStart(year))
		}
	}
	if sh := s.Shift; sh != nil {
		if sh.Uniform != nil {
			out.Trend.Intercept += k * *sh.Uniform
		}
		for i, v := range sh.Monthly {
			sc.MonthlyShift[i] += k * v
		}
	}
	if v := s.Volatility; v != nil {
		for i := range out.Volatility.Monthly {
			c := 1.0
			if v.Scale != nil {
				c *= *v.Scale
			}
			if v.MonthlyScale != nil {
				c *= v.MonthlyScale[i]
			}
			out.Volatility.Monthly[i] *= c
			out.Volatility.Band[i] = [2]float64{} // a band of the fit, not of the scenario
		}
	}
	if p := s.Persistence; p != nil {
		old := model.StationaryGain(m.AR.Phi)
		if p.Phi != nil {
			out.AR.Phi = p.Phi
		}
		out.AR.Phi = p.scaled(out.AR.Phi)
		if err := model.CheckPhi(out.AR.Phi); err != nil {
			return nil, fail("persistence", "%v", err)
		}
		last := make([]float64, len(out.AR.Phi))
		copy(last, m.AR.Last)
		out.AR.Last, out.AR.PhiSE = last, nil
		if p.KeepVariance {
			c := math.Sqrt(old / model.StationaryGain(out.AR.Phi))
			for i := range out.Volatility.Monthly {
				out.Volatility.Monthly[i] *= c
			}
		}
	}
	if t := s.Tails; t != nil {
		sh := &out.Shocks
		if sh.Family == model.FamilyBootstrap {
			return nil, fail("tails", "the model's shocks are a bootstrap of its innovations, which has no ν or ξ to change")
		}
		if t.DF != nil {
			sh.DF = *t.DF
			if sh.Family == model.FamilyNormal {
				sh.Family = model.FamilyStudentT
			}
		}
		if t.Skew != nil {
			if sh.Family == model.FamilyNormal {
				return nil, fail("tails.skew", "a normal model needs tails.df too to become a skewed t")
			}
			sh.Family, sh.Skew = model.FamilySkewT, *t.Skew
		}
		if sh.Family == model.FamilyStudentT {
			sh.Skew = 0
		}
	}
	for _, e := range s.Events {
		delta := -k * e.Anomaly
		if e.Kind == "hot" {
			delta = -delta
		}
		w := e.Window
		if w == "" {
			w = e.Start + ":" + e.Start
		}
		p := 1.0
		if e.Probability != nil {
			p = *e.Probability
		}
		sc.Events = append(sc.Events, model.Event{Days: e.Days, Delta: delta, Window: w, Probability: p})
	}
	if sc.MonthlyShift != ([12]float64{}) || len(sc.Events) > 0 {
		out.Scenario = sc
	}
	if err := out.Validate("scenario " + s.Name); err != nil {
		return nil, err
	}
	return out, nil
}

// factor converts the scenario's temperature differences to units. A model
// of invalid units is left to its Validate to refuse.
func (s *Scenario) factor(units model.Units) float64 {
	if s.Units == "" || !units.Valid() {
		return 1
	}
	return s.Units.ConvertDelta(1, units)
}

func clone(m *model.File) (*model.File, error) {
	b, err := json.Marshal(m)
	if err != nil {
		return nil, err
	}
	var out model.File
	if err := json.Unmarshal(b, &out); err != nil {
		return nil, err
	}
	return &out, nil
}

// Describe lists what the scenario changes, one line each, with units
// (in the scenario's units).
func (s *Scenario) Describe() []string {
	u := s.Units.Symbol()
	if s.Units == "" {
		u = "° (model units)"
	}
	return s.describe(1, u)
}

// describe is Describe with every temperature difference multiplied by f
// and given in the unit u.
func (s *Scenario) describe(f float64, u string) []string {
	var out []string
	add := func(format string, a ...any) { out = append(out, fmt.Sprintf(format, a...)) }
	if sh := s.Shift; sh != nil {
		if sh.Uniform != nil {
			add("level %+.2f %s every day", f**sh.Uniform, u)
		}
		if sh.Monthly != nil {
			add("level by month %s %s", monthList(times(sh.Monthly, f), "%+.1f"), u)
		}
	}
	if t := s.Trend; t != nil {
		if t.SlopePerDecade != nil {
			add("trend %+.2f %s per decade from the end of the data", f**t.SlopePerDecade, u)
		}
		if t.TargetYear != nil {
			add("climate of %d along the trend", *t.TargetYear)
		}
	}
	if v := s.Volatility; v != nil {
		switch {
		case v.Scale != nil && v.MonthlyScale != nil: // the product, as Apply takes it
			var combined []float64
			for _, m := range v.MonthlyScale {
				combined = append(combined, *v.Scale*m)
			}
			add("fast-part volatility σ by month × %s (%.2f all year times the monthly factors; slow part unchanged)",
				monthList(combined, "%.4g"), *v.Scale)
		case v.Scale != nil:
			add("fast-part volatility σ × %.2f (slow part unchanged)", *v.Scale)
		case v.MonthlyScale != nil:
			add("fast-part volatility σ by month × %s (slow part unchanged)", monthList(v.MonthlyScale, "%.2f"))
		}
	}
	if p := s.Persistence; p != nil {
		if p.Phi != nil {
			add("fast-part persistence φ = %v (slow part unchanged)", p.Phi)
		}
		if p.Scale != nil {
			add("fast-part persistence φ × %.2f (slow part unchanged)", *p.Scale)
		}
		if p.KeepVariance {
			add("σ rescaled to keep the daily anomaly's variance")
		}
	}
	if t := s.Tails; t != nil {
		if t.DF != nil {
			add("shock tails ν = %.1f", *t.DF)
		}
		if t.Skew != nil {
			add("shock skew ξ = %.2f", *t.Skew)
		}
	}
	for _, e := range s.Events {
		kind, way := "cold", "colder"
		if e.Kind == "hot" {
			kind, way = "hot", "warmer"
		}
		when := "starting " + e.Start
		if e.Window != "" {
			when = "starting at random in " + e.Window
		}
		p := "every year"
		if e.Probability != nil && *e.Probability < 1 {
			p = fmt.Sprintf("with probability %.2f a year", *e.Probability)
		}
		add("%s spell: %d days each %.1f %s %s than simulated, %s, %s", kind, e.Days, f*e.Anomaly, u, way, when, p)
	}
	if len(out) == 0 {
		out = append(out, "no change (the baseline)")
	}
	return out
}

// File is the file a scenario was read from ("" for a built-in).
func (s *Scenario) File() string { return s.file }

// DescribeFor is Describe with the model-dependent changes worked out for m
// and target year year: the level change a move along the trend brings.
func (s *Scenario) DescribeFor(m *model.File, year int) []string {
	units := model.Units(m.Data.Units)
	out := s.Describe()
	if units.Valid() {
		out = s.describe(s.factor(units), units.Symbol()) // the model's degrees
	}
	applied, err := s.Apply(m, year)
	if err != nil {
		return out
	}
	// What the changes make of this model's persistence and shocks.
	if s.Persistence != nil {
		line := fmt.Sprintf("on this model: fast-part φ %s → %s", numList(m.AR.Phi), numList(applied.AR.Phi))
		// The keep-variance rescale alone: the persistence change applied
		// by itself (the file's volatility changes would mix in otherwise).
		alone := &Scenario{Name: s.Name, Units: s.Units, Persistence: s.Persistence}
		if p, err := alone.Apply(m, year); err == nil && s.Persistence.KeepVariance {
			line += fmt.Sprintf(", σ × %.3f to keep the daily variance", p.Volatility.Monthly[0]/m.Volatility.Monthly[0])
		}
		out = append(out, line)
	}
	if s.Tails != nil {
		out = append(out, "on this model: shocks "+shockText(m.Shocks)+" → "+shockText(applied.Shocks))
	}
	t := s.Trend
	if t == nil || t.TargetYear == nil {
		return out
	}
	base := m.Trend.Intercept + m.Trend.Slope()*calendar.YearStart(year).ModelTime()
	moved := applied.Trend.Intercept + applied.Trend.Slope()*calendar.YearStart(year).ModelTime()
	if s.Shift != nil && s.Shift.Uniform != nil {
		moved -= s.factor(model.Units(m.Data.Units)) * *s.Shift.Uniform
	}
	for i, line := range out {
		if strings.HasPrefix(line, "climate of ") {
			u := model.Units(m.Data.Units).Symbol()
			trend := fmt.Sprintf("fitted trend %+.3f %s/decade", 10*m.Trend.SlopePerYear, u)
			if applied.Trend.SlopePerYear != m.Trend.SlopePerYear {
				trend = fmt.Sprintf("trend %+.3f %s/decade in the scenario, fitted %+.3f", 10*applied.Trend.SlopePerYear, u,
					10*m.Trend.SlopePerYear)
			}
			out[i] = fmt.Sprintf("%s: level %+.2f %s against %d (%s)", line, moved-base, u, year, trend)
		}
	}
	return out
}

func monthList(v []float64, format string) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = time.Month(i + 1).String()[:3] + " " + fmt.Sprintf(format, x)
	}
	return strings.Join(parts, ", ")
}

// times returns x with every value multiplied by f.
func times(x []float64, f float64) []float64 {
	out := make([]float64, len(x))
	for i, v := range x {
		out[i] = f * v
	}
	return out
}

// numList writes coefficients for a description: "0.716", "0.62, 0.11".
func numList(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = fmt.Sprintf("%.3f", x)
	}
	return strings.Join(parts, ", ")
}

// shockText words a shock family with its parameters: "skewed Student-t
// (ν 10.4, ξ 0.85)".
func shockText(sh model.Shocks) string {
	switch sh.Family {
	case model.FamilySkewT:
		return fmt.Sprintf("skewed Student-t (ν %.1f, ξ %.2f)", sh.DF, sh.Skew)
	case model.FamilyStudentT:
		return fmt.Sprintf("Student-t (ν %.1f)", sh.DF)
	}
	return sh.Family
}
