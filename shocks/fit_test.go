package shocks

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

func readSample(t *testing.T, name string) []float64 {
	t.Helper()
	rows := readCSV(t, name)
	z := make([]float64, len(rows))
	for i, r := range rows {
		z[i] = num(t, r["z"])
	}
	return z
}

// Tolerances against R's maximum-likelihood fits. Both sides maximize the
// same log-likelihood, so the log-likelihoods agree closely; the parameters
// agree to the flatness of the optimum (nlminb from two starts already
// differs by 1e-5 in ν).
const (
	fitLogLikTol = 1e-6 // absolute, on a log-likelihood of about −4000
	fitNuTol     = 1e-3 // relative
	fitXiTol     = 1e-4 // absolute
)

// TestFitsMatchR fits the samples testdata/sample_sstd.csv (R 4.2.2, fGarch
// 4022.89: set.seed(20240611); rsstd(3000, 0, 1, nu = 6, xi = 0.8)) and
// testdata/sample_std.csv (set.seed(20240612); rstd(3000, 0, 1, nu = 5)) and
// compares with testdata/fits.csv: R's optimize() over ν of
// sum(dstd(z, 0, 1, nu, log = TRUE)) and nlminb() over (ν, ξ) of
// −sum(dsstd(z, 0, 1, nu, xi, log = TRUE)); see testdata/golden.R.
func TestFitsMatchR(t *testing.T) {
	t.Parallel()
	samples := map[string][]float64{
		"sstd": readSample(t, "sample_sstd.csv"),
		"std":  readSample(t, "sample_std.csv"),
	}
	rows := readCSV(t, "fits.csv")
	if len(rows) != 6 {
		t.Fatalf("fits.csv has %d rows, want 6", len(rows))
	}
	for _, r := range rows {
		z := samples[r["sample"]]
		if len(z) != 3000 {
			t.Fatalf("sample %q has %d values, want 3000", r["sample"], len(z))
		}
		wantNu, wantXi, wantLL := num(t, r["nu"]), num(t, r["xi"]), num(t, r["loglik"])
		var fit Fit
		var err error
		switch r["family"] {
		case "normal":
			fit = FitNormal(z)
		case "studentt":
			fit, err = FitStudentT(z)
		case "skewt":
			fit, err = FitSkewT(z)
		}
		name := r["sample"] + "/" + r["family"]
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if d := math.Abs(fit.LogLik - wantLL); !(d <= fitLogLikTol) {
			t.Errorf("%s: log-likelihood %.10f, R %.10f", name, fit.LogLik, wantLL)
		}
		switch d := fit.Dist.(type) {
		case Normal:
			if fit.Params != 0 {
				t.Errorf("%s: Params = %d", name, fit.Params)
			}
		case StudentT:
			if relDiff(d.Nu, wantNu, 0) > fitNuTol || fit.Params != 1 {
				t.Errorf("%s: ν = %.6f (Params %d), R ν = %.6f", name, d.Nu, fit.Params, wantNu)
			}
		case SkewT:
			if relDiff(d.Nu, wantNu, 0) > fitNuTol || math.Abs(d.Xi-wantXi) > fitXiTol || fit.Params != 2 {
				t.Errorf("%s: ν = %.6f, ξ = %.6f (Params %d); R ν = %.6f, ξ = %.6f", name, d.Nu, d.Xi, fit.Params, wantNu, wantXi)
			}
		default:
			t.Errorf("%s: fitted %T", name, fit.Dist)
		}
		t.Logf("%s: %+v log-likelihood %.6f (R %.6f)", name, fit.Dist, fit.LogLik, wantLL)
	}
}

// standardErrors returns √diag of the inverse observed information of the
// log-likelihood ll at x, by finite differences.
func standardErrors(t *testing.T, ll func([]float64) float64, x []float64) []float64 {
	t.Helper()
	n := len(x)
	h := mat.NewSymDense(n, nil)
	fd.Hessian(h, func(x []float64) float64 { return -ll(x) }, x, nil)
	var cov mat.SymDense
	var chol mat.Cholesky
	if !chol.Factorize(h) {
		t.Fatalf("observed information at %v is not positive definite", x)
	}
	if err := chol.InverseTo(&cov); err != nil {
		t.Fatal(err)
	}
	se := make([]float64, n)
	for i := range se {
		se[i] = math.Sqrt(cov.At(i, i))
	}
	return se
}

// TestFitRecovery fits large samples drawn with the Table sampler and checks
// the estimates against the true parameters within zTol standard errors
// (observed information by finite differences).
func TestFitRecovery(t *testing.T) {
	t.Parallel()
	const n = 100_000
	t.Run("skewt", func(t *testing.T) {
		t.Parallel()
		truth := SkewT{Nu: 6, Xi: 0.8}
		z := draws(NewTable(truth), n)
		fit, err := FitSkewT(z)
		if err != nil {
			t.Fatal(err)
		}
		d := fit.Dist.(SkewT)
		se := standardErrors(t, func(x []float64) float64 {
			return SkewT{Nu: x[0], Xi: x[1]}.params().logLik(z)
		}, []float64{d.Nu, d.Xi})
		t.Logf("ν = %.4f ± %.4f, ξ = %.5f ± %.5f", d.Nu, se[0], d.Xi, se[1])
		if math.Abs(d.Nu-truth.Nu) > zTol*se[0] || math.Abs(d.Xi-truth.Xi) > zTol*se[1] {
			t.Errorf("fitted %+v ± (%.3g, %.3g), truth %+v", d, se[0], se[1], truth)
		}
	})
	t.Run("studentt", func(t *testing.T) {
		t.Parallel()
		truth := StudentT{Nu: 4}
		z := draws(NewTable(truth), n)
		fit, err := FitStudentT(z)
		if err != nil {
			t.Fatal(err)
		}
		d := fit.Dist.(StudentT)
		se := standardErrors(t, func(x []float64) float64 { return tLogLik(z, x[0]) }, []float64{d.Nu})
		t.Logf("ν = %.4f ± %.4f", d.Nu, se[0])
		if math.Abs(d.Nu-truth.Nu) > zTol*se[0] {
			t.Errorf("fitted ν = %.4f ± %.3g, truth %v", d.Nu, se[0], truth.Nu)
		}
	})
}

// TestFitNormalShocks fits the t to normal shocks: ν runs to the upper end of
// its range, the fit still converges, and the t's log-likelihood is within a
// few units of the normal's (with ν unbounded, twice the gain would be a
// 50:50 mixture of 0 and χ²₁; from memory, Self & Liang 1987; with ν ≤ 300
// the gain can also be slightly negative), so AIC prefers the normal.
func TestFitNormalShocks(t *testing.T) {
	t.Parallel()
	z := draws(NewTable(Normal{}), 20_000)
	normal := FitNormal(z)
	fit, err := FitStudentT(z)
	if err != nil {
		t.Fatal(err)
	}
	nu := fit.Dist.(StudentT).Nu
	gain := fit.LogLik - normal.LogLik
	t.Logf("ν = %.1f, log-likelihood gain over the normal %.3g", nu, gain)
	if nu < 50 || math.Abs(gain) > 5 {
		t.Errorf("t fitted to normal shocks: ν = %v, log-likelihood gain %v", nu, gain)
	}
	if !(normal.AIC() < fit.AIC()) {
		t.Errorf("AIC prefers the t (%v) over the normal (%v) on normal shocks", fit.AIC(), normal.AIC())
	}
}

func TestFitAIC(t *testing.T) {
	t.Parallel()
	f := Fit{Dist: SkewT{Nu: 5, Xi: 1}, LogLik: -100.5, Params: 2}
	if got, want := f.AIC(), 205.0; got != want {
		t.Errorf("AIC = %v, want 2·2 + 2·100.5 = %v", got, want)
	}
}

func TestFitErrors(t *testing.T) {
	t.Parallel()
	good := readSample(t, "sample_std.csv")[:100]
	bad := append([]float64(nil), good...)
	bad[17] = math.NaN()
	inf := append([]float64(nil), good...)
	inf[3] = math.Inf(-1)
	for name, z := range map[string][]float64{"short": good[:MinFitLen-1], "nil": nil, "nan": bad, "inf": inf} {
		for fam, fit := range map[string]func([]float64) (Fit, error){"t": FitStudentT, "skew": FitSkewT} {
			_, err := fit(z)
			if err == nil {
				t.Errorf("%s %s: no error", fam, name)
				continue
			}
			if !strings.HasPrefix(err.Error(), "shocks: ") {
				t.Errorf("%s %s: error %q lacks the package prefix", fam, name, err)
			}
		}
	}
}

func TestMinimizeReportsNoConvergence(t *testing.T) {
	t.Parallel()
	// A function that keeps falling never converges within the iteration
	// limit.
	_, err := minimize(func(x []float64) float64 { return -math.Abs(x[0]) - x[1]*x[1]*x[1] }, []float64{1, 1})
	if !errors.Is(err, errNoConvergence) {
		t.Errorf("minimize on an unbounded function: error %v, want errNoConvergence", err)
	}
}
