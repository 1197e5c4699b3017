package scenarios

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wxstress/model"
)

// FuzzParse reads arbitrary scenario TOML. An error must wrap ErrScenario
// and start with the file name; an accepted scenario must describe itself,
// and when Apply accepts it for a model (in °C and in °F), the result must
// read back as a model file.
func FuzzParse(f *testing.F) {
	files, _ := filepath.Glob("*.toml")
	for _, p := range files {
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	for _, src := range []string{
		"name = \"x\"\nwarmth = 1\n",
		"[persistence]\nphi = [1.2]\n",
		"[persistence]\nphi = [0.6, 0.3]\nscale = 1.1\nkeep_variance = true\n",
		"[tails]\ndf = 4\nskew = 0.5\n",
		"units = \"F\"\n[[event]]\nkind = \"hot\"\ndays = 120\nanomaly = 30\nwindow = \"12-01:02-28\"\nprobability = 0.3\n",
		"units = \"C\"\n[[event]]\ndays = 3\nanomaly = 30\nstart = \"02-29\"\n",
		"[trend]\ntarget_year = 2300\nslope_per_decade = 5\n[shift]\nuniform = 20\nmonthly = [20, 20, 20, 20, 20, 20, 20, 20, 20, 20, 20, 20]\n",
		"[volatility]\nscale = 10\n",
		"name = \"warm-1c\"\n",
		"[shift\n",
	} {
		f.Add([]byte(src))
	}
	celsius := coldModel()
	fahrenheit := coldModel()
	fahrenheit.Data.Units = "F"
	fahrenheit.Trend.Intercept = 23
	for m := range fahrenheit.Volatility.Monthly {
		fahrenheit.Volatility.Monthly[m] = 1.8
	}
	f.Fuzz(func(t *testing.T, src []byte) {
		const name = "fuzz.toml"
		s, err := Parse(src, name)
		if err != nil {
			if s != nil || !errors.Is(err, ErrScenario) || !strings.HasPrefix(err.Error(), name+":") {
				t.Fatalf("error %q (wraps ErrScenario: %v), scenario %v", err, errors.Is(err, ErrScenario), s != nil)
			}
			return
		}
		if len(s.Describe()) == 0 || s.Name == "" {
			t.Fatal("an accepted scenario without a name or description")
		}
		for _, m := range []*model.File{celsius, fahrenheit} {
			out, err := s.Apply(m, 2025)
			if err != nil {
				continue // model-dependent refusals are fine
			}
			s.DescribeFor(m, 2025)
			// Apply validated the result; it must also read back as a model
			// file. That Validate implies a finite simulation is
			// FuzzDecodeModel's property, so the simulator is left out here
			// for speed.
			b, err := json.Marshal(out)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := model.Decode(b, "applied.json"); err != nil {
				t.Fatalf("applied scenario does not read back: %v", err)
			}
		}
	})
}
