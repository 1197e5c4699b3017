package statespace

import (
	"math"
	"testing"
)

// TestWrittenOutFiltersMatchRun checks the generated AR(2)..AR(5) filters
// (filter_gen.go) against the general filter run, with and without the slow
// part, on a record with gaps: the same sums to rounding (the two differ
// only in the order of a few additions and in run's separate update of the
// covariance's lower triangle).
func TestWrittenOutFiltersMatchRun(t *testing.T) {
	truth := Params{Phi: []float64{0.72}, Sigma: monthly(2.4), PhiSlow: 0.985, SDSlow: 0.6}
	x, month := simulate(truth, 10*365, 3)
	for i := 50; i < len(x); i += 61 {
		x[i] = math.NaN()
	}
	phis := [][]float64{{0.8, -0.1}, {0.75, -0.08, 0.03}, {0.7, -0.05, 0.02, 0.01}, {0.7, -0.05, 0.02, 0.01, -0.02}}
	for _, phi := range phis {
		for _, sdSlow := range []float64{0, 0.6} {
			prm := Params{Phi: phi, Sigma: monthly(2.4), PhiSlow: 0.985, SDSlow: sdSlow}
			n, logs, quad, ok := sumsAR(x, month, prm)
			if !ok {
				t.Fatalf("AR(%d): no written-out filter", len(phi))
			}
			r := run(x, month, prm, nil, nil)
			if n != r.N || math.Abs(logs-r.logs) > 1e-9*math.Abs(r.logs) || math.Abs(quad-r.quad) > 1e-9*r.quad {
				t.Errorf("AR(%d), s_F %v: n %d, Σ log f %.12g, Σ v²/f %.12g; run: %d, %.12g, %.12g",
					len(phi), sdSlow, n, logs, quad, r.N, r.logs, r.quad)
			}
		}
	}
	if _, _, _, ok := sumsAR(x, month, truth); ok {
		t.Error("sumsAR claims AR(1), which sums1 serves")
	}
}

func BenchmarkSumsAR3(b *testing.B) {
	truth := Params{Phi: []float64{0.72}, Sigma: monthly(2.4), PhiSlow: 0.985, SDSlow: 0.6}
	x, month := simulate(truth, 70*365, 1)
	prm := Params{Phi: []float64{0.75, -0.08, 0.03}, Sigma: monthly(2.4), PhiSlow: 0.985, SDSlow: 0.6}
	for b.Loop() {
		sumsAR(x, month, prm)
	}
}

// TestDegenerateVariances: with every σ zero and no slow part the
// prediction variance is 0; each filter reports a log-likelihood of −∞, as
// the general filter run does. (The filters also refuse a negative
// variance, which only rounding in an extreme line-search step could make:
// a product of variances would otherwise hide two of them.)
func TestDegenerateVariances(t *testing.T) {
	x, month := simulate(Params{Phi: []float64{0.7}, Sigma: monthly(2.4)}, 400, 5)
	for _, phi := range [][]float64{{0.7}, {0.7, 0.1}, {0.6, 0.1, 0.05}} {
		prm := Params{Phi: phi} // σ all zero
		if ll := LogLik(x, month, prm); !math.IsInf(ll, -1) {
			t.Errorf("AR(%d): log-likelihood %v, want −Inf", len(phi), ll)
		}
	}
	four := [4]Params{{Phi: []float64{0.7}}, {Phi: []float64{0.7}, Sigma: monthly(2)}, {Phi: []float64{0.5}}, {Phi: []float64{0.7}, Sigma: monthly(1)}}
	_, logs, _ := sums1x4(x, month, &four)
	for k, want := range []bool{true, false, true, false} {
		if math.IsInf(logs[k], 1) != want {
			t.Errorf("sums1x4 set %d: Σ log f = %v", k, logs[k])
		}
	}
}
