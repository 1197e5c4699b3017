package hedge

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

const (
	exact  = 1e-12 // relative, for sums of a few terms
	solved = 1e-8  // relative, two routes through floating point (covariance ratio vs QR)
	mcSE   = 4.0   // Monte Carlo tolerance in standard errors
)

var grid = func() []float64 { // index values around the strikes below, with the strikes themselves
	var g []float64
	for x := 1800.0; x <= 3000; x += 12.5 {
		g = append(g, x)
	}
	return g
}()

func contract(kind Kind, k, limit float64) Contract {
	return Contract{Name: string(kind), Index: "hdd", Period: "heating", Kind: kind, Strike: k, Tick: 4000, Limit: limit, Quantity: 1}
}

// A swap is a call bought and a put sold at the same strike (put–call
// parity of the payouts, max(x, 0) − max(−x, 0) = x; Hull, Options, Futures
// and Other Derivatives, from memory).
func TestSwapIsCallMinusPut(t *testing.T) {
	t.Parallel()
	inf := math.Inf(1)
	for _, k := range []float64{2100, 2450.5} {
		sw, c, p := contract(Swap, k, inf), contract(Call, k, inf), contract(Put, k, inf)
		for _, i := range grid {
			if got, want := sw.Payoff(i), c.Payoff(i)-p.Payoff(i); !scalar.EqualWithinAbsOrRel(got, want, 0, exact) {
				t.Errorf("K=%v I=%v: swap %v, call − put %v", k, i, got, want)
			}
			if got, want := sw.Payoff(i), 4000*(i-k); !scalar.EqualWithinAbsOrRel(got, want, 0, exact) {
				t.Errorf("K=%v I=%v: swap %v, tick·(I − K) %v", k, i, got, want)
			}
		}
	}
}

// A capped payout never exceeds the limit on either side, and equals the
// uncapped payout where that is within the limit (definition of a limit;
// common practice).
func TestLimitCaps(t *testing.T) {
	t.Parallel()
	const limit = 1e6
	for _, kind := range []Kind{Swap, Call, Put, Collar} {
		capped, free := contract(kind, 2400, limit), contract(kind, 2400, math.Inf(1))
		capped.StrikeLow, capped.StrikeHigh = 2300, 2500
		free.StrikeLow, free.StrikeHigh = 2300, 2500
		hit := false
		for _, i := range grid {
			x, u := capped.Payoff(i), free.Payoff(i)
			if math.Abs(x) > limit {
				t.Errorf("%s at I=%v pays %v beyond the limit %v", kind, i, x, limit)
			}
			if math.Abs(u) <= limit && x != u {
				t.Errorf("%s at I=%v pays %v, uncapped %v within the limit", kind, i, x, u)
			}
			if math.Abs(u) > limit {
				hit = true
			}
		}
		if !hit {
			t.Errorf("%s: the grid never reaches the limit; the test checks nothing", kind)
		}
	}
}

// A collar is a call at the high strike bought and a put at the low strike
// sold, each leg capped by the same limit (the definition in the package
// doc; range forwards in Hull, Options, Futures and Other Derivatives, from memory).
func TestCollarIsItsLegs(t *testing.T) {
	t.Parallel()
	for _, limit := range []float64{math.Inf(1), 5e5} {
		col := contract(Collar, 0, limit)
		col.StrikeLow, col.StrikeHigh = 2300, 2550
		call, put := contract(Call, 2550, limit), contract(Put, 2300, limit)
		for _, i := range grid {
			if got, want := col.Payoff(i), call.Payoff(i)-put.Payoff(i); !scalar.EqualWithinAbsOrRel(got, want, 0, exact) {
				t.Errorf("limit %v, I=%v: collar %v, call − put %v", limit, i, got, want)
			}
		}
	}
}

func normalPaths(n int, mu, sigma float64, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 2))
	x := make([]float64, n)
	for i := range x {
		x[i] = mu + sigma*rng.NormFloat64()
	}
	return x
}

// The expected call and put payouts of a normal index against Bachelier's
// closed form (Bachelier 1900, Théorie de la spéculation; Hull, Options,
// Futures and Other Derivatives, from memory):
//
//	E[max(I − K, 0)] = σφ(d) + (μ − K)Φ(d),  E[max(K − I, 0)] = σφ(d) − (μ − K)Φ(−d),  d = (μ − K)/σ.
func TestBachelier(t *testing.T) {
	t.Parallel()
	const (
		n         = 200000
		mu, sigma = 2400.0, 150.0
	)
	key := Key{"hdd", "heating"}
	inf := math.Inf(1)
	for _, k := range []float64{2200, 2450, 2700} {
		c, p := contract(Call, k, inf), contract(Put, k, inf)
		c.Tick, p.Tick, p.Name = 1, 1, "put"
		f := &File{Contracts: []Contract{c, p}}
		r, err := Evaluate(f, map[Key][]float64{key: normalPaths(n, mu, sigma, 7)}, nil)
		if err != nil {
			t.Fatal(err)
		}
		d := (mu - k) / sigma
		std := distuv.UnitNormal
		wantCall := sigma*std.Prob(d) + (mu-k)*std.CDF(d)
		wantPut := sigma*std.Prob(d) - (mu-k)*std.CDF(-d)
		for i, want := range []float64{wantCall, wantPut} {
			got := r.Contracts[i]
			if math.Abs(got.Mean-want) > mcSE*got.MeanSE {
				t.Errorf("K=%v %s: mean payout %v, Bachelier %v (s.e. %v)", k, got.Contract.Kind, got.Mean, want, got.MeanSE)
			}
		}
		// The probability of a call payout is P(I > K) = Φ(d), binomial s.e.
		pr := std.CDF(d)
		if se := math.Sqrt(pr * (1 - pr) / n); math.Abs(r.Contracts[0].ProbPayout-pr) > mcSE*se {
			t.Errorf("K=%v: P(payout) %v, Φ(d) %v", k, r.Contracts[0].ProbPayout, pr)
		}
	}
}

// The minimum-variance quantity against the slope of an ordinary least
// squares regression of the cost on the payout, solved by QR in gonum/mat
// (the hedge ratio as a regression slope: Ederington 1979, from memory),
// and the variance at q* against the variances at q* ± δ.
func TestMinimumVarianceQuantity(t *testing.T) {
	t.Parallel()
	const n = 20000
	hdd := normalPaths(n, 2400, 150, 11)
	noise := normalPaths(n, 0, 2e5, 12)
	energy := make([]float64, n)
	for i := range energy {
		energy[i] = 4800*hdd[i] + noise[i] // demand rises with HDD, with scatter
	}
	f, err := Load("example.toml")
	if err != nil {
		t.Fatal(err)
	}
	dec := normalPaths(n, 520, 60, 13)
	values := map[Key][]float64{{"energy", "heating"}: energy, {"hdd", "heating"}: hdd, {"hdd", "jan"}: dec}
	r, err := Evaluate(f, values, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, cr := range r.Contracts {
		c := cr.Contract
		// OLS of C on [1, P].
		x := mat.NewDense(n, 2, nil)
		for i, p := range cr.Payoffs {
			x.Set(i, 0, 1)
			x.Set(i, 1, p)
		}
		var beta mat.VecDense
		if err := beta.SolveVec(x, mat.NewVecDense(n, append([]float64(nil), r.Cost...))); err != nil {
			t.Fatal(err)
		}
		qs := cr.MinVar.Quantity
		if !scalar.EqualWithinAbsOrRel(qs, beta.AtVec(1), 0, solved) {
			t.Errorf("%s: q* %v, OLS slope %v", c.Name, qs, beta.AtVec(1))
		}
		if qs <= 0 {
			t.Errorf("%s: q* = %v; a contract paying in cold winters should be bought", c.Name, qs)
		}
		variance := func(q float64) float64 {
			net := make([]float64, n)
			for i := range net {
				net[i] = r.Cost[i] - q*(cr.Payoffs[i]-c.Premium)
			}
			return stat.Variance(net, nil)
		}
		v := variance(qs)
		if sd := cr.MinVar.Net.SD; !scalar.EqualWithinAbsOrRel(sd*sd, v, 0, solved) {
			t.Errorf("%s: variance at q* %v, reported %v", c.Name, v, sd*sd)
		}
		for _, d := range []float64{0.01, 0.1} {
			if lo, hi := variance(qs*(1-d)), variance(qs*(1+d)); v > lo || v > hi {
				t.Errorf("%s: variance %v at q* exceeds %v or %v at q*·(1 ∓ %v)", c.Name, v, lo, hi, d)
			}
		}
		wantMean := stat.Mean(r.Cost, nil) - qs*(cr.Mean-c.Premium)
		if !scalar.EqualWithinAbsOrRel(cr.MinVar.Net.Mean, wantMean, 0, solved) {
			t.Errorf("%s: net mean at q* %v, want %v", c.Name, cr.MinVar.Net.Mean, wantMean)
		}
		vr := 1 - v/stat.Variance(r.Cost, nil)
		if !scalar.EqualWithinAbsOrRel(cr.MinVar.VarianceReduction, vr, 0, solved) {
			t.Errorf("%s: variance reduction %v, want %v", c.Name, cr.MinVar.VarianceReduction, vr)
		}
	}
}

// A small sample checked by hand. Costs 1..30 (plan 0, one unit above plan
// costs 1); a call at 25, tick 1, premium 2, bought once.
//
// Quantiles are type 4 of Hyndman and Fan (1996, The American Statistician
// 50(4)): Q(p) = x₍ₖ₎ + (np − k)(x₍ₖ₊₁₎ − x₍ₖ₎), k = ⌊np⌋. With n = 30 and
// p = 0.95, np = 28.5. ES95 is the mean of the worst ⌈0.05·30⌉ = 2 paths,
// ES99 of the worst ⌈0.3⌉ = 1 (as in sim/tail.go). Cross-check of the
// quantiles and σ in R 4.2: x <- c(rep(0, 25), 1:5);
// quantile(1:30, .95, type = 4); quantile(x, c(.95, .99), type = 4); sd(x).
func TestRiskConventions(t *testing.T) {
	t.Parallel()
	const n = 30
	v := make([]float64, n)
	for i, p := range rand.New(rand.NewPCG(3, 4)).Perm(n) { // order must not matter
		v[i] = float64(p + 1)
	}
	f := &File{
		Exposure: &Exposure{Index: "energy", Period: "heating", Plan: 0, PriceAbove: 1, PriceBelow: 0},
		Contracts: []Contract{{Name: "call", Index: "energy", Period: "heating", Kind: Call, Strike: 25,
			Tick: 1, Limit: math.Inf(1), Quantity: 1, Premium: 2}},
	}
	key := Key{"energy", "heating"}
	hist := map[Key][]float64{key: {20, 27, 30}}
	r, err := Evaluate(f, map[Key][]float64{key: v}, &Options{Loading: 0.2, Level: 0.95, History: hist})
	if err != nil {
		t.Fatal(err)
	}
	c := r.Contracts[0]
	// Payouts: 0 (25 paths), 1, 2, 3, 4, 5. Σx = 15, Σx² = 55, s² = (55 − 30·0.5²)/29.
	sd := math.Sqrt((55 - 30*0.25) / 29)
	// Net cost: V + 2 for V ≤ 25 (3..27), 27 for V = 26..30; sorted, x₍₂₅₎..x₍₃₀₎ = 27.
	checks := []struct {
		name      string
		got, want float64
	}{
		{"unhedged mean", r.Unhedged.Mean, 15.5},
		{"unhedged VaR95", r.Unhedged.VaR95, 28.5}, // x₍₂₈₎ + 0.5·(x₍₂₉₎ − x₍₂₈₎)
		{"unhedged ES95", r.Unhedged.ES95, 29.5},   // (29 + 30)/2
		{"unhedged ES99", r.Unhedged.ES99, 30},
		{"hedged mean", r.Hedged.Mean, 17}, // (Σ 3..27 + 5·27)/30 = (375 + 135)/30
		{"hedged VaR95", r.Hedged.VaR95, 27},
		{"hedged ES95", r.Hedged.ES95, 27},
		{"payout mean", c.Mean, 0.5},
		{"payout sd", c.SD, sd},
		{"payout P50", c.P50, 0},
		{"payout P95", c.P95, 3.5}, // x₍₂₈₎ = 3, x₍₂₉₎ = 4
		{"payout P99", c.P99, 4.7}, // np = 29.7: 4 + 0.7·(5 − 4)
		{"quantile price", c.QuantilePrice, 3.5},
		{"loaded price", c.LoadedPrice, 0.5 + 0.2*sd},
		{"P(payout)", c.ProbPayout, 5.0 / 30},
		{"burn", c.Burn, 7.0 / 3}, // payouts 0, 2, 5
		// sd of 0, 2, 5 (n − 1 divisor): √(19/3); over √3: √19/3.
		{"burn s.e.", c.BurnSE, math.Sqrt(19) / 3},
		{"seasons", float64(c.Seasons), 3},
	}
	for _, ch := range checks {
		if !scalar.EqualWithinAbsOrRel(ch.got, ch.want, exact, exact) {
			t.Errorf("%s = %v, want %v", ch.name, ch.got, ch.want)
		}
	}
	for i := range v {
		if want := v[i] - (max(v[i]-25, 0) - 2); r.Net[i] != want {
			t.Fatalf("path %d: net cost %v, want %v", i, r.Net[i], want)
		}
	}
}

func TestEvaluateRefusesBadValues(t *testing.T) {
	t.Parallel()
	f, err := Load("example.toml")
	if err != nil {
		t.Fatal(err)
	}
	ok := func() map[Key][]float64 {
		return map[Key][]float64{{"energy", "heating"}: {1, 2}, {"hdd", "heating"}: {1, 2}, {"hdd", "jan"}: {1, 2}}
	}
	missing := ok()
	delete(missing, Key{"hdd", "jan"})
	short := ok()
	short[Key{"hdd", "jan"}] = []float64{1}
	nan := ok()
	nan[Key{"hdd", "heating"}] = []float64{1, math.NaN()}
	cases := []struct {
		name   string
		values map[Key][]float64
		opt    *Options
		want   string
	}{
		{"missing key", missing, nil, "hedge: no simulated values for hdd/jan"},
		{"unequal lengths", short, nil, "hedge: hdd/jan has 1 paths but energy/heating has 2"},
		{"NaN", nan, nil, "hedge: hdd/heating: path 2 is NaN"},
		{"bad level", ok(), &Options{Loading: 0.2, Level: 1}, "hedge: quantile level 1"},
		{"bad loading", ok(), &Options{Loading: -1, Level: 0.9}, "hedge: loading λ = -1"},
		{"NaN history", ok(), &Options{Loading: 0.2, Level: 0.9, History: map[Key][]float64{{"hdd", "jan"}: {math.Inf(1)}}},
			"hedge: hdd/jan: historical season 1 is +Inf"},
	}
	for _, c := range cases {
		_, err := Evaluate(f, c.values, c.opt)
		if err == nil || !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s: error %v, want %q", c.name, err, c.want)
		}
	}
	if _, err := Evaluate(f, ok(), nil); err != nil {
		t.Errorf("good values refused: %v", err)
	}
}

// TestRangeWarnings: a strike or plan outside the simulated range of its
// index (a file written in other degrees, or for another station) is named
// in the result's warnings; one inside is not.
func TestRangeWarnings(t *testing.T) {
	t.Parallel()
	inf := math.Inf(1)
	f := &File{Contracts: []Contract{contract(Call, 2450, inf), contract(Put, 9000, inf)},
		Exposure: &Exposure{Index: "hdd", Period: "heating", Plan: 100, PriceAbove: 1, PriceBelow: 1}}
	f.Contracts[1].Name = "far put"
	r, err := Evaluate(f, map[Key][]float64{{"hdd", "heating"}: grid}, nil)
	if err != nil {
		t.Fatal(err)
	}
	got := strings.Join(r.Warnings, "\n")
	if len(r.Warnings) != 2 || !strings.Contains(got, `"far put"'s strike 9,000 lies above every simulated hdd`) ||
		!strings.Contains(got, "plan 100 lies below") || strings.Contains(got, `"call"`) {
		t.Errorf("warnings:\n%s", got)
	}
}
