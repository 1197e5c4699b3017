package sim

import (
	"fmt"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"time"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/stat"

	"wxstress/calendar"
	"wxstress/model"
)

// Row is the tail table of one index of one period.
type Row struct {
	Index  Index
	Period string
	Name   string
	Unit   string
	Info   Info
	Tail   Tail
	// Dates, for the day of the peak only, is the distribution of the
	// dates the index stands for; its Tail is then only a count of days.
	Dates *DateSpread
}

// Season tells what kind of period a run's period is, from its own rows:
// cold (more HDD than CDD on average, and either named heating or with CDD
// under a twentieth of its HDD: a winter month) or warm (the reverse:
// the cooling season, July). The degree days decide first, so a southern
// station's "heating" (November to March, its summer) is not cold; the name
// only settles the middle ground. A period where both matter (the year, a
// shoulder season) is neither, as is one without both rows. Heating figures
// (HDD, the coldest day, the design day) of a warm period and cooling
// figures of a cold one are small remainders nobody plans on.
func Season(rows []Row, period string) (cold, warm bool) {
	hdd, cdd := math.NaN(), math.NaN()
	for _, r := range rows {
		if r.Period == period && r.Index == HDD {
			hdd = r.Tail.Mean
		}
		if r.Period == period && r.Index == CDD {
			cdd = r.Tail.Mean
		}
	}
	cold = hdd > cdd && (period == "heating" || cdd < hdd/20)
	warm = cdd > hdd && (period == "cooling" || hdd < cdd/20)
	return cold, warm // false when either is missing (NaN)
}

// DateSpread is the distribution of a date across paths: the median date
// and the share of paths in each calendar month.
type DateSpread struct {
	Median calendar.Date
	// Months holds the months with any paths, in calendar order within
	// the period (December before January for a winter period).
	Months []MonthShare
}

// MonthShare is the share of paths whose date falls in Month.
type MonthShare struct {
	Month time.Month
	Share float64
}

// dateSpread summarizes day-of-period values (1 = the period's first day).
func dateSpread(p Period, days []float64) *DateSpread {
	if len(days) == 0 {
		return nil
	}
	sorted := slices.Clone(days)
	slices.Sort(sorted)
	// The lower median: a whole day, and a day of the period.
	ds := &DateSpread{Median: p.From + calendar.Date(sorted[(len(sorted)-1)/2]) - 1}
	count := map[time.Month]int{}
	for _, d := range days {
		count[(p.From+calendar.Date(d)-1).Month()]++
	}
	seen := map[time.Month]bool{}
	for d := p.From; d <= p.To; d++ {
		if m := d.Month(); !seen[m] && count[m] > 0 {
			seen[m] = true
			ds.Months = append(ds.Months, MonthShare{m, float64(count[m]) / float64(len(days))})
		}
	}
	return ds
}

// Threshold asks for the probability that an index is worse than Value:
// for Period only, or for every period when Period is empty.
type Threshold struct {
	Index  Index
	Period string
	Value  float64
}

// ParseThreshold reads KEY:VALUE or KEY:PERIOD:VALUE, e.g. "hdd:heating:2800",
// "coldest:-15" or "hdd:12-01:02-28:1500" (a window period keeps its colon).
func ParseThreshold(s string) (Threshold, error) {
	var th Threshold
	key, rest, ok1 := strings.Cut(s, ":")
	i := strings.LastIndex(rest, ":")
	period, value := "", rest
	if i >= 0 {
		period, value = rest[:i], rest[i+1:]
	}
	if !ok1 || value == "" || i == 0 {
		return th, fmt.Errorf("sim: threshold %q: want INDEX:VALUE or INDEX:PERIOD:VALUE, e.g. hdd:heating:2800", s)
	}
	x, ok := IndexByKey(strings.ToLower(key))
	if !ok {
		return th, fmt.Errorf("sim: threshold %q: unknown index %q: want one of %s", s, key, strings.Join(IndexKeys(), ", "))
	}
	if x == PeakDay {
		return th, fmt.Errorf("sim: threshold %q: the day of the peak is a date, not a level; for the peak-day demand use peak-demand", s)
	}
	v, err := strconv.ParseFloat(value, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return th, fmt.Errorf("sim: threshold %q: %q is not a finite number", s, value)
	}
	return Threshold{Index: x, Period: strings.ToLower(period), Value: v}, nil
}

// IndexKeys lists the keys of all indices.
func IndexKeys() []string {
	keys := make([]string, len(indexInfo))
	for i, in := range indexInfo {
		keys[i] = in.Key
	}
	return keys
}

// kDay is the "k-day" of the snap indices' names (not the "k-day" inside
// "peak-day").
var kDay = regexp.MustCompile(`\bk-day\b`)

// Summarize computes the tail table of every aggregate, in the order of
// r.Aggregates, sorting the columns in parallel on r.Config.Workers
// goroutines; units are the model's temperature units.
func (r *Result) Summarize(units model.Units, thresholds []Threshold) []Row {
	rows := make([]Row, len(r.Aggregates))
	var g errgroup.Group
	g.SetLimit(max(r.Config.Workers, 1))
	demandUnit := ""
	if r.Config.Demand != nil {
		demandUnit = r.Config.Demand.Unit
	}
	for i, a := range r.Aggregates {
		in := a.Index.Info()
		if r.Config.SnapDays > 0 { // the design snap's length in its name: "coldest 3-day mean"
			in.Name = kDay.ReplaceAllString(in.Name, strconv.Itoa(r.Config.SnapDays)+"-day")
		}
		var ths []float64
		for _, th := range thresholds {
			if th.Index == a.Index && (th.Period == "" || th.Period == a.Period.Name) {
				ths = append(ths, th.Value)
			}
		}
		g.Go(func() error {
			rows[i] = Row{Index: a.Index, Period: a.Period.Name, Name: in.Name, Unit: in.Unit(units, demandUnit), Info: in,
				Tail: SummarizeWith(a.Values, in.HighIsAdverse, ths, r.Config.ReturnPeriods)}
			if a.Index == PeakDay {
				rows[i].Dates = dateSpread(a.Period, a.Values)
			}
			return nil
		})
	}
	g.Wait()
	return rows
}

// Change is a scenario's tail statistics minus the baseline's for one index
// of one period. Both runs use the same seed and paths, so path i of each
// has the same shocks (common random numbers) and the difference of means
// has the paired standard error MeanSE = sd(scenarioᵢ − baselineᵢ)/√N,
// usually far below IndependentSE, what two independent runs would give.
type Change struct {
	Mean, MeanSE, IndependentSE float64
	// P50 is the median's change; VaR95 and VaR99 are the changes of the
	// adverse 95 % and 99 % quantiles (the 1-in-20 and 1-in-100 levels: P5
	// and P1 where low is adverse), on the same side as ES95 and RL20.
	P50, VaR95, VaR99 float64
	ES95, RL20        float64
}

// Compare returns the change of every row of scen against base; the results
// must come from runs of the same configuration (same aggregates in the
// same order).
func Compare(base, scen *Result, baseRows, scenRows []Row) []Change {
	if len(base.Aggregates) != len(scen.Aggregates) || len(baseRows) != len(base.Aggregates) || len(scenRows) != len(scen.Aggregates) {
		panic("sim: Compare of runs with different aggregates")
	}
	out := make([]Change, len(baseRows))
	for k := range baseRows {
		b, s := base.Aggregates[k].Values, scen.Aggregates[k].Values
		if len(b) != len(s) {
			panic("sim: Compare of runs with different path counts")
		}
		d := make([]float64, len(b))
		for i := range b {
			d[i] = s[i] - b[i]
		}
		n := float64(len(d))
		_, sd := stat.MeanStdDev(d, nil)
		bt, st := baseRows[k].Tail, scenRows[k].Tail
		if sd <= 1e-9*max(1, math.Abs(bt.Mean)) {
			sd = 0 // rounding noise: an exact shift moves every path by the same amount
		}
		out[k] = Change{
			Mean: st.Mean - bt.Mean, MeanSE: sd / math.Sqrt(n),
			IndependentSE: math.Sqrt((bt.SD*bt.SD + st.SD*st.SD) / n),
			P50:           st.Quantile(0.50) - bt.Quantile(0.50), VaR95: st.VaR95 - bt.VaR95,
			VaR99: st.VaR99 - bt.VaR99, ES95: st.ES95 - bt.ES95,
			RL20: st.ReturnLevel(20) - bt.ReturnLevel(20),
		}
	}
	return out
}
