package model

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"reflect"
	"slices"
	"strings"

	"gonum.org/v1/gonum/mat"

	"wxstress/calendar"
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
	raw, err := decodeHeader(b, name, Schema, SchemaVersion, requiredKeys, "model file")
	if err != nil {
		return nil, err
	}
	// Twelve months, said as such: a short array would leave the last
	// months at σ = 0.
	for _, k := range []string{"volatility.monthly", "scenario.monthly_shift"} {
		if n, ok := arrayLen(raw, k); ok && n != 12 {
			return nil, &KeyError{name, k, fmt.Sprintf("has %d values, want 12 (January to December)", n)}
		}
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
	if s, isString := raw["schema"].(string); s != schema {
		var msg string
		switch {
		case raw["schema"] == nil:
			msg = fmt.Sprintf("missing: not a wxstress %s (one has \"schema\": %q)", what, schema)
		case !isString:
			msg = fmt.Sprintf("is %s, want %q: not a wxstress %s", shortJSON(raw["schema"]), schema, what)
		default:
			hint := ""
			if s == Schema || s == DemandSchema {
				hint = fmt.Sprintf(" (this is a %q file)", s)
			}
			msg = fmt.Sprintf("is %q, want %q: not a wxstress %s%s", s, schema, what, hint)
		}
		return nil, &KeyError{name, "schema", msg}
	}
	if v, ok := raw["schema_version"].(float64); !ok || v != math.Trunc(v) || v < 1 {
		return nil, &KeyError{name, "schema_version", "missing or not a positive whole number"}
	} else if v > float64(version) {
		return nil, &KeyError{name, "schema_version", fmt.Sprintf("is %v, newer than this tool reads (%d): upgrade wxstress", v, version)}
	}
	if k := duplicateKey(b); k != "" {
		// encoding/json keeps the last of two equal keys: a file saying
		// "family" twice would quietly run the second.
		return nil, &KeyError{name, k, "given twice: each key may appear once"}
	}
	if k := upperKey(raw, ""); k != "" {
		// encoding/json matches keys without regard to case, so "Trend"
		// would silently stand for (or override) "trend".
		return nil, &KeyError{name, k, "unknown key: keys are lower case"}
	}
	for _, k := range required {
		if !hasKey(raw, k) {
			return nil, &KeyError{name, k, "missing"}
		}
	}
	return raw, nil
}

// near reports whether a restated value agrees with the one it restates,
// to 10⁻⁶ relative (the file has every digit).
func near(a, b float64) bool { return math.Abs(a-b) <= 1e-6*max(1, math.Abs(b)) }

// shortJSON shows a decoded JSON value in a message, cut to 40 bytes.
func shortJSON(v any) string {
	b, _ := json.Marshal(v)
	if len(b) > 40 {
		return string(b[:40]) + "…"
	}
	return string(b)
}

// decodeStrict decodes JSON into v, refusing unknown keys; a wrong type is
// named by its key and the kinds of value, not by Go's struct fields.
func decodeStrict(b []byte, name string, v any) error {
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		var te *json.UnmarshalTypeError
		if errors.As(err, &te) && te.Field != "" {
			found := map[string]string{"string": "a string", "number": "a number", "bool": "true or false", "array": "an array",
				"object": "an object"}[te.Value]
			if found == "" {
				found = te.Value // "number 1.5" for a fraction where a whole number belongs
			}
			return &KeyError{name, te.Field, fmt.Sprintf("wrong kind of value: want %s, found %s", jsonKind(te.Type), found)}
		}
		if k, ok := strings.CutPrefix(err.Error(), "json: unknown field "); ok {
			return &KeyError{name, unknownKeyPath(b, strings.Trim(k, `"`)), "unknown key"}
		}
		return fmt.Errorf("%s: %w: %w", name, ErrInvalid, err)
	}
	return nil
}

// jsonKind words a Go type as the JSON value it decodes from.
func jsonKind(t reflect.Type) string {
	switch t.Kind() {
	case reflect.Float32, reflect.Float64:
		return "a number"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return "a whole number"
	case reflect.String:
		return "a string"
	case reflect.Bool:
		return "true or false"
	case reflect.Slice, reflect.Array:
		return "an array"
	}
	return "an object"
}

// duplicateKey returns the dotted path of the first key that appears twice
// in one object of the JSON document b, or "".
func duplicateKey(b []byte) string {
	dec := json.NewDecoder(bytes.NewReader(b))
	var walk func(path string) (string, error)
	walk = func(path string) (string, error) {
		tok, err := dec.Token()
		if err != nil {
			return "", err
		}
		switch tok {
		case json.Delim('{'):
			seen := map[string]bool{}
			for dec.More() {
				kt, err := dec.Token()
				if err != nil {
					return "", err
				}
				k, _ := kt.(string)
				p := k
				if path != "" {
					p = path + "." + k
				}
				if seen[k] {
					return p, nil
				}
				seen[k] = true
				if d, err := walk(p); d != "" || err != nil {
					return d, err
				}
			}
			_, err = dec.Token() // }
			return "", err
		case json.Delim('['):
			for i := 0; dec.More(); i++ {
				if d, err := walk(fmt.Sprintf("%s[%d]", path, i)); d != "" || err != nil {
					return d, err
				}
			}
			_, err = dec.Token() // ]
			return "", err
		}
		return "", nil
	}
	d, _ := walk("")
	return d
}

// unknownKeyPath finds the dotted path of the unknown key k in b (the
// decoder names only the key): the first object member named k, in sorted
// order. It returns k when it cannot tell.
func unknownKeyPath(b []byte, k string) string {
	var raw any
	if json.Unmarshal(b, &raw) != nil {
		return k
	}
	if p := firstKey(raw, "", func(key string) bool { return key == k }); p != "" {
		return p
	}
	return k
}

// upperKey returns the dotted path of the first key (in sorted order) with
// an upper-case letter in v, or "".
func upperKey(v any, path string) string {
	return firstKey(v, path, func(k string) bool { return strings.ToLower(k) != k })
}

// firstKey returns the dotted path of the first key (in sorted order, depth
// first) of the decoded JSON value v for which match holds, or "".
func firstKey(v any, path string, match func(key string) bool) string {
	switch v := v.(type) {
	case map[string]any:
		keys := make([]string, 0, len(v))
		for k := range v {
			keys = append(keys, k)
		}
		slices.Sort(keys)
		for _, k := range keys {
			p := k
			if path != "" {
				p = path + "." + k
			}
			if match(k) {
				return p
			}
			if found := firstKey(v[k], p, match); found != "" {
				return found
			}
		}
	case []any:
		for i, e := range v {
			if found := firstKey(e, fmt.Sprintf("%s[%d]", path, i), match); found != "" {
				return found
			}
		}
	}
	return ""
}

// arrayLen returns the length of the array at the dotted path, if there is
// one.
func arrayLen(m map[string]any, path string) (int, bool) {
	head, rest, nested := strings.Cut(path, ".")
	v, ok := m[head]
	if !ok {
		return 0, false
	}
	if nested {
		sub, ok := v.(map[string]any)
		if !ok {
			return 0, false
		}
		return arrayLen(sub, rest)
	}
	a, ok := v.([]any)
	return len(a), ok
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
// run: finite values within the bounds of bounds.go (which keep every
// simulated value finite), σ > 0, ν > 2, ξ > 0, an AR that CheckPhi
// accepts, distinct harmonics. name is used in messages, which name the
// JSON key.
func (f *File) Validate(name string) error {
	bad := func(key, format string, a ...any) error {
		return &KeyError{name, key, fmt.Sprintf(format, a...)}
	}
	if !Units(f.Data.Units).Valid() {
		return bad("data.units", "is %q, want \"C\" or \"F\"", f.Data.Units)
	}
	if f.Data.LastDate < f.Data.FirstDate {
		return bad("data.last_date", "%s is before data.first_date %s", f.Data.LastDate, f.Data.FirstDate)
	}
	if y := f.Data.FirstDate.Year(); y < MinDataYear {
		return bad("data.first_date", "%s is before %d: not a date of an instrumental record", f.Data.FirstDate, MinDataYear)
	}
	if y := f.Data.LastDate.Year(); y > MaxDataYear {
		return bad("data.last_date", "%s is after %d", f.Data.LastDate, MaxDataYear)
	}
	if f.Trend.Epoch != calendar.Epoch {
		return bad("trend.epoch", "is %s, want %s: time t counts days from that epoch", f.Trend.Epoch, calendar.Epoch)
	}
	switch f.Trend.Kind {
	case "linear", "none":
	default:
		return bad("trend.kind", "is %q, want \"linear\" or \"none\"", f.Trend.Kind)
	}
	if f.Trend.Kind == "none" && f.Trend.SlopePerYear != 0 {
		return bad("trend.slope_per_year", "is %v but trend.kind is \"none\"", f.Trend.SlopePerYear)
	}
	if !finite(f.Trend.Intercept) || math.Abs(f.Trend.Intercept) > MaxLevel {
		return bad("trend.intercept", "%v is not a plausible level (|intercept| ≤ %g degrees)", f.Trend.Intercept, MaxLevel)
	}
	if !finite(f.Trend.SlopePerYear) || math.Abs(f.Trend.SlopePerYear) > MaxSlopePerYear {
		return bad("trend.slope_per_year", "%v is not a plausible warming rate (|slope| ≤ %g degree a year)", f.Trend.SlopePerYear, MaxSlopePerYear)
	}
	if f.Seasonal.PeriodDays != calendar.DaysPerYear {
		return bad("seasonal.period_days", "is %v, want %v: the seasonal period is fixed at the mean calendar year",
			f.Seasonal.PeriodDays, calendar.DaysPerYear)
	}
	if len(f.Seasonal.Harmonics) == 0 {
		return bad("seasonal.harmonics", "empty: at least one harmonic is needed")
	}
	var seen [13]int // 1 + the index of the harmonic with each k
	for i, h := range f.Seasonal.Harmonics {
		key := fmt.Sprintf("seasonal.harmonics[%d]", i)
		if h.K < 1 || h.K > 12 {
			return bad(key+".k", "k = %d, want 1..12", h.K)
		}
		if j := seen[h.K]; j > 0 {
			return bad(key+".k", "k = %d repeats seasonal.harmonics[%d]: each harmonic may appear once", h.K, j-1)
		}
		seen[h.K] = i + 1
		for _, c := range []struct {
			name string
			v    float64
		}{{"cos", h.Cos}, {"sin", h.Sin}} {
			if !finite(c.v) || math.Abs(c.v) > MaxAmplitude {
				return bad(key+"."+c.name, "%v is not a plausible coefficient (|%s| ≤ %g degrees)", c.v, c.name, MaxAmplitude)
			}
		}
		a := math.Hypot(h.Cos, h.Sin)
		if a > MaxAmplitude {
			return bad(key, "amplitude √(cos² + sin²) = %.4g is beyond %g degrees", a, MaxAmplitude)
		}
		// The amplitude and phase restate cos and sin, which the simulation
		// uses: an edit of one without the other would show one cycle and
		// simulate another.
		if h.Amplitude != 0 && !near(h.Amplitude, a) {
			return bad(key+".amplitude", "%v disagrees with √(cos² + sin²) = %.6g: edit cos and sin, which the simulation uses",
				h.Amplitude, a)
		}
		if th := math.Atan2(h.Cos, h.Sin); h.Phase != 0 && !near(math.Remainder(h.Phase-th, 2*math.Pi), 0) {
			return bad(key+".phase", "%v disagrees with atan2(cos, sin) = %.6g: edit cos and sin, which the simulation uses",
				h.Phase, th)
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
	if err := CheckPhi(f.AR.Phi); err != nil {
		return bad("ar.phi", "%v", err)
	}
	if len(f.AR.Last) != p {
		return bad("ar.last_anomalies", "has %d values, want one per AR lag (%d)", len(f.AR.Last), p)
	}
	for i, v := range f.AR.Last {
		if !finite(v) || math.Abs(v) > MaxAnomaly {
			return bad(fmt.Sprintf("ar.last_anomalies[%d]", i), "%v is not a plausible anomaly (|value| ≤ %g degrees)", v, MaxAnomaly)
		}
	}
	if sl := f.Slow; sl != nil {
		if !(sl.Phi > 0 && sl.Phi < 1) {
			return bad("slow.phi", "φ = %v, must be in (0, 1)", sl.Phi)
		}
		if e := -1 / math.Log(sl.Phi); sl.EFoldingDays != 0 && !near(sl.EFoldingDays, e) {
			return bad("slow.e_folding_days", "%v disagrees with −1/ln φ = %.6g: edit slow.phi, which the simulation uses",
				sl.EFoldingDays, e)
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
		if !(s > 0 && s <= MaxSigma) {
			return bad(fmt.Sprintf("volatility.monthly[%d]", m), "σ = %v, want 0 < σ ≤ %g degrees", s, MaxSigma)
		}
	}
	if sc := f.Scenario; sc != nil {
		for m, v := range sc.MonthlyShift {
			if !finite(v) || math.Abs(v) > MaxShift {
				return bad(fmt.Sprintf("scenario.monthly_shift[%d]", m), "%v is not a plausible shift (|shift| ≤ %g degrees)", v, MaxShift)
			}
		}
		for i, e := range sc.Events {
			key := fmt.Sprintf("scenario.events[%d]", i)
			switch {
			case !validWindow(e.Window):
				return bad(key+".window", "%q, want MM-DD:MM-DD, e.g. 12-01:02-28", e.Window)
			case e.Days < 1 || e.Days > 366:
				return bad(key+".days", "%d, want 1..366", e.Days)
			case !finite(e.Delta) || math.Abs(e.Delta) > MaxEventDelta:
				return bad(key+".delta", "%v, want |delta| ≤ %g degrees", e.Delta, MaxEventDelta)
			case !(e.Probability > 0 && e.Probability <= 1):
				return bad(key+".probability", "%v, want a probability in (0, 1]", e.Probability)
			}
		}
	}
	sh := f.Shocks
	fam, ok := LookupFamily(sh.Family)
	if !ok {
		return bad("shocks.family", "is %q, want one of %s", sh.Family, strings.Join(FamilyNames(), ", "))
	}
	if fam.UsesDF && !(sh.DF > 2 && sh.DF <= MaxDF) {
		return bad("shocks.df", "ν = %v, want 2 < ν ≤ %g (unit variance needs ν > 2)", sh.DF, MaxDF)
	}
	if fam.UsesSkew && !(sh.Skew >= MinSkew && sh.Skew <= MaxSkew) {
		return bad("shocks.skew", "ξ = %v, want %g ≤ ξ ≤ %g (1 is symmetric)", sh.Skew, MinSkew, MaxSkew)
	}
	if !fam.Parametric() {
		if len(sh.ByMonth) != 12 {
			return bad("shocks.by_month", "has %d months, want 12", len(sh.ByMonth))
		}
		for m, z := range sh.ByMonth {
			if len(z) == 0 {
				return bad(fmt.Sprintf("shocks.by_month[%d]", m), "empty")
			}
			for i, v := range z {
				if !finite(v) || math.Abs(v) > MaxShock {
					return bad(fmt.Sprintf("shocks.by_month[%d][%d]", m, i), "%v is not a standardized innovation (|z| ≤ %g)", v, MaxShock)
				}
			}
		}
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

// validWindow reports whether w is a window MM-DD:MM-DD of existing days
// (29 February included).
func validWindow(w string) bool {
	a, b, ok := strings.Cut(w, ":")
	day := func(s string) bool {
		_, err := calendar.Parse("2000-" + s)
		return err == nil && len(s) == 5
	}
	return ok && day(a) && day(b)
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Write writes the model file atomically (a temporary file renamed into place).
func (f *File) Write(path string) error {
	b, err := f.MarshalIndent()
	if err != nil {
		return err
	}
	return atomicfile.WriteFile(path, b)
}

// MarshalIndent returns the model file's JSON, indented, with a final
// newline: the bytes Write writes.
func (f *File) MarshalIndent() ([]byte, error) {
	b, err := json.MarshalIndent(f, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("model: encoding: %w", err)
	}
	return append(b, '\n'), nil
}
