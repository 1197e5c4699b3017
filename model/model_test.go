package model

import (
	"bytes"
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wxstress/calendar"
)

func valid() *File {
	f := &File{
		Schema: Schema, SchemaVersion: SchemaVersion,
		Data:       Data{FirstDate: calendar.FromYMD(2000, 1, 1), LastDate: calendar.FromYMD(2009, 12, 31), Units: "C"},
		Trend:      Trend{Kind: "linear", Epoch: calendar.Epoch, Intercept: 10, SlopePerYear: 0.02},
		Seasonal:   Seasonal{PeriodDays: calendar.DaysPerYear, Harmonics: []Harmonic{{K: 1, Cos: -10, Sin: -4}}},
		AR:         AR{Phi: []float64{0.7}, Last: []float64{1.5}},
		Volatility: Volatility{Kind: "monthly"},
		Shocks:     Shocks{Family: FamilySkewT, DF: 8, Skew: 0.9},
	}
	for m := range 12 {
		f.Volatility.Monthly[m] = 2
	}
	return f
}

func TestWriteReadRoundTrip(t *testing.T) {
	t.Parallel()
	p := filepath.Join(t.TempDir(), "m.json")
	f := valid()
	if err := f.Write(p); err != nil {
		t.Fatal(err)
	}
	g, err := Read(p)
	if err != nil {
		t.Fatal(err)
	}
	for _, tt := range []float64{-5000, 0, 123.4, 9000} {
		if a, b := f.Mean(tt), g.Mean(tt); a != b {
			t.Errorf("Mean(%v): %v before, %v after the round trip", tt, a, b)
		}
	}
}

func TestMeanFormula(t *testing.T) {
	t.Parallel()
	f := valid()
	// S(t) = a + b·t + c cos ωt + s sin ωt with b = 0.02/365.25 per day.
	tt := 100.0
	w := 2 * math.Pi / 365.25
	want := 10 + 0.02/365.25*tt - 10*math.Cos(w*tt) - 4*math.Sin(w*tt)
	if got := f.Mean(tt); math.Abs(got-want) > 1e-12 {
		t.Errorf("Mean = %v, want %v", got, want)
	}
}

func TestValidateNamesTheKey(t *testing.T) {
	t.Parallel()
	cases := []struct {
		edit func(f *File)
		key  string
	}{
		{func(f *File) { f.Data.Units = "K" }, "data.units"},
		{func(f *File) { f.Volatility.Monthly[5] = 0 }, "volatility.monthly[5]"},
		{func(f *File) { f.Shocks.DF = 2 }, "shocks.df"},
		{func(f *File) { f.Shocks.Skew = -1 }, "shocks.skew"},
		{func(f *File) { f.AR.Phi = []float64{0.5, 0.6}; f.AR.Last = []float64{0, 0} }, "ar.phi"},
		{func(f *File) { f.AR.Last = nil }, "ar.last_anomalies"},
		{func(f *File) { f.Shocks.Family = "cauchy" }, "shocks.family"},
		{func(f *File) { f.Trend.Kind = "none" }, "trend.slope_per_year"},
		{func(f *File) { f.Seasonal.PeriodDays = 365.25 * 2 }, "seasonal.period_days"},
		{func(f *File) { f.Shocks = Shocks{Family: FamilyBootstrap, ByMonth: make([][]float64, 12)} }, "shocks.by_month[0]"},
	}
	for _, c := range cases {
		f := valid()
		c.edit(f)
		err := f.Validate("m.json")
		var ke *KeyError
		if !errors.As(err, &ke) || ke.Key != c.key || !errors.Is(err, ErrInvalid) {
			t.Errorf("want an error naming %s, got %v", c.key, err)
		}
	}
}

func TestSpectralRadius(t *testing.T) {
	t.Parallel()
	// AR(2) φ = (0.5, 0.6): the roots of z² − 0.5z − 0.6 are (0.5 ± √2.65)/2,
	// the larger 1.0639 (outside the unit circle: non-stationary).
	if r := SpectralRadius([]float64{0.5, 0.6}); math.Abs(r-(0.5+math.Sqrt(2.65))/2) > 1e-12 {
		t.Errorf("radius %v", r)
	}
	if r := SpectralRadius([]float64{0.7}); math.Abs(r-0.7) > 1e-15 {
		t.Errorf("radius %v", r)
	}
}

func TestDecodeRejectsNewerSchemaAndUnknownKeys(t *testing.T) {
	t.Parallel()
	for _, c := range []struct{ json, want string }{
		{`{"schema":"wxstress-model","schema_version":3}`, "newer than this tool reads"},
		{`{"schema":"other"}`, "not a wxstress model file"},
		{`not json`, "not a model file"},
	} {
		_, err := Decode([]byte(c.json), "m.json")
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.json, err, c.want)
		}
	}
}

func TestStationaryGain(t *testing.T) {
	t.Parallel()
	// AR(1): 1/(1 − φ²); AR(2): (1 − φ₂)/((1 + φ₂)((1 − φ₂)² − φ₁²)) (standard
	// results, e.g. Box, Jenkins and Reinsel, ch. 3).
	if g := StationaryGain([]float64{0.7}); math.Abs(g-1/(1-0.49)) > 1e-9 {
		t.Errorf("AR(1) gain %v", g)
	}
	p1, p2 := 0.6, 0.2
	want := (1 - p2) / ((1 + p2) * ((1-p2)*(1-p2) - p1*p1))
	if g := StationaryGain([]float64{p1, p2}); math.Abs(g-want) > 1e-9 {
		t.Errorf("AR(2) gain %v, want %v", g, want)
	}
}

// TestDecodeStrictness edits a valid model file's JSON text and checks each
// edit is refused naming its key: a key given twice (encoding/json would
// keep the last), a wrong kind of value (named by key, not Go field), an
// unknown nested key (by its path), a period other than 365.25 days, an
// amplitude, phase or e-folding time that disagrees with what it restates,
// and a σ array short of twelve months.
func TestDecodeStrictness(t *testing.T) {
	t.Parallel()
	f := valid()
	f.Seasonal.Harmonics[0].Amplitude = math.Hypot(-10, -4)
	f.Seasonal.Harmonics[0].Phase = math.Atan2(-10, -4)
	f.Slow = &Slow{Phi: 0.986, SD: 0.75, EFoldingDays: -1 / math.Log(0.986), State: 0.2, StateSD: 0.3}
	path := filepath.Join(t.TempDir(), "m.json")
	if err := f.Write(path); err != nil {
		t.Fatal(err)
	}
	good, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := Decode(good, "m.json"); err != nil {
		t.Fatalf("the valid file: %v", err)
	}
	for _, c := range []struct {
		old, new, want string
	}{
		{`"family": "skew-t"`, `"family": "skew-t", "family": "normal"`, "m.json: key shocks.family: given twice"},
		{`"df": 8`, `"df": "8"`, "m.json: key shocks.df: wrong kind of value: want a number, found a string"},
		{`"phi": [`, `"phii": 1, "phi": [`, "m.json: key ar.phii: unknown key"},
		{`"period_days": 365.25`, `"period_days": 365`, "m.json: key seasonal.period_days: is 365, want 365.25"},
		{`"amplitude": 10.77`, `"amplitude": 99`, "m.json: key seasonal.harmonics[0].amplitude: 99 disagrees with √(cos² + sin²) = 10.7703"},
		{`"e_folding_days": 70.9`, `"e_folding_days": 3`, "m.json: key slow.e_folding_days: 3 disagrees with −1/ln φ = 70.9"},
		{`2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2`, `2, 2, 2, 2, 2, 2, 2, 2, 2, 2, 2`, "m.json: key volatility.monthly: has 11 values, want 12"},
	} {
		text := compact(good)
		i := strings.Index(text, c.old)
		if i < 0 {
			t.Fatalf("%q not in the file:\n%s", c.old, text)
		}
		// Replace the key's whole value where the old text is a prefix.
		edited := text[:i] + c.new + text[i+len(c.old):]
		if c.old == `"amplitude": 10.77` || c.old == `"e_folding_days": 70.9` {
			rest := text[i+len(c.old):]
			j := strings.IndexAny(rest, ",}")
			edited = text[:i] + c.new + rest[j:]
		}
		_, err := Decode([]byte(edited), "m.json")
		if err == nil || !errors.Is(err, ErrInvalid) || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s → %s: error %v, want %q", c.old, c.new, err, c.want)
		}
	}
}

// compact writes JSON with ": " and ", " separators on one line, so that the
// edits above match whatever the writer's indentation.
func compact(b []byte) string {
	var v any
	json.Unmarshal(b, &v)
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.Encode(v)
	s := strings.ReplaceAll(buf.String(), `":`, `": `)
	return strings.ReplaceAll(s, ",", ", ")
}
