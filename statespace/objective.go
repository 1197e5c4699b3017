package statespace

import (
	"math"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/diff/fd"
)

// objective is a negative log-likelihood over the optimiser's vector and,
// when many is set, the same for many vectors at once (the points of a
// finite-difference gradient).
type objective struct {
	f    func(th []float64) float64
	many func(ths [][]float64, out []float64)
}

// nllOf is the objective of Fit and FitLean: −log L of a fast AR of order
// p, with the slow part when slow is set, over decode's vector. For p = 1
// its many form runs the filters four at a time (sums1x4).
func nllOf(x []float64, month []uint8, p int, slow bool) objective {
	o := objective{f: func(th []float64) float64 {
		prm, ok := decode(th, p, slow)
		if !ok {
			return math.Inf(1)
		}
		return -LogLik(x, month, prm)
	}}
	if p != 1 {
		return o
	}
	o.many = func(ths [][]float64, out []float64) {
		prms := make([]Params, 0, len(ths))
		at := make([]int, 0, len(ths))
		for k, th := range ths {
			prm, ok := decode(th, p, slow)
			if !ok {
				out[k] = math.Inf(1)
				continue
			}
			prms, at = append(prms, prm), append(at, k)
		}
		var four [4]Params
		for lo := 0; lo < len(prms); lo += 4 {
			for j := range four {
				four[j] = prms[min(lo+j, len(prms)-1)]
			}
			n, logs, quad := sums1x4(x, month, &four)
			for j := lo; j < min(lo+4, len(prms)); j++ {
				out[at[j]] = -loglik(n, logs[j-lo], quad[j-lo])
			}
		}
	}
	return o
}

// gradient sets g to the finite-difference gradient of o at th: gonum's
// fd.Gradient with {formula, step, Concurrent}, whose points and sums it
// repeats exactly (each component is the stencil's weighted sum of its
// points' values, over the step as gonum takes it), so the result is the
// same to the bit on any number of processors.
// With o.many the points are shared out among the processors in groups
// of four.
func (o objective) gradient(g, th []float64, formula fd.Formula, step float64) {
	if o.many == nil {
		fd.Gradient(g, o.f, th, &fd.Settings{Formula: formula, Step: step, Concurrent: true})
		return
	}
	var pts [][]float64
	idx := make([][]int, len(th)) // idx[i][k]: the point of stencil entry k for component i
	origin := -1
	for i := range th {
		for _, st := range formula.Stencil {
			if st.Loc == 0 {
				if origin < 0 {
					origin = len(pts)
					pts = append(pts, slices.Clone(th))
				}
				idx[i] = append(idx[i], origin)
				continue
			}
			pt := slices.Clone(th)
			pt[i] += st.Loc * step
			idx[i] = append(idx[i], len(pts))
			pts = append(pts, pt)
		}
	}
	vals := make([]float64, len(pts))
	workers := max(runtime.GOMAXPROCS(0), 1)
	chunk := ((len(pts)+workers-1)/workers + 3) &^ 3
	var wg sync.WaitGroup
	for lo := 0; lo < len(pts); lo += chunk {
		hi := min(lo+chunk, len(pts))
		wg.Go(func() { o.many(pts[lo:hi], vals[lo:hi]) })
	}
	wg.Wait()
	// gonum runs one worker on one processor, and then divides by the
	// step; with more it multiplies by its reciprocal.
	alpha := 1 / step
	for i := range g {
		d := 0.0
		for k, st := range formula.Stencil {
			d += st.Coeff * vals[idx[i][k]]
		}
		if workers == 1 {
			g[i] = d / step
		} else {
			g[i] = d * alpha
		}
	}
}
