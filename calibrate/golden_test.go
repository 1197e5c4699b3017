package calibrate

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"wxstress/calendar"
	"wxstress/model"
)

// Golden values: testdata/noaa/golden.json, made by testdata/noaa/golden.R
// with R 4.2.2 and fGarch 4022.89 on NOAA daily observations for Seattle and
// New York, 2012–2015 (see testdata/noaa/README.md); the R call behind each
// block is stored beside its numbers in the JSON.
type goldenCity struct {
	OLS      map[string]json.RawMessage `json:"ols"`
	Seasonal struct {
		Amplitude, Theta float64
		PeakDay          float64 `json:"peak_day"`
		TroughDay        float64 `json:"trough_day"`
		TrendPerDecade   float64 `json:"trend_per_decade"`
	} `json:"seasonal"`
	AR1 struct {
		Phi, SE float64
		NPairs  int `json:"n_pairs"`
		Arima   struct{ Phi float64 }
	} `json:"ar1"`
	AROrder      map[string]json.RawMessage `json:"ar_order"`
	MonthlySigma struct {
		Sigma []float64
		Count []int
	} `json:"monthly_sigma"`
	Shocks struct {
		Normal   struct{ LogLik float64 }
		StudentT struct{ Nu, LogLik float64 }     `json:"student_t"`
		SkewedT  struct{ Nu, Xi, LogLik float64 } `json:"skewed_t"`
		BestAIC  string                           `json:"best_aic"`
	} `json:"shocks"`
	Diagnostics struct {
		ACF      struct{ Values []float64 }
		PACF     struct{ Values []float64 }
		LjungBox map[string]struct {
			Statistic float64
			DF        float64
			PValue    float64 `json:"p_value"`
		} `json:"ljung_box"`
		Moments struct {
			Skewness       float64
			ExcessKurtosis float64 `json:"excess_kurtosis"`
		}
		JarqueBera struct {
			Statistic float64
			PValue    float64 `json:"p_value"`
		} `json:"jarque_bera"`
		KSStudentT struct{ Nu, Statistic float64 } `json:"ks_student_t"`
	} `json:"diagnostics"`
	WindowMeans map[string]struct {
		Windows int
		SD      float64
	} `json:"window_means"`
}

type goldenOLS struct {
	Coef, SE []float64
	R2, BIC  float64
}

// Tolerances. Where Go and R do the same arithmetic (least squares, moments,
// autocorrelations) agreement is to rounding; maximum-likelihood shape
// parameters agree only as well as two optimisers on a flat likelihood can
// (the shocks here are close to normal, ν near 80), so the log-likelihood is
// compared tightly and ν loosely.
const (
	tolExact   = 1e-8 // relative
	tolLogLik  = 1e-6 // relative
	tolNu      = 0.02 // relative, ν on a flat likelihood
	tolXi      = 2e-3 // relative
	tolPeakDay = 0.01 // days: the whole-cycle extreme is found on a 0.01-day grid
)

func loadGolden(t *testing.T) map[string]goldenCity {
	t.Helper()
	b, err := os.ReadFile("../testdata/noaa/golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g map[string]json.RawMessage
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	out := map[string]goldenCity{}
	for _, city := range []string{"seattle", "new_york"} {
		var c goldenCity
		if err := json.Unmarshal(g[city], &c); err != nil {
			t.Fatal(err)
		}
		out[city] = c
	}
	return out
}

func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if d := math.Abs(got - want); d > rel*math.Max(math.Abs(want), 1e-3) || math.IsNaN(got) {
		t.Errorf("%s = %.12g, R gives %.12g (rel. diff %.2g, tolerance %g)", what, got, want, d/math.Abs(want), rel)
	}
}

func TestFitMatchesR(t *testing.T) {
	t.Parallel()
	golden := loadGolden(t)
	for city, g := range golden {
		t.Run(city, func(t *testing.T) {
			t.Parallel()
			s, err := ReadFile("../testdata/noaa/"+city+".csv", ReadOptions{Units: Celsius})
			if err != nil {
				t.Fatal(err)
			}
			// The golden fit: one harmonic with a linear trend (the record is
			// only four years, so "auto" would drop the trend), AR(1), and the
			// Student-t family so the KS statistic is against the t as in R.
			// The lean path (conditional least squares) is what R's lm and
			// residual statistics reproduce; the exact-likelihood path is
			// checked against R's Kalman filter in statespace.
			res, err := Fit(s, &Settings{Harmonics: 1, AROrder: 1, Trend: "linear", Shocks: model.FamilyStudentT, Method: "cls"})
			if err != nil {
				t.Fatal(err)
			}
			m, d := res.Model, res.Model.Diagnostics

			var k1 goldenOLS
			json.Unmarshal(g.OLS["K1"], &k1)
			near(t, "intercept a", m.Trend.Intercept, k1.Coef[0], tolExact)
			near(t, "slope b per day", m.Trend.Slope(), k1.Coef[1], tolExact)
			near(t, "c1", m.Seasonal.Harmonics[0].Cos, k1.Coef[2], tolExact)
			near(t, "s1", m.Seasonal.Harmonics[0].Sin, k1.Coef[3], tolExact)
			near(t, "R²", m.Seasonal.R2, k1.R2, tolExact)
			near(t, "trend s.e. per decade", m.Trend.Estimate.SEOLS, k1.SE[1]*10*calendar.DaysPerYear, tolExact)
			near(t, "trend per decade", m.Trend.Estimate.PerDecade, g.Seasonal.TrendPerDecade, tolExact)
			near(t, "amplitude", m.Seasonal.Harmonics[0].Amplitude, g.Seasonal.Amplitude, tolExact)
			near(t, "phase θ", m.Seasonal.Harmonics[0].Phase, g.Seasonal.Theta, tolExact)
			near(t, "peak day", m.Seasonal.Harmonics[0].PeakDayOfYear, g.Seasonal.PeakDay, tolExact)
			if math.Abs(m.Seasonal.PeakDayOfYear-g.Seasonal.PeakDay) > tolPeakDay ||
				math.Abs(m.Seasonal.TroughDayOfYear-g.Seasonal.TroughDay) > tolPeakDay {
				t.Errorf("whole-cycle peak/trough %.3f/%.3f, R %.3f/%.3f", m.Seasonal.PeakDayOfYear,
					m.Seasonal.TroughDayOfYear, g.Seasonal.PeakDay, g.Seasonal.TroughDay)
			}
			for k := 1; k <= MaxHarmonics; k++ {
				var o goldenOLS
				json.Unmarshal(g.OLS["K"+string(rune('0'+k))], &o)
				near(t, "OLS BIC of K harmonics", d.HarmonicsTable[k-1].BICIndependent, o.BIC, tolExact)
			}

			near(t, "φ (conditional least squares)", m.AR.Phi[0], g.AR1.Phi, tolExact)
			near(t, "s.e. of φ", m.AR.PhiSE[0], g.AR1.SE, tolExact)
			if d.ARPairs != g.AR1.NPairs {
				t.Errorf("AR rows %d, R %d", d.ARPairs, g.AR1.NPairs)
			}
			// arima(CSS-ML) is exact maximum likelihood: close to, not equal
			// to, conditional least squares (within 0.002 on 1460 days).
			near(t, "φ against arima CSS-ML", m.AR.Phi[0], g.AR1.Arima.Phi, 0.002)
			for p := 1; p <= MaxAROrder; p++ {
				var o goldenOLS
				json.Unmarshal(g.AROrder["p"+string(rune('0'+p))], &o)
				near(t, "BIC of AR(p)", d.ARTable[p-1].BIC, o.BIC, tolExact)
			}

			for i := range 12 {
				near(t, "monthly σ", m.Volatility.Monthly[i], g.MonthlySigma.Sigma[i], tolExact)
				if m.Volatility.Count[i] != g.MonthlySigma.Count[i] {
					t.Errorf("month %d count %d, R %d", i+1, m.Volatility.Count[i], g.MonthlySigma.Count[i])
				}
			}

			fam := map[string]model.FamilyScore{}
			for _, r := range d.ShockTable {
				fam[r.Family] = r
			}
			near(t, "normal log-lik", fam["normal"].LogLik, g.Shocks.Normal.LogLik, tolExact)
			near(t, "t log-lik", fam["t"].LogLik, g.Shocks.StudentT.LogLik, tolLogLik)
			near(t, "t ν", fam["t"].DF, g.Shocks.StudentT.Nu, tolNu)
			near(t, "skew-t log-lik", fam["skew-t"].LogLik, g.Shocks.SkewedT.LogLik, tolLogLik)
			near(t, "skew-t ν", fam["skew-t"].DF, g.Shocks.SkewedT.Nu, tolNu)
			near(t, "skew-t ξ", fam["skew-t"].Skew, g.Shocks.SkewedT.Xi, tolXi)
			bestAIC := d.ShockTable[0]
			for _, r := range d.ShockTable {
				if r.AIC < bestAIC.AIC {
					bestAIC = r
				}
			}
			if bestAIC.Family != g.Shocks.BestAIC {
				t.Errorf("best family by AIC %s, R %s", bestAIC.Family, g.Shocks.BestAIC)
			}

			for i := range 30 {
				near(t, "ACF", d.ACF[i], g.Diagnostics.ACF.Values[i], tolExact)
				near(t, "PACF", d.PACF[i], g.Diagnostics.PACF.Values[i], tolExact)
			}
			lb := g.Diagnostics.LjungBox
			for key, got := range map[string]model.Test{"z_lag10": d.LjungBoxZ10, "z_lag20": d.LjungBoxZ20,
				"z2_lag10": d.LjungBoxZ210, "z2_lag20": d.LjungBoxZ220} {
				near(t, "Ljung–Box "+key, got.Stat, lb[key].Statistic, tolExact)
				near(t, "Ljung–Box p "+key, got.P, lb[key].PValue, 1e-6)
				if got.DF != lb[key].DF {
					t.Errorf("Ljung–Box %s df %v, R %v", key, got.DF, lb[key].DF)
				}
			}
			near(t, "skewness", d.Skewness, g.Diagnostics.Moments.Skewness, tolExact)
			near(t, "excess kurtosis", d.ExcessKurtosis, g.Diagnostics.Moments.ExcessKurtosis, tolExact)
			near(t, "Jarque–Bera", d.JarqueBera.Stat, g.Diagnostics.JarqueBera.Statistic, tolExact)
			near(t, "KS D against t", d.KS.Stat, g.Diagnostics.KSStudentT.Statistic, 1e-3)

			for i, key := range map[int]string{0: "w30", 2: "w151"} {
				w := g.WindowMeans[key]
				if d.Spread[i].Windows != w.Windows {
					t.Errorf("%s windows %d, R %d", key, d.Spread[i].Windows, w.Windows)
				}
				near(t, key+" observed sd", d.Spread[i].Observed, w.SD, tolExact)
			}
		})
	}
}

// TestHarmonicsChosenByPrewhitenedBIC checks the harmonics table against
// testdata/noaa/harmonics_prewhitened.py (numpy's least squares): the
// residuals' lag-1 autocorrelation ρ, each K's prewhitened BIC, the K it
// prefers (New York 1, where the OLS BIC that R's lm gives prefers 4), and
// the OLS column against R (golden.json).
func TestHarmonicsChosenByPrewhitenedBIC(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("../testdata/noaa/harmonics_prewhitened.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref map[string]json.RawMessage
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	for city, g := range loadGolden(t) {
		var want struct {
			Rho       float64
			Harmonics []struct {
				K           int
				Prewhitened float64 `json:"bic_prewhitened"`
				OLS         float64 `json:"bic_ols"`
			}
			BestK int `json:"best_k"`
		}
		if err := json.Unmarshal(ref[city], &want); err != nil {
			t.Fatal(err)
		}
		var bestR int
		json.Unmarshal(g.OLS["best_k_bic"], &bestR)
		s, err := ReadFile("../testdata/noaa/"+city+".csv", ReadOptions{Units: Celsius})
		if err != nil {
			t.Fatal(err)
		}
		res, err := Fit(s, &Settings{Trend: "linear"})
		if err != nil {
			t.Fatal(err)
		}
		d := res.Model.Diagnostics
		near(t, city+" ρ", d.HarmonicsRho, want.Rho, tolExact)
		for i, w := range want.Harmonics {
			near(t, city+" prewhitened BIC", d.HarmonicsTable[i].BIC, w.Prewhitened, tolExact)
			near(t, city+" OLS BIC (numpy)", d.HarmonicsTable[i].BICIndependent, w.OLS, tolExact)
		}
		if got := len(res.Model.Seasonal.Harmonics); got != want.BestK {
			t.Errorf("%s: chose %d harmonics, the prewhitened BIC prefers %d", city, got, want.BestK)
		}
		t.Logf("%s: ρ %.3f, %d harmonics (R's OLS BIC table prefers %d)", city, d.HarmonicsRho, want.BestK, bestR)
	}
}
