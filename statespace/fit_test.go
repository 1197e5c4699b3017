package statespace

import (
	"math"
	"math/rand/v2"
	"testing"
)

// simulate draws n days of the model from its stationary law, with month
// m(t) = (t/30) mod 12.
func simulate(prm Params, n int, seed uint64) ([]float64, []uint8) {
	r := rand.New(rand.NewPCG(seed, 7))
	p := len(prm.Phi)
	lags := make([]float64, p)
	f := prm.SDSlow * r.NormFloat64()
	q := prm.SDSlow * math.Sqrt(1-prm.PhiSlow*prm.PhiSlow)
	x := make([]float64, n)
	month := make([]uint8, n)
	for t := -2000; t < n; t++ {
		m := uint8(((t + 24000) / 30) % 12)
		y := 0.0
		for i, c := range prm.Phi {
			y += c * lags[i]
		}
		y += prm.Sigma[m] * r.NormFloat64()
		copy(lags[1:], lags[:p-1])
		lags[0] = y
		f = prm.PhiSlow*f + q*r.NormFloat64()
		if t >= 0 {
			x[t], month[t] = y+f, m
		}
	}
	return x, month
}

func monthly(base float64) (s [12]float64) {
	for m := range s {
		s[m] = base + 0.6*math.Cos(2*math.Pi*float64(m)/12)
	}
	return s
}

func TestPACFRoundTrip(t *testing.T) {
	t.Parallel()
	for _, phi := range [][]float64{{0.7}, {0.9, -0.2}, {0.6, 0.1, -0.05, 0.02, 0.01}} {
		got := fromPACF(pacf(phi))
		for i := range phi {
			if math.Abs(got[i]-phi[i]) > 1e-12 {
				t.Errorf("round trip of %v: %v", phi, got)
			}
		}
	}
}

func TestFitRecoversSlowPart(t *testing.T) {
	t.Parallel()
	truth := Params{Phi: []float64{0.72}, Sigma: monthly(2.4), PhiSlow: 0.985, SDSlow: 0.6}
	x, month := simulate(truth, 40*365, 11)
	for i := 1000; i < 1040; i++ {
		x[i] = math.NaN()
	}
	start := Params{Phi: []float64{0.8}, Sigma: monthly(2.0)}
	fit, err := Fit(x, month, start, true)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("fit %+v ll %.3f se %v", fit.Params, fit.LogLik, fit.SE)
	ar, err := Fit(x, month, start, false)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("ar-only %+v ll %.3f", ar.Params, ar.LogLik)
}

func BenchmarkLogLik(b *testing.B) {
	truth := Params{Phi: []float64{0.72}, Sigma: monthly(2.4), PhiSlow: 0.985, SDSlow: 0.6}
	x, month := simulate(truth, 70*365, 1)
	for b.Loop() {
		LogLik(x, month, truth)
	}
}
