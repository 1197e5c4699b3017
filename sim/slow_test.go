package sim

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/stat"

	"wxstress/model"
)

// TestSlowPartLaw checks the simulated slow part against its definition
// F(t) = φ_s F(t−1) + s_F √(1 − φ_s²) η(t): stationary sd s_F, lag-1
// autocorrelation φ_s, lag-30 autocorrelation φ_s³⁰, and a normal law
// (excess kurtosis 0) although each η is one of 1024 quantiles. The fast
// part is made negligible (σ = 0.001) so the anomaly is F.
func TestSlowPartLaw(t *testing.T) {
	t.Parallel()
	const phiS, sdF = 0.97, 1.5
	m := flatModel(0, 0.1, 0.001, model.FamilyNormal, 0)
	m.Slow = &model.Slow{Phi: phiS, SD: sdF}
	pl, _, err := prepare(m, &Config{Paths: 1, Bases: BasesFor(model.Celsius)})
	if err != nil {
		t.Fatal(err)
	}
	buf := make([]float64, pl.n)
	var rng rand.PCG
	var first, lag1, lag30 []float64
	var all []float64
	for i := range 4000 {
		seedPath(&rng, 5, i)
		pl.temps(&rng, buf)
		d := pl.acc // the first accumulated day: F there has its stationary law
		first = append(first, buf[d]-pl.mean[d])
		lag1 = append(lag1, buf[d+1]-pl.mean[d+1])
		lag30 = append(lag30, buf[d+30]-pl.mean[d+30])
		for j := d; j < pl.n; j += 60 {
			all = append(all, buf[j]-pl.mean[j])
		}
	}
	sd := stat.StdDev(first, nil)
	// s.e. of an sd from 4000 normal draws ≈ sd/√8000 ≈ 0.017; 4 of them.
	if math.Abs(sd-sdF) > 0.07 {
		t.Errorf("sd of F %.4f, want %.2f", sd, sdF)
	}
	// s.e. of a correlation near ρ from n pairs ≈ (1 − ρ²)/√n.
	if r := stat.Correlation(first, lag1, nil); math.Abs(r-phiS) > 4*(1-phiS*phiS)/math.Sqrt(4000) {
		t.Errorf("lag-1 autocorrelation %.4f, want %.3f", r, phiS)
	}
	want30 := math.Pow(phiS, 30)
	if r := stat.Correlation(first, lag30, nil); math.Abs(r-want30) > 4*(1-want30*want30)/math.Sqrt(4000) {
		t.Errorf("lag-30 autocorrelation %.4f, want %.4f", r, want30)
	}
	// Excess kurtosis of a normal sample of n has s.e. √(24/n).
	if k := stat.ExKurtosis(all, nil); math.Abs(k) > 4*math.Sqrt(24/float64(len(all))) {
		t.Errorf("excess kurtosis of F %.4f over %d days, want 0 (normal)", k, len(all))
	}
}
