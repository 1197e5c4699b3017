package scenarios

import (
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestPhiCheckSharedWithApply: an explicit φ that Apply refuses for every
// model is refused when the file is read, with the same words and the file,
// line and key.
func TestPhiCheckSharedWithApply(t *testing.T) {
	t.Parallel()
	cases := []struct{ src, want string }{
		{"name = \"p\"\n[persistence]\nphi = [1.2]\n", "bad.toml:3: key persistence.phi: φ = 1.2 is not stationary"},
		{"name = \"p\"\n[persistence]\nphi = [0.5]\nscale = 2.5\n", "bad.toml:3: key persistence.phi: φ = 1.25 is not stationary"},
		{"name = \"p\"\n[persistence]\nphi = [0.9995]\n", "bad.toml:3: key persistence.phi: φ = 0.9995 is too persistent"},
		// AR(2) with a root of modulus 1.0639 (see model.TestSpectralRadius).
		{"name = \"p\"\n[persistence]\nphi = [0.5, 0.6]\n", "bad.toml:3: key persistence.phi: φ = 0.5, 0.6 is not stationary"},
	}
	for _, c := range cases {
		_, err := Parse([]byte(c.src), "bad.toml")
		if err == nil || !strings.HasPrefix(err.Error(), c.want) || !errors.Is(err, ErrScenario) {
			t.Errorf("Parse: %v, want %q", err, c.want)
		}
	}
	// Apply refuses the same φ, in the same words, for a model.
	s := &Scenario{Name: "p", Persistence: &Persistence{Phi: []float64{1.2}}}
	_, err := s.Apply(coldModel(), 2025)
	if err == nil || !strings.Contains(err.Error(), "φ = 1.2 is not stationary") {
		t.Errorf("Apply: %v", err)
	}
	if _, err := Parse([]byte("[persistence]\nphi = [0.82]\nscale = 1.1\n"), "ok.toml"); err != nil {
		t.Errorf("φ = 0.902 refused: %v", err)
	}
}

func TestCombinedVolatilityScale(t *testing.T) {
	t.Parallel()
	src := "[volatility]\nscale = 4\nmonthly_scale = [1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 3]\n"
	_, err := Parse([]byte(src), "v.toml")
	if err == nil || !strings.HasPrefix(err.Error(), "v.toml:3: key volatility.monthly_scale:") || !strings.Contains(err.Error(), "12") {
		t.Errorf("combined scale 12 accepted or misplaced: %v", err)
	}
}

func TestBuiltinNameRefused(t *testing.T) {
	t.Parallel()
	_, err := Parse([]byte("# mine\nname = \"warm-1c\"\n[shift]\nuniform = 1.5\n"), "mine.toml")
	if err == nil || !strings.HasPrefix(err.Error(), "mine.toml:2: key name: \"warm-1c\" is the name of a built-in scenario") {
		t.Errorf("built-in name: %v", err)
	}
	_, err = Parse([]byte("[shift]\nuniform = 1.5\n"), filepath.Join("dir", "fat-tails.toml"))
	if err == nil || !strings.Contains(err.Error(), "\"fat-tails\" (taken from the file name) is the name of a built-in") {
		t.Errorf("built-in name from the file name: %v", err)
	}
}

func TestLookupAllRefusesRepeatedNames(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a.toml"), filepath.Join(dir, "b.toml")
	os.WriteFile(a, []byte("name = \"harbour\"\n[shift]\nuniform = 1\n"), 0o644)
	os.WriteFile(b, []byte("description = \"another\"\n\nname = \"harbour\"\n"), 0o644)
	got, err := LookupAll([]string{"warm-1c", a, "fat-tails"})
	if err != nil || len(got) != 3 || got[1].Name != "harbour" {
		t.Fatalf("distinct names: %v, %d scenarios", err, len(got))
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{a, b}, b + ":3: key name: \"harbour\" is also the name of the scenario in " + a + ":1"},
		{[]string{a, "warm-1c", a}, a + ":1: key name: \"harbour\" is also the name of the scenario in " + a + ":1"},
		{[]string{"warm-1c", "fat-tails", "warm-1c"}, "scenarios: built-in scenario \"warm-1c\" given twice"},
	} {
		_, err := LookupAll(c.args)
		if err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%v: error %v, want %q", c.args, err, c.want)
		}
	}
}

// TestDescribeForNamesTheModelsChange: for a model, a persistence or tails
// scenario says what it makes of that model's φ and shocks, so a skewed-t
// model's kept skew is visible.
func TestDescribeForNamesTheModelsChange(t *testing.T) {
	t.Parallel()
	m := coldModel()
	for _, c := range []struct{ name, want string }{
		{"persistent", "on this model: fast-part φ "},
		{"fat-tails", "on this model: shocks "},
	} {
		s, err := Lookup(c.name)
		if err != nil {
			t.Fatal(err)
		}
		got := strings.Join(s.DescribeFor(m, 2025), "\n")
		if !strings.Contains(got, c.want) || !strings.Contains(got, "→") {
			t.Errorf("%s: %q", c.name, got)
		}
	}
}

// TestDescribeCombinedVolatility: a scale and monthly factors together are
// described by their product, the σ factor Apply uses.
func TestDescribeCombinedVolatility(t *testing.T) {
	t.Parallel()
	s, err := Parse([]byte("name = \"s\"\n[volatility]\nscale = 1.05\nmonthly_scale = [1.3, 1.3, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1.3]\n"), "s.toml")
	if err != nil {
		t.Fatal(err)
	}
	got := strings.Join(s.Describe(), "\n")
	if !strings.Contains(got, "Jan 1.365") || !strings.Contains(got, "Mar 1.05,") || !strings.Contains(got, "Dec 1.365") {
		t.Errorf("description %q", got)
	}
}

// TestDescribeForPersistenceAlone: the σ factor a keep-variance persistence
// change shows is its own, √((1 − φ′²)/(1 − φ²)) for an AR(1) (φ 0.7 → 0.77:
// 0.8837), not mixed with a volatility change in the same file.
func TestDescribeForPersistenceAlone(t *testing.T) {
	t.Parallel()
	s, err := Parse([]byte("name = \"mix\"\n[persistence]\nscale = 1.1\nkeep_variance = true\n[volatility]\nscale = 2\n"), "mix.toml")
	if err != nil {
		t.Fatal(err)
	}
	want := fmt.Sprintf("σ × %.3f to keep the daily variance", math.Sqrt((1-0.77*0.77)/(1-0.7*0.7)))
	if got := strings.Join(s.DescribeFor(coldModel(), 2025), "\n"); !strings.Contains(got, "φ 0.700 → 0.770, "+want) {
		t.Errorf("description %q, want %q", got, want)
	}
}
