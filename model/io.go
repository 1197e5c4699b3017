package model

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"strings"

	"gonum.org/v1/gonum/mat"

	"wxstress/internal/atomicfile"
)

// ErrInvalid is wrapped by every error about a model file's content.
var ErrInvalid = errors.New("invalid model")

// KeyError names the key of a model file that is missing or impossible.
type KeyError struct {
	File string
	Key  string // dotted path, e.g. "volatility.monthly[3]"
	Msg  string
}

func (e *KeyError) Error() string {
	return fmt.Sprintf("%s: key %s: %s", e.File, e.Key, e.Msg)
}

func (e *KeyError) Unwrap() error { return ErrInvalid }

// requiredKeys are the dotted paths every model file must carry.
var requiredKeys = []string{
	"schema", "schema_version",
	"data.first_date", "data.last_date", "data.units",
	"trend.kind", "trend.epoch", "trend.intercept", "trend.slope_per_year",
	"seasonal.period_days", "seasonal.harmonics",
	"ar.phi", "ar.last_anomalies",
	"volatility.kind", "volatility.monthly",
	"shocks.family",
}

// Read reads and validates a model file.
func Read(path string) (*File, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return Decode(b, path)
}

// Decode parses and validates model JSON; name is used in messages.
func Decode(b []byte, name string) (*File, error) {
	if _, err := decodeHeader(b, name, Schema, SchemaVersion, requiredKeys, "model file"); err != nil {
		return nil, err
	}
	var f File
	if err := decodeStrict(b, name, &f); err != nil {
		return nil, err
	}
	if err := f.Validate(name); err != nil {
		return nil, err
	}
	return &f, nil
}

// decodeHeader parses JSON into a generic map and checks what every file of
// a kind must have: its schema name, a schema_version this tool reads, and
// the required keys (dotted paths). what names the kind in messages.
func decodeHeader(b []byte, name, schema string, version int, required []string, what string) (map[string]any, error) {
	var raw map[string]any
	if err := json.Unmarshal(b, &raw); err != nil {
		return nil, fmt.Errorf("%s: not a %s (JSON): %w", name, what, err)
	}
	if s, _ := raw["schema"].(string); s != schema {
		hint := ""
		if s == Schema || s == DemandSchema {
			hint = fmt.Sprintf(" (this is a %q file)", s)
		}
		return nil, &KeyError{name, "schema", fmt.Sprintf("is %q, want %q: not a wxstress %s%s", raw["schema"], schema, what, hint)}
	}
	if v, ok := raw["schema_version"].(float64); !ok || v != math.Trunc(v) || v < 1 {
		return nil, &KeyError{name, "schema_version", "missing or not a positive whole number"}
	} else if v > float64(version) {
		return nil, &KeyError{name, "schema_version", fmt.Sprintf("is %v, newer than this tool reads (%d): upgrade wxstress", v, version)}
	}
	for _, k := range required {
		if !hasKey(raw, k) {
			return nil, &KeyError{name, k, "missing"}
		}
	}
	return raw, nil
}

// decodeStrict decodes JSON into v, refusing unknown keys.
func decodeStrict(b []byte, name string, v any) error {
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return fmt.Errorf("%s: %w: %v", name, ErrInvalid, err)
	}
	return nil
}

func hasKey(m map[string]any, path string) bool {
	head, rest, nested := strings.Cut(path, ".")
	v, ok := m[head]
	if !ok || v == nil {
		return false
	}
	if !nested {
		return true
	}
	sub, ok := v.(map[string]any)
	return ok && hasKey(sub, rest)
}

// Validate checks that the parameters describe a model the simulator can
// run: finite values, σ > 0, ν > 2, ξ > 0, a stationary AR. name is used in
// messages.
func (f *File) Validate(name string) error {
	bad := func(key, format string, a ...any) error {
		return &KeyError{name, key, fmt.Sprintf(format, a...)}
	}
	if f.Data.Units != "C" && f.Data.Units != "F" {
		return bad("data.units", "is %q, want \"C\" or \"F\"", f.Data.Units)
	}
	if f.Data.LastDate < f.Data.FirstDate {
		return bad("data.last_date", "%s is before data.first_date %s", f.Data.LastDate, f.Data.FirstDate)
	}
	switch f.Trend.Kind {
	case "linear", "none":
	default:
		return bad("trend.kind", "is %q, want \"linear\" or \"none\"", f.Trend.Kind)
	}
	if f.Trend.Kind == "none" && f.Trend.SlopePerYear != 0 {
		return bad("trend.slope_per_year", "is %v but trend.kind is \"none\"", f.Trend.SlopePerYear)
	}
	if !finite(f.Trend.Intercept) {
		return bad("trend.intercept", "not a finite number")
	}
	if !finite(f.Trend.SlopePerYear) || math.Abs(f.Trend.SlopePerYear) > 1 {
		return bad("trend.slope_per_year", "%v is not a plausible warming rate (|slope| ≤ 1 degree a year)", f.Trend.SlopePerYear)
	}
	if !(f.Seasonal.PeriodDays > 300 && f.Seasonal.PeriodDays < 400) {
		return bad("seasonal.period_days", "%v is not a year length", f.Seasonal.PeriodDays)
	}
	if len(f.Seasonal.Harmonics) == 0 {
		return bad("seasonal.harmonics", "empty: at least one harmonic is needed")
	}
	for i, h := range f.Seasonal.Harmonics {
		if h.K < 1 || h.K > 12 || !finite(h.Cos) || !finite(h.Sin) {
			return bad(fmt.Sprintf("seasonal.harmonics[%d]", i), "needs k in 1..12 and finite cos and sin")
		}
	}
	p := len(f.AR.Phi)
	if p < 1 || p > 5 {
		return bad("ar.phi", "has %d coefficients, want 1 to 5", p)
	}
	for i, v := range f.AR.Phi {
		if !finite(v) {
			return bad(fmt.Sprintf("ar.phi[%d]", i), "not a finite number")
		}
	}
	if r := SpectralRadius(f.AR.Phi); r >= 1 {
		return bad("ar.phi", "%v is not stationary (largest root modulus %.4f ≥ 1)", f.AR.Phi, r)
	}
	if len(f.AR.Last) != p {
		return bad("ar.last_anomalies", "has %d values, want one per AR lag (%d)", len(f.AR.Last), p)
	}
	for i, v := range f.AR.Last {
		if !finite(v) {
			return bad(fmt.Sprintf("ar.last_anomalies[%d]", i), "not a finite number")
		}
	}
	if sl := f.Slow; sl != nil {
		if !(sl.Phi > 0 && sl.Phi < 1) {
			return bad("slow.phi", "φ = %v, must be in (0, 1)", sl.Phi)
		}
		if !(sl.SD > 0) || !finite(sl.SD) || sl.SD > 50 {
			return bad("slow.sd", "%v must be positive and at most 50", sl.SD)
		}
		if !finite(sl.State) || math.Abs(sl.State) > 10*sl.SD+50 {
			return bad("slow.state", "%v is not a plausible state", sl.State)
		}
		if !(sl.StateSD >= 0) || sl.StateSD > sl.SD*1.0000001 {
			return bad("slow.state_sd", "%v must be between 0 and slow.sd", sl.StateSD)
		}
	}
	if f.Volatility.Kind != "monthly" {
		return bad("volatility.kind", "is %q, want \"monthly\"", f.Volatility.Kind)
	}
	for m, s := range f.Volatility.Monthly {
		if !(s > 0) || !finite(s) {
			return bad(fmt.Sprintf("volatility.monthly[%d]", m), "σ = %v, must be positive and finite", s)
		}
	}
	if sc := f.Scenario; sc != nil {
		for m, v := range sc.MonthlyShift {
			if !finite(v) || math.Abs(v) > 50 {
				return bad(fmt.Sprintf("scenario.monthly_shift[%d]", m), "%v is not a plausible shift", v)
			}
		}
		for i, e := range sc.Events {
			key := fmt.Sprintf("scenario.events[%d]", i)
			if e.Days < 1 || e.Days > 366 || !finite(e.Delta) || math.Abs(e.Delta) > 50 || !(e.Probability > 0 && e.Probability <= 1) {
				return bad(key, "needs 1..366 days, |delta| ≤ 50 and a probability in (0, 1]")
			}
		}
	}
	sh := f.Shocks
	switch sh.Family {
	case FamilyNormal:
	case FamilyStudentT, FamilySkewT:
		if !(sh.DF > 2) || !finite(sh.DF) {
			return bad("shocks.df", "ν = %v, must be finite and > 2 (unit variance needs ν > 2)", sh.DF)
		}
		if sh.Family == FamilySkewT && (!(sh.Skew > 0) || !finite(sh.Skew)) {
			return bad("shocks.skew", "ξ = %v, must be positive", sh.Skew)
		}
	case FamilyBootstrap:
		if len(sh.ByMonth) != 12 {
			return bad("shocks.by_month", "has %d months, want 12", len(sh.ByMonth))
		}
		for m, z := range sh.ByMonth {
			if len(z) == 0 {
				return bad(fmt.Sprintf("shocks.by_month[%d]", m), "empty")
			}
			for _, v := range z {
				if !finite(v) {
					return bad(fmt.Sprintf("shocks.by_month[%d]", m), "holds a non-finite value")
				}
			}
		}
	default:
		return bad("shocks.family", "is %q, want one of %s", sh.Family, strings.Join(Families, ", "))
	}
	return nil
}

// SpectralRadius returns the largest modulus of the roots of the AR
// companion matrix; the AR is stationary when it is below 1.
func SpectralRadius(phi []float64) float64 {
	p := len(phi)
	if p == 0 {
		return 0
	}
	c := mat.NewDense(p, p, nil)
	for j, v := range phi {
		c.Set(0, j, v)
	}
	for i := 1; i < p; i++ {
		c.Set(i, i-1, 1)
	}
	var e mat.Eigen
	if !e.Factorize(c, mat.EigenNone) {
		return math.Inf(1)
	}
	r := 0.0
	for _, v := range e.Values(nil) {
		r = math.Max(r, cmplx.Abs(v))
	}
	return r
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Write writes the model file atomically (a temporary file renamed into place).
func (f *File) Write(path string) error {
	b, err := json.MarshalIndent(f, "", "  ")
	if err != nil {
		return fmt.Errorf("model: encoding: %w", err)
	}
	return atomicfile.WriteFile(path, append(b, '\n'))
}
