package shocks

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

type exactDist interface {
	Dist
	UpperQuantiler
}

// tableDists span the shapes a fit can return: ν from the lower bound 2.05 to
// the upper bound 300, ξ from 0.2 to 5.
var tableDists = []exactDist{
	Normal{},
	StudentT{2.05}, StudentT{2.2}, StudentT{3}, StudentT{5}, StudentT{30}, StudentT{300},
	SkewT{2.05, 0.2}, SkewT{3, 5}, SkewT{4, 2}, SkewT{6, 0.8}, SkewT{10, 0.5}, SkewT{300, 0.7},
}

// uOf returns the bits that make Draw use x = p·2⁵⁴ (x odd in [1, 2⁵³)) in
// the lower half, or x = (1 − p)·2⁵⁴ in the upper half.
func uOf(x uint64, upper bool) uint64 {
	if x%2 == 0 || x >= 1<<53 {
		panic("test: x must be odd and below 2⁵³")
	}
	m := x
	if upper {
		m = 1<<54 - x
	}
	return (m - 1) << 10
}

// Accuracy claimed in the Table doc comment.
const (
	bodyAbsTol = 3e-4 // |Draw − Q(p)| for p in [2⁻¹³, 1 − 2⁻¹³]; measured 2.9e-4
	tailRelTol = 3e-5 // |Draw − Q(p)| / |Q(p)| beyond; measured 2.2e-5
)

// TestTableAccuracy compares Draw with the exact quantile on a dense grid of
// p: every cell's middle, where linear interpolation errs most, and random
// points, in both halves from p = 2⁻⁵⁴ (5.6·10⁻¹⁷) to ½.
func TestTableAccuracy(t *testing.T) {
	if testing.Short() {
		t.Skip("compares the table with exact quantiles on a dense grid for many shapes")
	}
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	for _, d := range tableDists {
		tab := NewTable(d)
		var bodyMax, tailMax float64
		var bodyAt, tailAt string
		for e := range octaves {
			lo := uint64(1) << e
			xs := []uint64{lo | 1}
			for j := range 1 << cellBits {
				mid := uint64(math.Round(nodeX(e<<cellBits+j) + math.Ldexp(0.5, e-cellBits)))
				xs = append(xs, mid|1, lo+rng.Uint64N(lo)|1)
			}
			for _, x := range xs {
				if x >= 1<<53 {
					continue
				}
				q := float64(x) * 0x1p-54
				for _, upper := range []bool{false, true} {
					got := tab.Draw(uOf(x, upper))
					want := d.Quantile(q)
					if upper {
						want = d.UpperQuantile(q)
					}
					where := fmt.Sprintf("p=%g upper=%v", q, upper)
					if q >= 0x1p-13 {
						if err := math.Abs(got - want); err > bodyMax {
							bodyMax, bodyAt = err, where
						}
					} else if err := relDiff(got, want, 0); err > tailMax {
						tailMax, tailAt = err, where
					}
				}
			}
		}
		t.Logf("%#v: body max abs error %.2g (%s), tail max rel error %.2g (%s)", d, bodyMax, bodyAt, tailMax, tailAt)
		if !(bodyMax <= bodyAbsTol) {
			t.Errorf("%#v: body error %.3g at %s exceeds %g", d, bodyMax, bodyAt, bodyAbsTol)
		}
		if !(tailMax <= tailRelTol) {
			t.Errorf("%#v: tail relative error %.3g at %s exceeds %g", d, tailMax, tailAt, tailRelTol)
		}
	}
}

// TestTableNodes checks the extreme draws and the middle exactly: they fall on
// nodes, so Draw returns the quantile there.
func TestTableNodes(t *testing.T) {
	t.Parallel()
	d := SkewT{Nu: 6, Xi: 0.8}
	tab := NewTable(d)
	cases := []struct {
		u    uint64
		want float64
	}{
		{0, d.Quantile(0x1p-54)},
		{math.MaxUint64, d.UpperQuantile(0x1p-54)},
		{uOf(1<<40|1, false), d.Quantile(0x1p-14 + 0x1p-54)}, // x = 2⁴⁰ + 1 is past a node by 2⁻⁵⁴
	}
	for _, c := range cases[:2] {
		if got := tab.Draw(c.u); got != c.want {
			t.Errorf("Draw(%#x) = %.17g, want %.17g", c.u, got, c.want)
		}
	}
	// Near p = ½ the two halves meet at the median.
	lo, hi := tab.Draw(1<<63-1), tab.Draw(1<<63)
	med := d.Quantile(0.5)
	if !(lo <= med && med <= hi) || hi-lo > 1e-12 {
		t.Errorf("draws either side of p = ½ are %.17g and %.17g, median %.17g", lo, hi, med)
	}
	if got := tab.Draw(cases[2].u); relDiff(got, cases[2].want, 0) > 1e-12 {
		t.Errorf("Draw just past the node at 2⁻¹⁴ = %.17g, want %.17g", got, cases[2].want)
	}
}

// TestTableMonotone checks that Draw is nondecreasing in u.
func TestTableMonotone(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	for _, d := range []exactDist{Normal{}, StudentT{2.05}, SkewT{2.05, 0.2}, SkewT{3, 5}} {
		tab := NewTable(d)
		us := make([]uint64, 100000)
		for i := range us {
			// Uniform exponents, so that the tails are covered as
			// densely as the middle.
			us[i] = rng.Uint64() >> rng.IntN(64)
			if i%2 == 1 {
				us[i] = ^us[i]
			}
		}
		us = append(us, 0, 1<<63-1, 1<<63, math.MaxUint64)
		slices.Sort(us)
		for i := 1; i < len(us); i++ {
			if a, b := tab.Draw(us[i-1]), tab.Draw(us[i]); a > b {
				t.Fatalf("%#v: Draw(%#x) = %v > Draw(%#x) = %v", d, us[i-1], a, us[i], b)
			}
		}
	}
}

// Tolerances on the table's own moments (the accuracy asked of the sampler).
const (
	tableMeanTol = 1e-5 // asked: 1e-4
	tableVarTol  = 1e-5 // asked: 1e-3
)

func TestTableMoments(t *testing.T) {
	t.Parallel()
	for _, d := range tableDists {
		mean, variance := NewTable(d).Moments()
		t.Logf("%#v: table mean %.3g, variance − 1 = %.3g", d, mean, variance-1)
		var nu float64
		switch d := d.(type) {
		case StudentT:
			nu = d.Nu
		case SkewT:
			nu = d.Nu
		}
		if nu != 0 && nu < 3 {
			// Much of the variance lies beyond p = 2⁻⁵⁴: the table can
			// fall short of 1 but must not exceed it.
			if !(variance < 1+tableVarTol) || math.Abs(mean) > tableMeanTol {
				t.Errorf("%#v: table mean %g, variance %g", d, mean, variance)
			}
			continue
		}
		if math.Abs(mean) > tableMeanTol || math.Abs(variance-1) > tableVarTol {
			t.Errorf("%#v: table mean %g, variance %g; want 0 ± %g, 1 ± %g", d, mean, variance, tableMeanTol, tableVarTol)
		}
	}
}

// TestMomentsSum checks Moments' closed-form cell sums against a brute-force
// sum over every x: the nodes below x = 2¹⁶ get arbitrary values, rough
// enough that each term of the formula matters, and the nodes above are
// zero, so that the 2¹⁵ points of each half below 2¹⁶ carry everything.
func TestMomentsSum(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	tab := new(Table)
	cut := 16 << cellBits
	for h := range 2 {
		for i := range cut {
			tab.nodes[h][i] = 1e6 * (2*rng.Float64() - 1)
		}
	}
	mean, variance := tab.Moments()
	var s1, s2 float64
	for h := range 2 {
		for x := uint64(1); x < 1<<16; x += 2 {
			v := tab.Draw(uOf(x, h == 1))
			s1 += v
			s2 += v * v
		}
	}
	s1 *= 0x1p-53
	s2 *= 0x1p-53
	const tol = 1e-12 // relative
	if relDiff(mean, s1, 0) > tol || relDiff(variance, s2-s1*s1, 0) > tol {
		t.Errorf("Moments = (%.17g, %.17g), brute force (%.17g, %.17g)", mean, variance, s1, s2-s1*s1)
	}
}

// sampleMoments returns the mean, variance, kurtosis of z and delta-method
// standard errors of each.
func sampleMoments(z []float64) (m, v, k, seM, seV, seK float64) {
	n := float64(len(z))
	for _, x := range z {
		m += x
	}
	m /= n
	var c2, c3, c4, c6, c8 float64
	for _, x := range z {
		d := x - m
		d2 := d * d
		c2 += d2
		c3 += d2 * d
		c4 += d2 * d2
		c6 += d2 * d2 * d2
		c8 += d2 * d2 * d2 * d2
	}
	c2, c3, c4, c6, c8 = c2/n, c3/n, c4/n, c6/n, c8/n
	v = c2
	k = c4 / (c2 * c2)
	seM = math.Sqrt(c2 / n)
	seV = math.Sqrt((c4 - c2*c2) / n)
	// Kurtosis k = μ₄/μ₂²: gradient (1/μ₂², −2μ₄/μ₂³) applied to the
	// covariance of (x⁴, x²) — from memory, the usual delta method; the
	// centring's own contribution is O(1/n) smaller and left out.
	g1, g2 := 1/(c2*c2), -2*c4/(c2*c2*c2)
	varK := g1*g1*(c8-c4*c4) + 2*g1*g2*(c6-c4*c2) + g2*g2*(c4-c2*c2)
	seK = math.Sqrt(varK / n)
	_ = c3
	return
}

// zTol is the number of standard errors a Monte Carlo estimate may stray.
const zTol = 4.5

func draws(tab *Table, n int) []float64 {
	src := rand.NewPCG(1, 2)
	z := make([]float64, n)
	for i := range z {
		z[i] = tab.Draw(src.Uint64())
	}
	return z
}

// TestTableSampleMoments checks sampled mean 0, variance 1 and, for the t, the
// kurtosis 3 + 6/(ν − 4) (the fourth moment of Student's t; e.g. Johnson,
// Kotz & Balakrishnan, Continuous Univariate Distributions vol. 2, ch. 28).
func TestTableSampleMoments(t *testing.T) {
	t.Parallel()
	const n = 1_000_000
	for _, d := range []Dist{Normal{}, StudentT{12}, SkewT{6, 0.8}} {
		m, v, k, seM, seV, seK := sampleMoments(draws(NewTable(d), n))
		if math.Abs(m) > zTol*seM || math.Abs(v-1) > zTol*seV {
			t.Errorf("%#v: sample mean %.4g ± %.2g, variance %.4g ± %.2g; want 0, 1", d, m, seM, v, seV)
		}
		var wantK float64
		switch d := d.(type) {
		case Normal:
			wantK = 3
		case StudentT:
			wantK = 3 + 6/(d.Nu-4)
		default:
			continue
		}
		if math.Abs(k-wantK) > zTol*seK {
			t.Errorf("%#v: sample kurtosis %.4g ± %.2g, want %.4g", d, k, seK, wantK)
		}
	}
}

// ksCritical001 is the 0.1 % critical value of √n·D for the one-sample
// Kolmogorov–Smirnov statistic, 1.949 (asymptotic Kolmogorov distribution;
// from memory, as tabulated in e.g. Conover, Practical Nonparametric
// Statistics).
const ksCritical001 = 1.949

// ksStatistic returns √n·sup|Fₙ − F| of the sorted sample z.
func ksStatistic(z []float64, cdf func(float64) float64) float64 {
	n := float64(len(z))
	var d float64
	for i, x := range z {
		f := cdf(x)
		d = max(d, f-float64(i)/n, float64(i+1)/n-f)
	}
	return d * math.Sqrt(n)
}

// TestTableKS checks 10⁶ draws against the exact CDF with the Kolmogorov–
// Smirnov statistic, and that the same check rejects a neighbouring ν.
func TestTableKS(t *testing.T) {
	if testing.Short() {
		t.Skip("draws millions of shocks")
	}
	t.Parallel()
	d := SkewT{Nu: 6, Xi: 0.8}
	z := draws(NewTable(d), 1_000_000)
	slices.Sort(z)
	if ks := ksStatistic(z, d.CDF); ks > ksCritical001 {
		t.Errorf("%#v: √n·D = %.3f > %.3f", d, ks, ksCritical001)
	}
	wrong := SkewT{Nu: 5, Xi: 0.8}
	if ks := ksStatistic(z, wrong.CDF); ks <= ksCritical001 {
		t.Errorf("draws of %#v pass as %#v: √n·D = %.3f; the check has no power", d, wrong, ks)
	}
}

// noUpper hides a distribution's UpperQuantile.
type noUpper struct{ Dist }

func TestTableWithoutUpperQuantile(t *testing.T) {
	t.Parallel()
	d := SkewT{Nu: 5, Xi: 1.4}
	full, plain := NewTable(d), NewTable(noUpper{d})
	if full.nodes[0] != plain.nodes[0] {
		t.Error("lower half differs")
	}
	// From octave cellBits+1 on, the nodes xᵢ are even integers, so
	// 1 − xᵢ·2⁻⁵⁴ is exact and Quantile(1 − q) matches.
	for i := (cellBits + 1) << cellBits; i < tableNodes; i++ {
		if a, b := full.nodes[1][i], plain.nodes[1][i]; relDiff(b, a, 1) > 1e-9 {
			t.Errorf("upper node %d: %.17g without UpperQuantile, %.17g with", i, b, a)
		}
	}
	if v := plain.Draw(math.MaxUint64); math.IsInf(v, 0) || v != d.Quantile(1-0x1p-53) {
		t.Errorf("most extreme draw without UpperQuantile = %v, want Quantile(1 − 2⁻⁵³)", v)
	}
}

// TestDrawAllocs is not parallel: AllocsPerRun refuses to run in parallel.
func TestDrawAllocs(t *testing.T) {
	tab := NewTable(Normal{})
	src := rand.NewPCG(1, 2)
	if n := testing.AllocsPerRun(1000, func() { tab.Draw(src.Uint64()) }); n != 0 {
		t.Errorf("Draw allocates %v times per call", n)
	}
}

var sink float64

func BenchmarkTableDraw(b *testing.B) {
	tab := NewTable(SkewT{Nu: 6, Xi: 0.8})
	src := rand.NewPCG(1, 2)
	var s float64
	for b.Loop() {
		s += tab.Draw(src.Uint64())
	}
	sink = s
}

// BenchmarkPCG is the cost of the random bits alone, to subtract from
// BenchmarkTableDraw.
func BenchmarkPCG(b *testing.B) {
	src := rand.NewPCG(1, 2)
	var s uint64
	for b.Loop() {
		s += src.Uint64()
	}
	sink = float64(s)
}
