package sim

import (
	"fmt"

	"golang.org/x/sync/errgroup"
	"strconv"
	"strings"
)

// Row is the tail table of one index of one period.
type Row struct {
	Index  Index
	Period string
	Name   string
	Unit   string
	Info   Info
	Tail   Tail
}

// Threshold asks for the probability that an index is worse than Value:
// for Period only, or for every period when Period is empty.
type Threshold struct {
	Index  Index
	Period string
	Value  float64
}

// ParseThreshold reads KEY:VALUE or KEY:PERIOD:VALUE, e.g. "hdd:heating:2800"
// or "coldest:-15".
func ParseThreshold(s string) (Threshold, error) {
	parts := strings.Split(s, ":")
	var th Threshold
	if len(parts) < 2 || len(parts) > 3 {
		return th, fmt.Errorf("sim: threshold %q: want INDEX:VALUE or INDEX:PERIOD:VALUE, e.g. hdd:heating:2800", s)
	}
	x, ok := IndexByKey(strings.ToLower(parts[0]))
	if !ok {
		return th, fmt.Errorf("sim: threshold %q: unknown index %q: want one of %s", s, parts[0], strings.Join(IndexKeys(), ", "))
	}
	v, err := strconv.ParseFloat(parts[len(parts)-1], 64)
	if err != nil {
		return th, fmt.Errorf("sim: threshold %q: %q is not a number", s, parts[len(parts)-1])
	}
	th = Threshold{Index: x, Value: v}
	if len(parts) == 3 {
		th.Period = strings.ToLower(parts[1])
	}
	return th, nil
}

// IndexKeys lists the keys of all indices.
func IndexKeys() []string {
	keys := make([]string, len(indexInfo))
	for i, in := range indexInfo {
		keys[i] = in.Key
	}
	return keys
}

// Summarize computes the tail table of every aggregate, in the order of
// r.Aggregates, sorting the columns in parallel on r.Config.Workers
// goroutines; units is the model's temperature unit ("C" or "F").
func (r *Result) Summarize(units string, thresholds []Threshold) []Row {
	rows := make([]Row, len(r.Aggregates))
	var g errgroup.Group
	g.SetLimit(max(r.Config.Workers, 1))
	for i, a := range r.Aggregates {
		in := a.Index.Info()
		var ths []float64
		for _, th := range thresholds {
			if th.Index == a.Index && (th.Period == "" || th.Period == a.Period.Name) {
				ths = append(ths, th.Value)
			}
		}
		g.Go(func() error {
			rows[i] = Row{Index: a.Index, Period: a.Period.Name, Name: in.Name, Unit: in.Unit(units), Info: in,
				Tail: Summarize(a.Values, in.HighIsAdverse, ths)}
			return nil
		})
	}
	g.Wait()
	return rows
}
