package hedge

import (
	"errors"
	"math"
	"os"
	"strings"
	"testing"
)

// FuzzParse feeds the hedge reader arbitrary TOML: it must never panic, an
// error must wrap ErrFile and name the file, and an accepted file must
// validate and evaluate on a small set of values without NaN.
func FuzzParse(f *testing.F) {
	if b, err := os.ReadFile("example.toml"); err == nil {
		f.Add(b)
	}
	for _, src := range []string{
		"[[contract]]\nname = \"a\"\nindex = \"hdd\"\nperiod = \"heating\"\nkind = \"call\"\nstrike = 2450\ntick = 4000\n",
		"[[contract]]\nname = \"a\"\nindex = \"hdd\"\nperiod = \"heating\"\nkind = \"collar\"\nstrike_low = 2000\nstrike_high = 2500\ntick = 10\nlimit = 1e6\n",
		"[exposure]\nindex = \"energy\"\nperiod = \"heating\"\nplan = 11500000\nprice_above = 9\nprice_below = 2.5\n",
		"[[contract]]\nname = \"a\"\nkind = \"swap\"\nstrike = 1\ntick = 1\nquantity = -2\npremium = 5\nindex = \"cdd\"\nperiod = \"cooling\"\n",
		"currency = 3\n",
		"[[contract]]\nname = \"a\"\n[[contract]]\nname = \"a\"\n",
		"[exposure\n",
	} {
		f.Add([]byte(src))
	}
	f.Fuzz(func(t *testing.T, src []byte) {
		const name = "fuzz.toml"
		h, err := Parse(src, name)
		if err != nil {
			if h != nil || !errors.Is(err, ErrFile) || !strings.HasPrefix(err.Error(), name) {
				t.Fatalf("error %q (wraps ErrFile: %v), file %v", err, errors.Is(err, ErrFile), h != nil)
			}
			return
		}
		if err := h.Validate(); err != nil {
			t.Fatalf("Parse accepted a file Validate refuses: %v", err)
		}
		values := map[Key][]float64{}
		for _, k := range h.Needs() {
			values[k] = []float64{0, 1500, 2400, 2500, 3100, 1e7}
		}
		r, err := Evaluate(h, values, nil)
		if err != nil {
			t.Fatalf("Evaluate of an accepted file: %v", err)
		}
		for _, c := range r.Contracts {
			for _, v := range c.Payoffs {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("contract %q pays %v", c.Contract.Name, v)
				}
			}
		}
	})
}
