package statespace

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"strconv"
	"testing"
	"time"
)

// Reference values from R 4.2.2 (testdata/golden.R: an independent Kalman
// filter written in R, cross-checked on the constant-σ series against R's
// own KalmanLike on the equivalent ARMA(2,1), and maximum likelihood by
// optim BFGS from several starts). Series made by testdata/make_series.R.

type goldenSeries struct {
	Truth struct {
		PhiFast      float64   `json:"phi_fast"`
		PhiSlow      float64   `json:"phi_slow"`
		SDSlow       float64   `json:"sd_slow"`
		Sigma        float64   `json:"sigma"`
		SigmaMonthly []float64 `json:"sigma_monthly"`
		LogLik       float64   `json:"loglik"`
	} `json:"truth"`
	MLE struct {
		PhiFast      float64   `json:"phi_fast"`
		PhiSlow      float64   `json:"phi_slow"`
		SDSlow       float64   `json:"sd_slow"`
		Sigma        float64   `json:"sigma"`
		SigmaMonthly []float64 `json:"sigma_monthly"`
		LogLik       float64   `json:"loglik"`
	} `json:"mle"`
	AR1Only struct {
		Phi    float64 `json:"phi"`
		LogLik float64 `json:"loglik"`
	} `json:"ar1_only"`
	LR float64 `json:"lr"`
}

func readSeries(t *testing.T, path string) ([]float64, []uint8) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var x []float64
	var month []uint8
	for _, r := range rows[1:] {
		d, err := time.Parse("2006-01-02", r[0])
		if err != nil {
			t.Fatal(err)
		}
		v := math.NaN()
		if r[1] != "" && r[1] != "NA" {
			if v, err = strconv.ParseFloat(r[1], 64); err != nil {
				t.Fatal(err)
			}
		}
		x = append(x, v)
		month = append(month, uint8(d.Month()-1))
	}
	return x, month
}

func sigmas(monthly []float64, c float64) (s [12]float64) {
	for m := range s {
		if monthly != nil {
			s[m] = monthly[m]
		} else {
			s[m] = c
		}
	}
	return s
}

func TestLogLikAndFitMatchR(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("testdata/golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g map[string]json.RawMessage
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	const (
		tolLogLikExact = 1e-6 // the same likelihood evaluated twice: only rounding differs
		tolLogLikMax   = 2e-3 // two optimisers at one maximum
	)
	for _, name := range []string{"series", "series_const"} {
		t.Run(name, func(t *testing.T) {
			t.Parallel()
			var gs goldenSeries
			if err := json.Unmarshal(g[name], &gs); err != nil {
				t.Fatal(err)
			}
			x, month := readSeries(t, "testdata/"+name+".csv")
			truth := Params{Phi: []float64{gs.Truth.PhiFast}, Sigma: sigmas(gs.Truth.SigmaMonthly, gs.Truth.Sigma),
				PhiSlow: gs.Truth.PhiSlow, SDSlow: gs.Truth.SDSlow}
			// Both filters: the scalar one of every fit and the general one.
			if got := LogLik(x, month, truth); math.Abs(got-gs.Truth.LogLik) > tolLogLikExact {
				t.Errorf("log-likelihood at the truth %.8f, R %.8f", got, gs.Truth.LogLik)
			}
			if got := run(x, month, truth, nil, nil).LogLik; math.Abs(got-gs.Truth.LogLik) > tolLogLikExact {
				t.Errorf("general filter at the truth %.8f, R %.8f", got, gs.Truth.LogLik)
			}
			// The maximum: the monthly-σ fit is compared on the monthly series;
			// on the constant-σ series our fit has 12 σ and so can only reach
			// a higher maximum than R's single σ.
			start := Params{Phi: []float64{0.6}, Sigma: sigmas(nil, 2)}
			fit, err := Fit(x, month, start, true)
			if err != nil {
				t.Fatal(err)
			}
			ar, err := Fit(x, month, start, false)
			if err != nil {
				t.Fatal(err)
			}
			if name == "series" {
				if math.Abs(fit.LogLik-gs.MLE.LogLik) > tolLogLikMax {
					t.Errorf("maximum log-likelihood %.6f, R %.6f", fit.LogLik, gs.MLE.LogLik)
				}
				// Parameters at a flat maximum: within a hundredth of R's s.e.
				// (φ_fast 0.022, φ_slow 0.059, s_F 0.52) or 1e-3.
				for _, c := range []struct {
					what      string
					got, want float64
					tol       float64
				}{
					{"φ_fast", fit.Params.Phi[0], gs.MLE.PhiFast, 1e-3},
					{"φ_slow", fit.Params.PhiSlow, gs.MLE.PhiSlow, 2e-3},
					{"s_F", fit.Params.SDSlow, gs.MLE.SDSlow, 1e-2},
					{"σ January", fit.Params.Sigma[0], gs.MLE.SigmaMonthly[0], 2e-3},
					{"σ July", fit.Params.Sigma[6], gs.MLE.SigmaMonthly[6], 2e-3},
				} {
					if math.Abs(c.got-c.want) > c.tol {
						t.Errorf("%s = %.5f, R %.5f (tolerance %g)", c.what, c.got, c.want, c.tol)
					}
				}
				if math.Abs(ar.LogLik-gs.AR1Only.LogLik) > tolLogLikMax {
					t.Errorf("AR(1)-only maximum %.6f, R %.6f", ar.LogLik, gs.AR1Only.LogLik)
				}
				if lr := 2 * (fit.LogLik - ar.LogLik); math.Abs(lr-gs.LR) > 2*tolLogLikMax*2 {
					t.Errorf("likelihood ratio %.4f, R %.4f", lr, gs.LR)
				}
			} else if fit.LogLik < gs.MLE.LogLik-tolLogLikMax || ar.LogLik < gs.AR1Only.LogLik-tolLogLikMax {
				t.Errorf("monthly-σ maxima %.4f / %.4f below R's single-σ ones %.4f / %.4f",
					fit.LogLik, ar.LogLik, gs.MLE.LogLik, gs.AR1Only.LogLik)
			}
		})
	}
}
