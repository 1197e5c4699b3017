package calibrate

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"testing"

	"wxstress/demo"
	"wxstress/model"
)

// Golden values for the demand model: testdata/demand/golden.json, made by
// testdata/demand/golden.R with R 4.2.2 (lm, lm.fit, Box.test) on the demo
// data (demo/kestrel_bay_daily.csv joined with demo/lanternfield_demand.csv);
// the R call behind each block is stored beside its numbers.
type demandGolden struct {
	Days struct {
		N           int
		First, Last string
		Holidays    int
		Q05, Q95    float64
		GridLo      float64 `json:"grid_lo"`
		GridHi      float64 `json:"grid_hi"`
	}
	Fixed    map[string]demandGoldenFixed
	Constant struct{ RSS, BIC float64 }
	Profile  []struct {
		Form     string
		TbH, TbC float64
		RSS      float64
	}
	Search map[string]struct {
		BalancePoints []float64 `json:"balance_points"`
		Slopes        []float64
		RSS, BIC      float64
	}
}

type demandGoldenFixed struct {
	Names        []string
	Coef, SE     []float64
	R2, RSS, BIC float64
	P            int
	CVRMSE       float64 `json:"cv_rmse"`
	NMBE         float64 `json:"nmbe"`
	AR1Phi       float64 `json:"ar1_phi"`
	AR1PhiSE     float64 `json:"ar1_phi_se"`
	AR1Sigma     float64 `json:"ar1_sigma"`
	AR1Pairs     int     `json:"ar1_pairs"`
	LjungBox10   struct {
		Statistic float64
		PValue    float64 `json:"p_value"`
	} `json:"ljung_box_10"`
}

// Tolerances against R. Least squares by QR in both: agreement to rounding.
// The grid search's residual sums of squares come from the 2×2 reduced
// problem (see demandFitter), algebraically equal to the full fit but with a
// subtraction that costs a few digits.
const (
	tolDemandExact = 1e-8  // relative, full least-squares fits
	tolDemandGrid  = 1e-9  // relative, RSS of the reduced grid problem
	tolNMBEZero    = 1e-9  // percent: NMBE of an OLS fit with an intercept is 0 up to rounding
	tolLjungBoxP   = 1e-12 // absolute: R prints p = 0 below double precision's reach
)

func loadDemandGolden(t *testing.T) demandGolden {
	t.Helper()
	b, err := os.ReadFile("testdata/demand/golden.json")
	if err != nil {
		t.Fatal(err)
	}
	var g demandGolden
	if err := json.Unmarshal(b, &g); err != nil {
		t.Fatal(err)
	}
	return g
}

// demoDays joins the embedded demo demand with the demo station.
func demoDays(t *testing.T) *DemandDays {
	t.Helper()
	s, err := ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, ReadOptions{Units: Celsius})
	if err != nil {
		t.Fatal(err)
	}
	d, err := ReadDemand(bytes.NewReader(demo.Demand()), demo.DemandFile, DemandReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	days, err := JoinDemand(d, s)
	if err != nil {
		t.Fatal(err)
	}
	return days
}

func TestDemandFixedBalancePointsMatchR(t *testing.T) {
	t.Parallel()
	g := loadDemandGolden(t)
	days := demoDays(t)
	if len(days.Dates) != g.Days.N || days.Dates[0].String() != g.Days.First || days.Dates[len(days.Dates)-1].String() != g.Days.Last {
		t.Fatalf("joined %d days %v..%v; R joined %d days %s..%s", len(days.Dates), days.Dates[0],
			days.Dates[len(days.Dates)-1], g.Days.N, g.Days.First, g.Days.Last)
	}
	f, err := newDemandFitter(days.Dates, days.Temp, days.Load, days.Holiday)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "5th percentile (type 7)", quantile7(days.Temp, 0.05), g.Days.Q05, tolDemandExact)
	near(t, "95th percentile (type 7)", quantile7(days.Temp, 0.95), g.Days.Q95, tolDemandExact)
	if lo, hi := f.gridValue(0), f.gridValue(len(f.heat)-1); lo != g.Days.GridLo || hi != g.Days.GridHi {
		t.Errorf("grid %v..%v, R %v..%v", lo, hi, g.Days.GridLo, g.Days.GridHi)
	}

	for key, c := range map[string]struct {
		form     string
		tbH, tbC float64
	}{
		"5p_15.5_22":        {model.FormHeatingCoolingBand, 15.5, 22},
		"heating-only_15.5": {model.FormHeatingOnly, 15.5, 0},
	} {
		want := g.Fixed[key]
		fit, err := f.olsAt(c.form, c.tbH, c.tbC)
		if err != nil {
			t.Fatal(err)
		}
		if len(fit.Beta) != len(want.Coef) {
			t.Fatalf("%s: %d coefficients, R has %d (%v)", key, len(fit.Beta), len(want.Coef), want.Names)
		}
		for i, name := range want.Names {
			near(t, key+" "+name, fit.Beta[i], want.Coef[i], tolDemandExact)
			near(t, key+" s.e. "+name, fit.SE[i], want.SE[i], tolDemandExact)
		}
		near(t, key+" R²", fit.R2(), want.R2, tolDemandExact)
		near(t, key+" RSS", fit.RSS, want.RSS, tolDemandExact)
		p := fit.k() + model.DemandForm(c.form).BalancePoints()
		if p != want.P {
			t.Errorf("%s: p = %d, R script counts %d", key, p, want.P)
		}
		near(t, key+" BIC", demandBIC(f.n, fit.RSS, p), want.BIC, tolDemandExact)

		var m model.Demand
		f.fill(&m, c.form, fit, c.tbH, c.tbC)
		fitted := make([]float64, f.n)
		resid := make([]float64, f.n)
		for i, d := range days.Dates {
			fitted[i] = m.Expected(days.Temp[i], d.Weekday(), days.Holiday[i])
			resid[i] = days.Load[i] - fitted[i]
		}
		near(t, key+" CV(RMSE)", CVRMSE(days.Load, fitted, p), want.CVRMSE, tolDemandExact)
		if got := NMBE(days.Load, fitted, p); math.Abs(got-want.NMBE) > tolNMBEZero {
			t.Errorf("%s NMBE = %g, R %g (tolerance %g)", key, got, want.NMBE, tolNMBEZero)
		}
		if err := fitNoise(&m, days.Dates, resid); err != nil {
			t.Fatal(err)
		}
		near(t, key+" AR(1) φ of the residuals", m.Noise.Phi, want.AR1Phi, tolDemandExact)
		near(t, key+" s.e. of φ", m.Noise.PhiSE, want.AR1PhiSE, tolDemandExact)
		near(t, key+" AR(1) σ", m.Noise.Sigma, want.AR1Sigma, tolDemandExact)
		if m.Noise.Pairs != want.AR1Pairs {
			t.Errorf("%s: %d residual pairs, R %d", key, m.Noise.Pairs, want.AR1Pairs)
		}
		near(t, key+" Ljung–Box Q(10) of the residuals", m.Diagnostics.LjungBoxResiduals.Stat, want.LjungBox10.Statistic, tolDemandExact)
		if p := m.Diagnostics.LjungBoxResiduals.P; math.Abs(p-want.LjungBox10.PValue) > tolLjungBoxP {
			t.Errorf("%s: Ljung–Box p = %g, R %g", key, p, want.LjungBox10.PValue)
		}
	}
}

func TestDemandGridSearchMatchesR(t *testing.T) {
	t.Parallel()
	g := loadDemandGolden(t)
	days := demoDays(t)
	f, err := newDemandFitter(days.Dates, days.Temp, days.Load, days.Holiday)
	if err != nil {
		t.Fatal(err)
	}
	index := func(tb float64) int { return int(math.Round(tb*10)) - f.lo10 }

	near(t, "constant model RSS", f.yy, g.Constant.RSS, tolDemandGrid)
	near(t, "constant model BIC", demandBIC(f.n, f.yy, f.k), g.Constant.BIC, tolDemandGrid)

	// The RSS profile at fixed points, from the reduced problem and from
	// the full least-squares fit.
	for _, p := range g.Profile {
		var rss float64
		ok := true
		switch p.Form {
		case model.FormHeatingOnly:
			s := f.heat[index(p.TbH)]
			rss = f.yy - s.xy*s.xy/s.xx
		case model.FormCoolingOnly:
			s := f.cool[index(p.TbC)]
			rss = f.yy - s.xy*s.xy/s.xx
		default:
			rss, _, _, ok = f.pair(index(p.TbH), index(p.TbC))
		}
		if !ok {
			t.Errorf("%s at %v, %v: no fit", p.Form, p.TbH, p.TbC)
			continue
		}
		near(t, p.Form+" grid RSS", rss, p.RSS, tolDemandGrid)
		full, err := f.olsAt(p.Form, p.TbH, p.TbC)
		if err != nil {
			t.Fatal(err)
		}
		near(t, p.Form+" full RSS", full.RSS, p.RSS, tolDemandExact)
	}

	// Every form's best grid point: R fits each point with lm.fit.
	for _, form := range model.DemandFormNames() {
		want := g.Search[form]
		b := f.search(form)
		s := b.score(form, f)
		if len(s.BalancePoints) != len(want.BalancePoints) {
			t.Fatalf("%s: balance points %v, R %v", form, s.BalancePoints, want.BalancePoints)
		}
		for i := range want.BalancePoints {
			if s.BalancePoints[i] != want.BalancePoints[i] {
				t.Errorf("%s: balance points %v, R's grid search %v", form, s.BalancePoints, want.BalancePoints)
			}
		}
		for i := range want.Slopes {
			near(t, form+" slope", s.Slopes[i], want.Slopes[i], tolDemandGrid)
		}
		near(t, form+" RSS", s.RSS, want.RSS, tolDemandGrid)
		near(t, form+" BIC", s.BIC, want.BIC, tolDemandGrid)
	}
}
