package statespace

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
)

// TestBatchedGradientIsGonums checks that the objective's gradient, with
// the filters run four at a time (sums1x4), is gonum's fd.Gradient to the
// bit: the same points, values and sums (central and forward stencils,
// with and without the slow part, a record with gaps).
func TestBatchedGradientIsGonums(t *testing.T) {
	truth := Params{Phi: []float64{0.72}, Sigma: monthly(2.4), PhiSlow: 0.985, SDSlow: 0.6}
	x, month := simulate(truth, 20*365, 7)
	for i := 100; i < len(x); i += 97 {
		x[i] = math.NaN() // a gap
	}
	r := rand.New(rand.NewPCG(1, 2))
	for _, slow := range []bool{false, true} {
		o := nllOf(x, month, 1, slow)
		if o.many == nil {
			t.Fatal("AR(1) objective without its batched form")
		}
		for trial := range 3 {
			th := encode(truth, slow)
			for i := range th {
				th[i] += 0.05 * r.NormFloat64()
			}
			for _, formula := range []fd.Formula{fd.Central, fd.Forward} {
				step := 1e-5
				if formula.Stencil[0].Loc == 0 {
					step = 1e-7
				}
				got := make([]float64, len(th))
				o.gradient(got, th, formula, step)
				want := fd.Gradient(nil, o.f, th, &fd.Settings{Formula: formula, Step: step, Concurrent: true})
				for i := range got {
					if got[i] != want[i] {
						t.Errorf("slow %v, trial %d, stencil %d points: component %d is %v, gonum's %v",
							slow, trial, len(formula.Stencil), i, got[i], want[i])
					}
				}
			}
		}
	}
}
