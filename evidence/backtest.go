package evidence

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"wxstress/diagnose"
	"wxstress/model"
)

// Thresholds of the verdict.
const (
	// VerdictLevel is the two-sided p-value below which a coverage or bias
	// test counts as evidence against the forecast.
	VerdictLevel = 0.05
	// MinCases is the fewest cases for which a verdict is given; below it the
	// binomial tests have almost no power and the verdict says so.
	MinCases = 10
)

// Coverage is how often realised values fell inside a central band of the
// forecast, with the exact binomial test of the nominal rate.
type Coverage struct {
	Nominal float64 // the band's probability content: 0.5 or 0.9
	Lo, Hi  float64 // the band in PIT: [0.25, 0.75] or [0.05, 0.95]
	Inside  int     // cases with Lo ≤ PIT ≤ Hi
	Cases   int
	// P is the two-sided exact binomial p-value of Inside under
	// Binomial(Cases, Nominal) (BinomialTest).
	P float64
}

// Rate is the fraction of cases inside the band.
func (c Coverage) Rate() float64 { return float64(c.Inside) / float64(c.Cases) }

// Outside is the number of cases outside the band.
func (c Coverage) Outside() int { return c.Cases - c.Inside }

// PITSummary describes how well a set of PITs matches the uniform
// distribution a calibrated forecast gives.
type PITSummary struct {
	Cases     int
	Central50 Coverage // PIT in [0.25, 0.75]
	Central90 Coverage // PIT in [0.05, 0.95]
	// Above is the number of cases with PIT > ½ (realised above the forecast
	// median) among the Untied cases with PIT ≠ ½; AboveP is the two-sided
	// binomial (sign test) p-value of Above under Binomial(Untied, ½), 1 when
	// every PIT is ½.
	Above, Untied int
	AboveP        float64
	// KS is the one-sample Kolmogorov–Smirnov test of the PITs against the
	// uniform distribution on [0, 1] (diagnose.KolmogorovSmirnovExact: the
	// exact p-value below 100 seasons, as R's ks.test, the asymptotic one
	// above; approximate in either case because mid-rank PITs are discrete).
	KS model.Test
	// ProbitSD is the sample standard deviation (divisor n − 1) of Φ⁻¹(PIT),
	// each PIT first clamped to [½/m, 1 − ½/m] for its sample size m. It is
	// about 1 for a calibrated forecast, above 1 when too narrow, below 1 when
	// too wide; NaN for fewer than two cases.
	ProbitSD float64
	// Verdict says in plain words whether the spread looks right (see the
	// package documentation for the rule).
	Verdict string
}

// SummarizePIT summarises PITs of forecasts made from samples of sampleSize
// values each. It panics if pits is empty, sampleSize < 1 or a PIT lies
// outside [0, 1] or is NaN.
func SummarizePIT(pits []float64, sampleSize int) PITSummary {
	if sampleSize < 1 {
		panic("evidence: sample size below 1")
	}
	sizes := make([]int, len(pits))
	for i := range sizes {
		sizes[i] = sampleSize
	}
	return summarizePIT(pits, sizes)
}

func summarizePIT(pits []float64, sizes []int) PITSummary {
	n := len(pits)
	if n == 0 {
		panic("evidence: PIT summary of no cases")
	}
	s := PITSummary{
		Cases:     n,
		Central50: Coverage{Nominal: 0.5, Lo: 0.25, Hi: 0.75, Cases: n},
		Central90: Coverage{Nominal: 0.9, Lo: 0.05, Hi: 0.95, Cases: n},
	}
	probits := make([]float64, n)
	for i, u := range pits {
		if !(u >= 0 && u <= 1) {
			panic(fmt.Sprintf("evidence: PIT %v outside [0, 1]", u))
		}
		for _, c := range []*Coverage{&s.Central50, &s.Central90} {
			if u >= c.Lo && u <= c.Hi {
				c.Inside++
			}
		}
		if u != 0.5 {
			s.Untied++
			if u > 0.5 {
				s.Above++
			}
		}
		eps := 0.5 / float64(sizes[i])
		probits[i] = distuv.UnitNormal.Quantile(min(max(u, eps), 1-eps))
	}
	for _, c := range []*Coverage{&s.Central50, &s.Central90} {
		c.P = BinomialTest(c.Inside, n, c.Nominal)
	}
	s.AboveP = 1
	if s.Untied > 0 {
		s.AboveP = BinomialTest(s.Above, s.Untied, 0.5)
	}
	s.KS = diagnose.KolmogorovSmirnovExact(pits, func(u float64) float64 { return min(max(u, 0), 1) })
	s.ProbitSD = math.NaN()
	if n >= 2 {
		s.ProbitSD = stat.StdDev(probits, nil)
	}
	s.Verdict = verdict(s)
	return s
}

// verdict applies the rule documented in doc.go.
func verdict(s PITSummary) string {
	if s.Cases < MinCases {
		few := fmt.Sprintf("too few cases to judge the spread: %d (at least %d needed)", s.Cases, MinCases)
		if s.AboveP < VerdictLevel { // the sign test is exact at any size
			return few + "; " + biasText(s)
		}
		return few
	}
	c90, c50 := s.Central90, s.Central50
	expect := func(c Coverage) string {
		return strconv.FormatFloat(math.Round(10*float64(c.Cases)*(1-c.Nominal))/10, 'f', -1, 64)
	}
	band := func(c Coverage) string { return fmt.Sprintf("%g %%", 100*c.Nominal) }
	var spread string
	switch {
	case c90.P < VerdictLevel && c90.Rate() < c90.Nominal:
		spread = fmt.Sprintf("too narrow: realised values fall outside the %s band %d of %d times (expected %s)",
			band(c90), c90.Outside(), c90.Cases, expect(c90))
	case c90.P < VerdictLevel:
		spread = fmt.Sprintf("too wide: realised values fall outside the %s band only %d of %d times (expected %s)",
			band(c90), c90.Outside(), c90.Cases, expect(c90))
	case c50.P < VerdictLevel && c50.Rate() < c50.Nominal:
		spread = fmt.Sprintf("too narrow: realised values fall outside the central %s band %d of %d times (expected %s)",
			band(c50), c50.Outside(), c50.Cases, expect(c50))
	case c50.P < VerdictLevel:
		spread = fmt.Sprintf("too wide: realised values fall outside the central %s band only %d of %d times (expected %s)",
			band(c50), c50.Outside(), c50.Cases, expect(c50))
	default:
		// Not "about right": with few cases the tests have little power.
		spread = fmt.Sprintf("no evidence against the spread at %g %%: realised values fall outside the %s band %d of %d times (expected %s)",
			100*VerdictLevel, band(c90), c90.Outside(), c90.Cases, expect(c90))
	}
	if s.AboveP >= VerdictLevel {
		return spread
	}
	return spread + "; " + biasText(s)
}

// biasText words a rejected sign test: "forecast too low: realised values
// fall above the forecast median 9 of 9 times (expected 4.5, p 0.0039)".
func biasText(s PITSummary) string {
	side, where, count := "low", "above", s.Above
	if 2*s.Above < s.Untied {
		side, where, count = "high", "below", s.Untied-s.Above
	}
	return fmt.Sprintf("forecast too %s: realised values fall %s the forecast median %d of %d times (expected %s, p %.2g)",
		side, where, count, s.Untied, strconv.FormatFloat(float64(s.Untied)/2, 'f', -1, 64), s.AboveP)
}

// Case is one forecast of a backtest: the model's sample for a period that
// was held out of the fit, and what was then observed.
type Case struct {
	Sample   []float64 // simulated values for the period; at least 2
	Observed float64
	// Reference is the climatological forecast's sample for the period. Nil
	// means the observed values of all other cases (leave-one-out
	// climatology).
	Reference []float64
}

// Backtest is the evidence of a set of cases.
type Backtest struct {
	PITSummary
	PIT      []float64 // per case, mid-rank (PIT)
	CRPS     []float64 // per case, fair sample CRPS of the model (CRPS)
	RefCRPS  []float64 // per case, fair sample CRPS of the climatological forecast
	MeanCRPS float64
	// MeanRefCRPS is the mean CRPS of the climatological forecast, and
	// Skill = 1 − MeanCRPS/MeanRefCRPS the continuous ranked probability
	// skill score: positive when the model beats climatology.
	MeanRefCRPS, Skill float64
}

// ErrBacktest is wrapped by every error Evaluate returns.
var ErrBacktest = errors.New("evidence: unusable backtest")

// Evaluate scores every case and summarises the PITs. It returns an error
// wrapping ErrBacktest, naming the case, if there are fewer than two cases
// (three when a case uses the leave-one-out climatology), a sample or
// reference has fewer than two values, or a value is NaN or infinite. Samples are not modified.
func Evaluate(cases []Case) (*Backtest, error) {
	n := len(cases)
	if n < 2 {
		return nil, fmt.Errorf("%w: %d cases, at least 2 needed", ErrBacktest, n)
	}
	for i, c := range cases {
		if len(c.Sample) < 2 {
			return nil, fmt.Errorf("%w: case %d: %d sample values, at least 2 needed", ErrBacktest, i+1, len(c.Sample))
		}
		if c.Reference == nil && n < 3 {
			return nil, fmt.Errorf("%w: case %d: the leave-one-out climatology needs at least 3 cases", ErrBacktest, i+1)
		}
		if c.Reference != nil && len(c.Reference) < 2 {
			return nil, fmt.Errorf("%w: case %d: %d reference values, at least 2 needed", ErrBacktest, i+1, len(c.Reference))
		}
		if !finite(c.Observed) {
			return nil, fmt.Errorf("%w: case %d: observed value %v", ErrBacktest, i+1, c.Observed)
		}
		for _, set := range []struct {
			name string
			x    []float64
		}{{"sample", c.Sample}, {"reference", c.Reference}} {
			for j, v := range set.x {
				if !finite(v) {
					return nil, fmt.Errorf("%w: case %d: %s value %d is %v", ErrBacktest, i+1, set.name, j+1, v)
				}
			}
		}
	}
	b := &Backtest{
		PIT:     make([]float64, n),
		CRPS:    make([]float64, n),
		RefCRPS: make([]float64, n),
	}
	sizes := make([]int, n)
	others := make([]float64, 0, n-1)
	for i, c := range cases {
		b.PIT[i] = PIT(c.Sample, c.Observed)
		b.CRPS[i] = CRPS(c.Sample, c.Observed)
		sizes[i] = len(c.Sample)
		ref := c.Reference
		if ref == nil {
			others = others[:0]
			for j, o := range cases {
				if j != i {
					others = append(others, o.Observed)
				}
			}
			ref = others
		}
		b.RefCRPS[i] = CRPS(ref, c.Observed)
	}
	b.PITSummary = summarizePIT(b.PIT, sizes)
	b.MeanCRPS = stat.Mean(b.CRPS, nil)
	b.MeanRefCRPS = stat.Mean(b.RefCRPS, nil)
	b.Skill = 1 - b.MeanCRPS/b.MeanRefCRPS
	b.Verdict += fewCaseSigns(b)
	return b, nil
}

// fewCaseSigns adds to a verdict that does not judge the spread (fewer than
// MinCases cases) what its few cases still show plainly, without a test:
// every realised value on one side of the forecast median, and a CRPS well
// above the climatology's (more than half as large again).
func fewCaseSigns(b *Backtest) string {
	if b.Cases >= MinCases {
		return ""
	}
	var out string
	if u := b.Untied; u >= 3 && b.AboveP >= VerdictLevel && (b.Above == u || b.Above == 0) {
		side := "above"
		if b.Above == 0 {
			side = "below"
		}
		out += fmt.Sprintf("; all %d realised values fell %s the forecast median", u, side)
	}
	if b.MeanRefCRPS > 0 && b.MeanCRPS > 1.5*b.MeanRefCRPS {
		out += fmt.Sprintf("; the model's CRPS is %.1f times the climatology's", b.MeanCRPS/b.MeanRefCRPS)
	}
	return out
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
