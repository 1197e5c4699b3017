package shocks

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"
)

// TestDraw32Accuracy compares Draw32 with the exact quantile in the middle
// of every central cell (where linear interpolation errs most) and at the
// central range's edges, for every shape of tableDists. The tails go to
// Draw, whose accuracy TestTableAccuracy checks.
func TestDraw32Accuracy(t *testing.T) {
	t.Parallel()
	for _, d := range tableDists {
		tab := NewTable(d)
		worst, at := 0.0, ""
		for i := uint32(centralLo); i < centralCells-centralLo; i++ {
			for _, w := range []uint32{i<<centralFrac | 1<<(centralFrac-1), i << centralFrac, i<<centralFrac | (1<<centralFrac - 1)} {
				p := (float64(w) + 0.5) * 0x1p-32
				want := d.Quantile(p)
				if p > 0.5 {
					want = d.UpperQuantile(1 - p)
				}
				if err := math.Abs(tab.Draw32(w) - want); err > worst {
					worst, at = err, fmt.Sprintf("p=%.6f", p)
				}
			}
		}
		t.Logf("%#v: central max abs error %.2g (%s)", d, worst, at)
		if !(worst <= bodyAbsTol) {
			t.Errorf("%#v: central error %.3g at %s exceeds %g", d, worst, at, bodyAbsTol)
		}
	}
}

// TestDraw32TailProbabilities counts, exactly over all 2³² values of w, the
// share of draws at or beyond the exact p-quantile for p from 10⁻³ to 10⁻⁷
// in both tails: it must equal p to within the resolution 2⁻³² and the
// table's own interpolation error (a relative 10⁻⁴ of p here).
func TestDraw32TailProbabilities(t *testing.T) {
	t.Parallel()
	for _, d := range []exactDist{Normal{}, StudentT{5}, SkewT{10, 0.85}, SkewT{2.2, 0.5}} {
		tab := NewTable(d)
		for _, p := range []float64{1e-3, 1e-4, 1e-5, 1e-6, 1e-7} {
			q := d.Quantile(p)
			below := sort.Search(1<<32, func(w int) bool { return tab.Draw32(uint32(w)) > q })
			qu := d.UpperQuantile(p)
			above := 1<<32 - sort.Search(1<<32, func(w int) bool { return tab.Draw32(uint32(w)) >= qu })
			for _, c := range []struct {
				side string
				n    int
			}{{"lower", below}, {"upper", above}} {
				got := float64(c.n) * 0x1p-32
				if math.Abs(got-p) > 0x1p-32+1e-4*p {
					t.Errorf("%#v: P(%s tail beyond the %g quantile) = %.6g", d, c.side, p, got)
				}
			}
		}
	}
}

// TestDraw32Monotone checks that Draw32 is nondecreasing in w across the
// whole range, the joins between central and octave tables included.
func TestDraw32Monotone(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(3, 4))
	for _, d := range []exactDist{Normal{}, StudentT{2.05}, SkewT{2.05, 0.2}, SkewT{3, 5}} {
		tab := NewTable(d)
		ws := []uint32{0, math.MaxUint32}
		for _, edge := range []uint32{centralLo << centralFrac, (centralCells - centralLo) << centralFrac, 1 << 31} {
			for k := uint32(0); k < 64; k++ {
				ws = append(ws, edge-32+k)
			}
		}
		for range 100000 {
			ws = append(ws, rng.Uint32())
		}
		slices.Sort(ws)
		for i := 1; i < len(ws); i++ {
			if a, b := tab.Draw32(ws[i-1]), tab.Draw32(ws[i]); b < a {
				t.Fatalf("%#v: Draw32(%#x) = %.17g > Draw32(%#x) = %.17g", d, ws[i-1], a, ws[i], b)
			}
		}
	}
}

// TestMoments32 checks Moments32 for every shape (mean 0 and variance 1,
// as for Moments, except where the heavy tail beyond 2⁻³³ carries some of
// the variance) and, on a table with
// random nodes in a few cells and zeros elsewhere, against a brute-force
// sum over every w that reaches those cells.
func TestMoments32(t *testing.T) {
	t.Parallel()
	for _, d := range tableDists {
		mean, variance := NewTable(d).Moments32()
		// The cut at 2⁻³³ leaves out 6·10⁻⁴ of the variance at ν = 3 (and
		// more below): the table's variance must not exceed 1.
		if nu := shape(d); nu != 0 && nu <= 3 {
			if !(variance < 1+tableVarTol) || math.Abs(mean) > tableMeanTol {
				t.Errorf("%#v: Moments32 mean %g, variance %g", d, mean, variance)
			}
			continue
		}
		if math.Abs(mean) > tableMeanTol || math.Abs(variance-1) > tableVarTol {
			t.Errorf("%#v: Moments32 mean %g, variance %g; want 0 ± %g, 1 ± %g", d, mean, variance, tableMeanTol, tableVarTol)
		}
	}
	// Random nodes in the octave cells below x = 2³² (reached by w < 2¹⁰
	// and by the top 2¹⁰ values of w) and in two central cells.
	rng := rand.New(rand.NewPCG(5, 6))
	tab := new(Table)
	for h := range 2 {
		for i := range 32 << cellBits {
			tab.nodes[h][i] = 1e3 * (2*rng.Float64() - 1)
		}
	}
	for _, i := range []int{500, 1700} {
		tab.central[i], tab.central[i+1] = 1e3*rng.Float64(), -1e3*rng.Float64()
	}
	mean, variance := tab.Moments32()
	var s1, s2 float64
	sum := func(lo, hi uint64) {
		for w := lo; w < hi; w++ {
			v := tab.Draw32(uint32(w))
			s1 += v
			s2 += v * v
		}
	}
	sum(0, 1<<10)
	sum(1<<32-1<<10, 1<<32)
	for _, i := range []uint64{500, 1700} { // cells i − 1 to i + 1 reach the two nodes set
		sum((i-1)<<centralFrac, (i+2)<<centralFrac)
	}
	s1 *= 0x1p-32
	s2 *= 0x1p-32
	if relDiff(mean, s1, 0) > 1e-10 || relDiff(variance, s2-s1*s1, 0) > 1e-10 {
		t.Errorf("Moments32 = (%.17g, %.17g), brute force (%.17g, %.17g)", mean, variance, s1, s2-s1*s1)
	}
}

func shape(d Dist) float64 {
	switch d := d.(type) {
	case StudentT:
		return d.Nu
	case SkewT:
		return d.Nu
	}
	return 0
}

// draws32 draws n shocks with Draw32, two from each 64-bit draw.
func draws32(tab *Table, n int) []float64 {
	src := rand.NewPCG(1, 2)
	z := make([]float64, n)
	for i := 0; i < n; i += 2 {
		u := src.Uint64()
		z[i] = tab.Draw32(uint32(u))
		if i+1 < n {
			z[i+1] = tab.Draw32(uint32(u >> 32))
		}
	}
	return z
}

// TestDraw32Sample checks 10⁶ draws (two per 64-bit draw) for mean 0,
// variance 1 and the Student-t kurtosis 3 + 6/(ν − 4) (Johnson, Kotz &
// Balakrishnan, vol. 2, ch. 28), and the skewed t against its exact CDF
// with the Kolmogorov–Smirnov statistic.
func TestDraw32Sample(t *testing.T) {
	if testing.Short() {
		t.Skip("draws millions of shocks")
	}
	t.Parallel()
	const n = 1_000_000
	for _, d := range []Dist{Normal{}, StudentT{12}} {
		m, v, k, seM, seV, seK := sampleMoments(draws32(NewTable(d), n))
		wantK := 3.0
		if s, ok := d.(StudentT); ok {
			wantK = 3 + 6/(s.Nu-4)
		}
		if math.Abs(m) > zTol*seM || math.Abs(v-1) > zTol*seV || math.Abs(k-wantK) > zTol*seK {
			t.Errorf("%#v: mean %.4g ± %.2g, variance %.4g ± %.2g, kurtosis %.4g ± %.2g (want %.4g)", d, m, seM, v, seV, k, seK, wantK)
		}
	}
	d := SkewT{Nu: 6, Xi: 0.8}
	z := draws32(NewTable(d), n)
	slices.Sort(z)
	if ks := ksStatistic(z, d.CDF); ks > ksCritical001 {
		t.Errorf("%#v: √n·D = %.3f > %.3f", d, ks, ksCritical001)
	}
	if ks := ksStatistic(z, SkewT{Nu: 5, Xi: 0.8}.CDF); ks <= ksCritical001 {
		t.Errorf("Draw32 of %#v passes as ν = 5: the check has no power", d)
	}
}

func TestDraw32Allocs(t *testing.T) {
	tab := NewTable(Normal{})
	src := rand.NewPCG(1, 2)
	if n := testing.AllocsPerRun(1000, func() { tab.Draw32(uint32(src.Uint64())) }); n != 0 {
		t.Errorf("Draw32 allocates %v times per call", n)
	}
}

func BenchmarkTableDraw32(b *testing.B) {
	tab := NewTable(SkewT{Nu: 6, Xi: 0.8})
	src := rand.NewPCG(1, 2)
	var s float64
	for b.Loop() {
		u := src.Uint64()
		s += tab.Draw32(uint32(u)) + tab.Draw32(uint32(u>>32))
	}
	sink = s
}

// TestTableFor checks the cache: equal distributions share a table, and
// the table is the one NewTable builds.
func TestTableFor(t *testing.T) {
	a, b := TableFor(SkewT{10, 0.85}), TableFor(SkewT{10, 0.85})
	if a != b {
		t.Error("equal distributions got different tables")
	}
	if TableFor(SkewT{10, 0.86}) == a {
		t.Error("different distributions share a table")
	}
	if *a != *NewTable(SkewT{10, 0.85}) {
		t.Error("the cached table differs from NewTable's")
	}
}

// TestCentral27 checks Central27(w) against Central of w with its low 5
// bits set to 10000, for words all over the central range.
func TestCentral27(t *testing.T) {
	tab := NewTable(SkewT{10, 0.85})
	rng := rand.New(rand.NewPCG(6, 6))
	for range 200000 {
		w := rng.Uint32()
		a, okA := tab.Central27(w)
		b, okB := tab.Central(w&^31 | 16)
		if okA != okB || okA && a != b {
			t.Fatalf("w %#x: Central27 %v %v, Central of the mid word %v %v", w, a, okA, b, okB)
		}
	}
}
