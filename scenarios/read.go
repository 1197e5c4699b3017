package scenarios

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/BurntSushi/toml"

	"wxstress/calendar"
	"wxstress/internal/tomlpos"
	"wxstress/model"
)

// ErrScenario is wrapped by every error about a scenario file's content.
var ErrScenario = errors.New("bad scenario")

// KeyError is a problem with one key of a scenario file.
type KeyError struct {
	File string
	Line int // 1-based; 0 when the key's line is unknown
	Key  string
	Msg  string
}

func (e *KeyError) Error() string {
	if e.Key == "" {
		return fmt.Sprintf("%s:%d: %s", e.File, e.Line, e.Msg)
	}
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d: key %s: %s", e.File, e.Line, e.Key, e.Msg)
	}
	return fmt.Sprintf("%s: key %s: %s", e.File, e.Key, e.Msg)
}

func (e *KeyError) Unwrap() error { return ErrScenario }

// Load reads a scenario file.
func Load(path string) (*Scenario, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return Parse(b, path)
}

// Parse decodes a scenario from TOML, strictly: unknown keys, wrong types and
// out-of-range values are errors naming the file, the line and the key. A
// scenario without a name is named after its file; the name of a built-in
// scenario is refused.
func Parse(src []byte, file string) (*Scenario, error) {
	var s Scenario
	md, err := toml.Decode(string(src), &s)
	if err != nil {
		if line, key, msg, ok := tomlpos.Split(err); ok {
			return nil, &KeyError{file, line, key, msg}
		}
		return nil, fmt.Errorf("%s: %w: %w", file, ErrScenario, err)
	}
	if und := md.Undecoded(); len(und) > 0 {
		k := und[0].String()
		return nil, &KeyError{file, tomlpos.Line(src, und[0], -1), k, "unknown key; valid keys are " + validKeys(und[0])}
	}
	s.file, s.line = file, tomlpos.Line(src, toml.Key{"name"}, -1)
	from := ""
	if s.Name == "" {
		s.Name = strings.TrimSuffix(filepath.Base(file), filepath.Ext(file))
		from = " (taken from the file name)"
	}
	if isBuiltin(s.Name) {
		return nil, &KeyError{file, s.line, "name", fmt.Sprintf("%q%s is the name of a built-in scenario; give the file a name of its own", s.Name, from)}
	}
	if msg := model.LabelProblem(s.Name); msg != "" {
		return nil, &KeyError{file, s.line, "name", fmt.Sprintf("%q%s: %s", s.Name, from, msg)}
	}
	if err := s.check(); err != nil {
		var ke *KeyError
		if errors.As(err, &ke) {
			ke.File = file
			ke.Line = tomlpos.Line(src, toml.Key(strings.Split(ke.Key, ".")), -1)
		}
		return nil, err
	}
	return &s, nil
}

// valid lists the keys of each table, for messages.
var valid = map[string]string{
	"":            "name, description, units, [shift], [trend], [volatility], [persistence], [tails], [[event]]",
	"shift":       "uniform, monthly",
	"trend":       "target_year, slope_per_decade",
	"volatility":  "scale, monthly_scale",
	"persistence": "phi, scale, keep_variance",
	"tails":       "df, skew",
	"event":       "kind, days, anomaly, start, window, probability",
}

func validKeys(k toml.Key) string {
	if len(k) > 1 {
		if v, ok := valid[k[0]]; ok {
			return v
		}
	}
	return valid[""]
}

// check validates ranges; its KeyErrors carry the key only.
func (s *Scenario) check() error {
	bad := func(key, format string, a ...any) error {
		return &KeyError{Key: key, Msg: fmt.Sprintf(format, a...)}
	}
	if s.Units != "" && !s.Units.Valid() {
		return bad("units", "%q: want C or F", s.Units)
	}
	degrees := func(key string, v, limit float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > limit {
			return bad(key, "%v is out of range (|value| ≤ %g degrees)", v, limit)
		}
		return nil
	}
	if sh := s.Shift; sh != nil {
		if sh.Uniform != nil {
			if err := degrees("shift.uniform", *sh.Uniform, 20); err != nil {
				return err
			}
		}
		if sh.Monthly != nil {
			if len(sh.Monthly) != 12 {
				return bad("shift.monthly", "has %d values, want 12 (January to December)", len(sh.Monthly))
			}
			for _, v := range sh.Monthly {
				if err := degrees("shift.monthly", v, 20); err != nil {
					return err
				}
			}
		}
	}
	if t := s.Trend; t != nil {
		if t.TargetYear != nil && (*t.TargetYear < 1800 || *t.TargetYear > 2300) {
			return bad("trend.target_year", "%d is outside 1800..2300", *t.TargetYear)
		}
		if t.SlopePerDecade != nil {
			if err := degrees("trend.slope_per_decade", *t.SlopePerDecade, 5); err != nil {
				return err
			}
		}
	}
	scale := func(key string, v float64) error {
		if !(v > 0 && v <= 10) {
			return bad(key, "%v: a scale must be in (0, 10]", v)
		}
		return nil
	}
	if v := s.Volatility; v != nil {
		if v.Scale != nil {
			if err := scale("volatility.scale", *v.Scale); err != nil {
				return err
			}
		}
		if v.MonthlyScale != nil {
			if len(v.MonthlyScale) != 12 {
				return bad("volatility.monthly_scale", "has %d values, want 12 (January to December)", len(v.MonthlyScale))
			}
			for _, x := range v.MonthlyScale {
				if err := scale("volatility.monthly_scale", x); err != nil {
					return err
				}
			}
			if v.Scale != nil {
				if c := *v.Scale * slices.Max(v.MonthlyScale); c > 10 {
					return bad("volatility.monthly_scale", "with scale = %v, σ is multiplied by up to %.3g: the combined scale must be at most 10", *v.Scale, c)
				}
			}
		}
	}
	if p := s.Persistence; p != nil {
		if p.Phi != nil && (len(p.Phi) < 1 || len(p.Phi) > 5) {
			return bad("persistence.phi", "has %d values, want 1 to 5", len(p.Phi))
		}
		for _, v := range p.Phi {
			if math.IsNaN(v) || math.Abs(v) >= 1.5 {
				return bad("persistence.phi", "%v is out of range", v)
			}
		}
		if p.Scale != nil {
			if err := scale("persistence.scale", *p.Scale); err != nil {
				return err
			}
		}
		// What Apply refuses whatever the model, since φ replaces the
		// model's; a scale alone is checked against the model by Apply.
		if p.Phi != nil {
			if err := model.CheckPhi(p.scaled(p.Phi)); err != nil {
				return bad("persistence.phi", "%v", err)
			}
		}
	}
	if t := s.Tails; t != nil {
		if t.DF != nil && !(*t.DF > 2 && *t.DF <= 1000) {
			return bad("tails.df", "ν = %v: want 2 < ν ≤ 1000 (unit variance needs ν > 2)", *t.DF)
		}
		if t.Skew != nil && !(*t.Skew >= 0.2 && *t.Skew <= 5) {
			return bad("tails.skew", "ξ = %v: want 0.2 ≤ ξ ≤ 5 (1 is symmetric)", *t.Skew)
		}
	}
	for _, e := range s.Events {
		switch e.Kind {
		case "", "cold", "hot":
		default:
			return bad("event.kind", "%q: want cold or hot", e.Kind)
		}
		if e.Days < 1 || e.Days > 120 {
			return bad("event.days", "%d: want 1..120", e.Days)
		}
		if !(e.Anomaly > 0 && e.Anomaly <= 30) {
			return bad("event.anomaly", "%v: want a size in (0, 30] degrees (kind says the direction)", e.Anomaly)
		}
		if (e.Start == "") == (e.Window == "") {
			return bad("event.start", "give exactly one of start (MM-DD) or window (MM-DD:MM-DD)")
		}
		if e.Start != "" && !validMonthDay(e.Start) {
			return bad("event.start", "%q: want MM-DD, e.g. 01-15", e.Start)
		}
		// A start on 29 February would have no day in three years of four
		// (the window 02-29:02-29 is empty outside a leap year).
		if e.Start == "02-29" {
			return bad("event.start", "\"02-29\" exists only in leap years: start on 02-28 or 03-01, or give a window")
		}
		if e.Window != "" {
			a, b, ok := strings.Cut(e.Window, ":")
			if !ok || !validMonthDay(a) || !validMonthDay(b) {
				return bad("event.window", "%q: want MM-DD:MM-DD, e.g. 12-01:02-28", e.Window)
			}
			if a == "02-29" && b == "02-29" {
				return bad("event.window", "\"02-29:02-29\" has a day only in leap years: widen it")
			}
		}
		if e.Probability != nil && !(*e.Probability > 0 && *e.Probability <= 1) {
			return bad("event.probability", "%v: want a probability in (0, 1]", *e.Probability)
		}
	}
	return nil
}

func validMonthDay(s string) bool {
	_, err := calendar.Parse("2000-" + s)
	return err == nil && len(s) == 5
}
