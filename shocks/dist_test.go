package shocks

import (
	"bufio"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// readCSV reads a testdata CSV written by testdata/golden.R: '#' comment
// lines, a header, then rows. It returns the rows as maps keyed by column.
func readCSV(t *testing.T, name string) []map[string]string {
	t.Helper()
	f, err := os.Open(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var body strings.Builder
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if line := sc.Text(); !strings.HasPrefix(line, "#") {
			body.WriteString(line)
			body.WriteByte('\n')
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(strings.NewReader(body.String())).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	if len(recs) < 2 {
		t.Fatalf("%s: no rows", name)
	}
	rows := make([]map[string]string, 0, len(recs)-1)
	for _, r := range recs[1:] {
		row := make(map[string]string, len(r))
		for i, h := range recs[0] {
			row[h] = r[i]
		}
		rows = append(rows, row)
	}
	return rows
}

// num parses a CSV number; R writes missing values as NA.
func num(t *testing.T, s string) float64 {
	t.Helper()
	if s == "NA" {
		return math.NaN()
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// relDiff is |got − want| / max(|want|, floor).
func relDiff(got, want, floor float64) float64 {
	return math.Abs(got-want) / math.Max(math.Abs(want), floor)
}

// Tolerances against R. The floor turns the relative error into an absolute
// one near zero (quantiles at the median, log-densities near 0).
const (
	logProbTol  = 1e-12 // relative, floor 1
	cdfTol      = 1e-11 // relative, floor 1e-300: tail probabilities are compared relatively
	quantileTol = 1e-10 // relative, floor 1
)

// TestGolden compares LogProb, CDF, Quantile and UpperQuantile with
// testdata/golden.csv: values from R 4.2.2 with fGarch 4022.89 — dnorm, pnorm,
// qnorm for the normal; dt, pt, qt rescaled by √(ν/(ν−2)) for the Student-t;
// dsstd, psstd, qsstd(mean = 0, sd = 1, nu, xi) for the skewed t (see
// testdata/golden.R).
func TestGolden(t *testing.T) {
	t.Parallel()
	rows := readCSV(t, "golden.csv")
	counts := map[string]int{}
	for _, r := range rows {
		var d interface {
			Dist
			UpperQuantiler
		}
		nu, xi := num(t, r["nu"]), num(t, r["xi"])
		switch r["family"] {
		case "normal":
			d = Normal{}
		case "studentt":
			d = StudentT{Nu: nu}
		case "skewt":
			d = SkewT{Nu: nu, Xi: xi}
		default:
			t.Fatalf("unknown family %q", r["family"])
		}
		arg, want := num(t, r["arg"]), num(t, r["value"])
		var got, diff, tol float64
		switch r["kind"] {
		case "logpdf":
			got = d.LogProb(arg)
			diff, tol = relDiff(got, want, 1), logProbTol
		case "cdf":
			got = d.CDF(arg)
			diff, tol = relDiff(got, want, 1e-300), cdfTol
		case "quantile":
			got = d.Quantile(arg)
			diff, tol = relDiff(got, want, 1), quantileTol
		case "upperquantile":
			got = d.UpperQuantile(arg)
			diff, tol = relDiff(got, want, 1), quantileTol
		default:
			t.Fatalf("unknown kind %q", r["kind"])
		}
		counts[r["family"]+" "+r["kind"]]++
		if !(diff <= tol) {
			t.Errorf("%#v.%s(%v) = %.17g, R gives %.17g (relative difference %.3g > %.3g)",
				d, r["kind"], arg, got, want, diff, tol)
		}
	}
	// Guard against a golden file that silently lost its rows.
	for _, fam := range []string{"normal", "studentt", "skewt"} {
		for _, kind := range []string{"logpdf", "cdf", "quantile", "upperquantile"} {
			if counts[fam+" "+kind] == 0 {
				t.Errorf("golden.csv has no %s %s rows", fam, kind)
			}
		}
	}
}

// momentTol bounds the quadrature error of ∫f, ∫z f and ∫z² f.
const momentTol = 1e-9

// TestSkewTStandardized checks by quadrature that the skewed t density
// integrates to 1 with mean 0 and variance 1 — the definition of the
// standardization, independent of R.
func TestSkewTStandardized(t *testing.T) {
	t.Parallel()
	for _, d := range []SkewT{{3, 1.5}, {5, 1}, {6, 0.8}, {10, 0.5}, {30, 2}, {4.5, 0.25}} {
		k := d.params()
		mode := -k.mu / k.s
		// z = mode + sinh(v) turns the polynomial tails into exponential
		// ones; the kink at the mode is a node boundary.
		var m [3]float64
		for j := range m {
			f := func(v float64) float64 {
				z := mode + math.Sinh(v)
				return math.Pow(z, float64(j)) * math.Exp(d.LogProb(z)) * math.Cosh(v)
			}
			m[j] = quad.Fixed(f, -60, 0, 2000, quad.Legendre{}, 0) + quad.Fixed(f, 0, 60, 2000, quad.Legendre{}, 0)
		}
		if math.Abs(m[0]-1) > momentTol || math.Abs(m[1]) > momentTol || math.Abs(m[2]-1) > momentTol {
			t.Errorf("%+v: ∫f = %.12f, ∫z f = %.3g, ∫z² f = %.12f; want 1, 0, 1", d, m[0], m[1], m[2])
		}
	}
}

// inverseTol bounds |CDF(Quantile(p)) − p| relative to min(p, 1 − p).
const inverseTol = 1e-9

func TestQuantileInvertsCDF(t *testing.T) {
	t.Parallel()
	dists := []interface {
		Dist
		UpperQuantiler
	}{Normal{}, StudentT{2.05}, StudentT{4}, StudentT{300}, SkewT{2.05, 0.2}, SkewT{6, 0.8}, SkewT{4, 1}, SkewT{20, 5}}
	for _, d := range dists {
		for _, p := range []float64{1e-300, 1e-15, 1e-6, 0.01, 0.2, 0.5, 0.7, 0.99} {
			if got := d.CDF(d.Quantile(p)); relDiff(got, p, 0) > inverseTol {
				t.Errorf("%#v: CDF(Quantile(%g)) = %.17g", d, p, got)
			}
			// Upper tail: 1 − CDF loses digits, so compare the
			// quantiles through the mirror image where it exists.
			up := d.UpperQuantile(p)
			if p >= 0.01 {
				if got := 1 - d.CDF(up); relDiff(got, p, 0) > 1e-7 {
					t.Errorf("%#v: 1 − CDF(UpperQuantile(%g)) = %.17g", d, p, got)
				}
			}
		}
	}
}

// TestSymmetries checks identities of the family: ξ = 1 is the unit-variance
// t; ξ ↔ 1/ξ mirrors the density; the t at large ν approaches the normal.
func TestSymmetries(t *testing.T) {
	t.Parallel()
	const tol = 1e-12
	for _, nu := range []float64{2.5, 5, 40} {
		s, st := SkewT{Nu: nu, Xi: 1}, StudentT{Nu: nu}
		for _, z := range []float64{-7, -1.3, 0, 0.4, 3} {
			if d := math.Abs(s.LogProb(z) - st.LogProb(z)); d > tol {
				t.Errorf("ν=%v z=%v: SkewT ξ=1 log-density differs from StudentT by %g", nu, z, d)
			}
			if d := math.Abs(s.CDF(z) - st.CDF(z)); d > tol {
				t.Errorf("ν=%v z=%v: SkewT ξ=1 CDF differs from StudentT by %g", nu, z, d)
			}
			a, b := SkewT{Nu: nu, Xi: 0.6}, SkewT{Nu: nu, Xi: 1 / 0.6}
			if d := math.Abs(a.LogProb(z) - b.LogProb(-z)); d > tol {
				t.Errorf("ν=%v z=%v: f_ξ(z) − f_{1/ξ}(−z) = %g", nu, z, d)
			}
		}
	}
	// The unit-variance t differs from the normal by O(1/ν) (from memory:
	// the Edgeworth-type expansion of the t density); at ν = 1e6 that is
	// far below the tolerance used here.
	const nearNormalTol = 1e-5
	for _, z := range []float64{-3, 0, 1.5} {
		if d := math.Abs(StudentT{Nu: 1e6}.LogProb(z) - Normal{}.LogProb(z)); d > nearNormalTol {
			t.Errorf("z=%v: StudentT ν=1e6 log-density differs from normal by %g", z, d)
		}
	}
}

func TestMisusePanics(t *testing.T) {
	t.Parallel()
	cases := map[string]func(){
		"nu 2":        func() { StudentT{Nu: 2}.LogProb(0) },
		"nu NaN":      func() { StudentT{Nu: math.NaN()}.CDF(0) },
		"nu Inf":      func() { SkewT{Nu: math.Inf(1), Xi: 1}.CDF(0) },
		"xi 0":        func() { SkewT{Nu: 5, Xi: 0}.LogProb(0) },
		"p 1.5":       func() { Normal{}.Quantile(1.5) },
		"p NaN":       func() { SkewT{Nu: 5, Xi: 1}.Quantile(math.NaN()) },
		"q -1":        func() { StudentT{Nu: 5}.UpperQuantile(-1) },
		"nil table":   func() { NewTable(nil) },
		"zero values": func() { NewTable(StudentT{}) },
	}
	for name, f := range cases {
		func() {
			defer func() {
				r := recover()
				if r == nil {
					t.Errorf("%s: no panic", name)
					return
				}
				if s, ok := r.(string); !ok || !strings.HasPrefix(s, "shocks: ") {
					t.Errorf("%s: panic %v lacks the package prefix", name, r)
				}
			}()
			f()
		}()
	}
}
