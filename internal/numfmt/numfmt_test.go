package numfmt

import (
	"encoding/json"
	"math"
	"os"
	"regexp"
	"strings"
	"sync"
	"testing"
)

var exponent = regexp.MustCompile(`[0-9][eE][+-]?[0-9]`)

// noBadForm fails if s has an exponent or a negative zero.
func noBadForm(t *testing.T, call, s string) {
	t.Helper()
	if exponent.MatchString(s) {
		t.Errorf("%s = %q has an exponent", call, s)
	}
	if s == "-0" || strings.HasPrefix(s, "-0 ") || strings.HasPrefix(s, "-0.") && strings.Trim(s, "-0.,% ") == "" {
		t.Errorf("%s = %q is a negative zero", call, s)
	}
}

func TestFixedMatchesPython(t *testing.T) {
	t.Parallel()
	// Python 3.11 "{:,.{d}f}" (PEP 378), see testdata/fixed_golden.py.
	b, err := os.ReadFile("testdata/fixed_golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g struct {
		Cases []struct {
			X        float64
			Decimals int
			Want     string
		}
	}
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	for _, c := range g.Cases {
		if got := Fixed(c.X, c.Decimals); got != c.Want {
			t.Errorf("Fixed(%v, %d) = %q, Python %q", c.X, c.Decimals, got, c.Want)
		}
	}
}

// The values that came out badly before ("6.3e-14", "2.8e+02", "-0.0",
// "20844556.1", "7e+06") and the rules of doc.go worked by hand.

func TestNumber(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		x    float64
		want string
	}{
		{20844556.1, "20,844,556"},
		{7e6, "7,000,000"},
		{2.8e2, "280"},
		{2450.37, "2,450"},
		{6.3, "6.3"},
		{-6.3, "-6.3"},
		{0.012345, "0.01235"},
		{8.2e-5, "0.000082"},
		{1.23456e-4, "0.0001235"}, // four significant digits at 10⁻⁴
		{1.2345e-4, "0.0001234"},  // binary 1.23449999…e-4: rounding is of the exact value
		{6.3e-14, "0"},
		{-6.3e-14, "0"},
		{1.6e-18, "0"},
		{math.Copysign(0, -1), "0"},
		{1e15, "1,000,000,000,000,000"},
		{1e18, "1,000,000,000,000,000,000"},
		{99999.7, "100,000"},
		{math.NaN(), "n/a"},
		{math.Inf(-1), "-∞"},
	} {
		got := Number(c.x)
		if got != c.want {
			t.Errorf("Number(%v) = %q, want %q", c.x, got, c.want)
		}
		noBadForm(t, "Number", got)
	}
}

func TestValueAndSE(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		x, se             float64
		value, se2, joint string
	}{
		// The rule of doc.go: the last digit at se's first significant digit.
		{2450.37, 6.3, "2,450", "± 6.3", "2,450 ± 6.3"},
		{2450.37, 0.63, "2,450.4", "± 0.63", "2,450.4 ± 0.63"},
		{2450.37, 63, "2,450", "± 63", "2,450 ± 63"},
		{2450.37, 283, "2,500", "± 280", "2,500 ± 280"},
		{20844556.1, 23456, "20,840,000", "± 23,000", "20,840,000 ± 23,000"},
		{7e6, 2.8e2, "7,000,000", "± 280", "7,000,000 ± 280"},
		{0.5123, 0.0016, "0.512", "± 0.0016", "0.512 ± 0.0016"},
		// se 0.996 shows as "± 1.0", so the value stops at the units.
		{12.34, 0.996, "12", "± 1.0", "12 ± 1.0"},
		// Zero within the error: "0", never "-0.0" or "0.00000".
		{math.Copysign(0, -1), 1.6e-5, "0", "± 0.000016", "0 ± 0.000016"},
		{-0.000004, 1.6e-5, "0", "± 0.000016", "0 ± 0.000016"},
		{0.0003, 0.0016, "0", "± 0.0016", "0 ± 0.0016"},
		{-40, 280, "0", "± 280", "0 ± 280"},
		{-60, 280, "-100", "± 280", "-100 ± 280"},
		// Rounding noise, not Monte Carlo error.
		{6.3e-14, 1.6e-18, "0", "± 0", "0 ± 0"},
		{20844556.1, 3.7e-6, "20,844,556", "± 0.0000037", "20,844,556 ± 0"},
		// Exact and unknown.
		{2450.37, 0, "2,450", "± 0", "2,450 (exact)"},
		{2450.37, math.NaN(), "2,450", "± n/a", "2,450 ± n/a"},
		{2450.37, math.Inf(1), "2,450", "± ∞", "2,450 ± ∞"},
	} {
		if got := Value(c.x, c.se); got != c.value {
			t.Errorf("Value(%v, %v) = %q, want %q", c.x, c.se, got, c.value)
		}
		if got := SE(c.se); got != c.se2 {
			t.Errorf("SE(%v) = %q, want %q", c.se, got, c.se2)
		}
		got := ValueSE(c.x, c.se)
		if got != c.joint {
			t.Errorf("ValueSE(%v, %v) = %q, want %q", c.x, c.se, got, c.joint)
		}
		noBadForm(t, "ValueSE", got)
	}
}

func TestSE(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		se   float64
		want string
	}{
		{6.3e-14, "± 0"},
		{1.6e-18, "± 0"},
		{2.8e2, "± 280"},
		{1, "± 1.0"},
		{0.0001, "± 0.00010"},
		{9.96, "± 10"},
		{99.6, "± 100"},
		{3e-7, "± 0.0000003"}, // one digit left at the display resolution
		{12345678, "± 12,000,000"},
	} {
		got := SE(c.se)
		if got != c.want {
			t.Errorf("SE(%v) = %q, want %q", c.se, got, c.want)
		}
		noBadForm(t, "SE", got)
	}
}

func TestFixedHasNoNegativeZero(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		x    float64
		d    int
		want string
	}{
		{-0.001, 2, "0.00"},
		{math.Copysign(0, -1), 1, "0.0"},
		{-0.4, 0, "0"},
		{-0.6, 0, "-1"},
	} {
		if got := Fixed(c.x, c.d); got != c.want {
			t.Errorf("Fixed(%v, %d) = %q, want %q", c.x, c.d, got, c.want)
		}
	}
}

func TestPercent(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		p    float64
		want string
	}{
		{0.12345, "12.3%"},
		{1, "100.0%"},
		{-0.04, "-4.0%"},
		{0.00995, "1.0%"}, // 0.995 % rounds to one decimal, not two digits
		{0.0052, "0.52%"},
		{0.000031, "0.0031%"},
		{3e-9, "< 0.0001%"},
		{-3e-9, "> -0.0001%"},
		{0, "0.0%"},
		{math.Copysign(0, -1), "0.0%"},
	} {
		got := Percent(c.p)
		if got != c.want {
			t.Errorf("Percent(%v) = %q, want %q", c.p, got, c.want)
		}
		noBadForm(t, "Percent", got)
	}
}

func TestProb(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		p    float64
		want string
	}{
		{0.35, "0.35"},
		{0.05, "0.05"},
		{0.0123, "0.012"},
		{1e-5, "0.00001"},
		{3.2e-6, "0.0000032"},
		{1.23e-7, "0.0000001"},
		{1e-9, "< 0.0000001"},
		{0.5, "0.5"},
		{0.9, "0.9"},
		{0.99997, "0.99997"},
		{0.999999, "0.999999"},
		{1 - 1e-9, "> 0.9999999"},
		{0, "0"},
		{1, "1"},
		{math.NaN(), "n/a"},
	} {
		got := Prob(c.p)
		if got != c.want {
			t.Errorf("Prob(%v) = %q, want %q", c.p, got, c.want)
		}
		noBadForm(t, "Prob", got)
	}
}

func TestMisusePanics(t *testing.T) {
	t.Parallel()
	for name, f := range map[string]func(){
		"negative se":         func() { Value(1, -1) },
		"negative se in SE":   func() { SE(-1) },
		"probability above 1": func() { Prob(1.5) },
		"negative decimals":   func() { Fixed(1, -1) },
	} {
		func() {
			defer func() {
				if r := recover(); r == nil || !strings.HasPrefix(r.(string), "numfmt: ") {
					t.Errorf("%s: panic %v, want one prefixed \"numfmt: \"", name, r)
				}
			}()
			f()
		}()
	}
}

func TestConcurrentUse(t *testing.T) {
	t.Parallel()
	// The shared printer must give the same text from many goroutines (run
	// with -race to check for data races).
	var wg sync.WaitGroup
	for range 8 {
		wg.Go(func() {
			for range 200 {
				if got := ValueSE(20844556.1, 23456); got != "20,840,000 ± 23,000" {
					t.Errorf("ValueSE = %q", got)
					return
				}
			}
		})
	}
	wg.Wait()
}

// TestRoundUp checks that path counts round up, never down, to two
// significant digits (rounding down would promise a precision the run
// would not reach).
func TestRoundUp(t *testing.T) {
	for _, c := range []struct {
		n    int
		want string
	}{{0, "0"}, {7, "7"}, {99, "99"}, {100, "100"}, {101, "110"}, {63419, "64,000"}, {478844, "480,000"}, {10000, "10,000"}, {10001, "11,000"}} {
		if got := RoundUp(c.n); got != c.want {
			t.Errorf("RoundUp(%d) = %q, want %q", c.n, got, c.want)
		}
	}
}
