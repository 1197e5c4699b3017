// Package hedge reads a hedge file and evaluates degree-day and volume
// contracts, and the retailer's exposure, over simulated paths.
//
// A hedge file (TOML, decoded strictly: unknown keys, wrong types, missing
// and out-of-range values are errors naming the file, line and key) holds an
// optional [exposure] and any number of [[contract]] tables, at least one of
// the two. Each reads an index (hdd, cdd, energy or peak; the last two need a
// demand model) over a period named as sim.ParsePeriod knows it; Needs lists
// the values the caller must simulate.
//
// # Payouts
//
// For the index value I of a path, one contract bought pays, before its
// premium,
//
//	swap    tick·(I − K)
//	call    tick·max(I − K, 0)
//	put     tick·max(K − I, 0)
//	collar  tick·(max(I − K_high, 0) − max(K_low − I, 0))
//
// clamped to [−limit, limit] when the contract has a limit. A collar is a
// call at K_high bought and a put at K_low sold; the limit caps its net
// payout on either side, which, as only one leg pays at any I, is the same as
// capping each leg. A position of quantity q (negative when sold) with
// premium π per contract nets q·(payout − π).
//
// # Exposure and net cost
//
// With V the exposure's index value and plan its planned volume, the
// exposure costs
//
//	C = price_above·max(V − plan, 0) + price_below·max(plan − V, 0)
//
// and the net cost of the hedged book is C − Σ qⱼ·(Pⱼ − πⱼ) over the
// contracts. Costs are in the file's currency, plan in the index's unit
// (°C·day or °F·day for degree days, the demand model's energy or demand
// unit), prices in currency per unit.
//
// # Statistics
//
// Per contract (quantity 1, before premium): the expected payout μ (the
// expected-value price), σ, the 1, 5, 50, 95 and 99 % quantiles, the
// probability of a payout, the standard-deviation principle price μ + λ·σ
// and the quantile principle price (the α-quantile of the payout); see
// Kaas, Goovaerts, Dhaene and Denuit, Modern Actuarial Risk Theory
// (Springer, 2nd ed. 2008), ch. 5 (from memory). The burn price is the mean
// payout over historical seasons moved to the target year, shown beside
// the model's μ.
//
// For the book: mean, σ, VaR95, ES95 and ES99 of the net cost unhedged (C)
// and hedged, with the conventions of sim.Summarize (type-4 quantiles of
// Hyndman and Fan 1996; ES the mean of the worst ⌈a·N⌉ paths), and the
// variance reduction 1 − Var(hedged)/Var(C). For each contract held alone
// the minimum-variance quantity minimises Var(C − q·P):
//
//	q* = Cov(C, P) / Var(P)
//
// positive (buy) when the contract pays in the years the exposure costs;
// it is the slope of the least-squares regression of C on P (Ederington,
// Journal of Finance 34, 1979, for the hedge ratio; from memory).
//
// These are statistical evaluations of a model, not price quotes or advice.
//
// Functions here are safe for concurrent use; Evaluate does not modify its
// arguments.
package hedge
