package stress

import (
	"bufio"
	"errors"
	"fmt"
	"os"
	"runtime"
	"strconv"
	"strings"

	"wxstress/internal/numfmt"
	"wxstress/sim"
)

// MaxPaths is the most paths a run takes, whatever the memory: beyond it a
// path count is a mistake, not a request.
const MaxPaths = 1_000_000_000

// MinPaths is the fewest paths a run's tail tables mean anything with (and
// have Monte Carlo errors for); the commands refuse fewer.
const MinPaths = 10

// ErrMemory is wrapped by the refusal of a run whose estimated memory
// exceeds the limit.
var ErrMemory = errors.New("stress: run too large for the memory limit")

// MemoryEstimate returns the bytes a job's simulation holds at its peak:
// every run's per-path aggregates (8 bytes a path for each index of each
// period; the baseline, each scenario and a climate reference run are kept
// together for the comparisons), a working copy of a column for each
// worker summarising at once, the detail paths kept whole, and the bands'
// runs (one at a time). The commands also hand the limit to the Go runtime
// (debug.SetMemoryLimit), so that its garbage collector keeps the process
// near what is live rather than at twice it.
func MemoryEstimate(job *Job, periods, indices int) int64 {
	paths := int64(job.Config.Paths)
	runs := int64(estimatedRuns(job))
	perRun := paths * int64(periods*indices) * 8
	workers := int64(job.Config.Workers)
	if workers <= 0 {
		workers = int64(runtime.GOMAXPROCS(0))
	}
	total := runs*perRun + workers*paths*8 // the columns summarised at once
	if job.Detail > 0 {
		total += int64(min(job.Detail, job.Config.Paths)) * 400 * 8 * 2
	}
	if len(job.CapacityTargets) > 0 {
		total += paths * int64(periods) * topDays * 4
	}
	if u := job.Uncertainty; u != nil && u.Mode != UncertaintyMix {
		total += min(paths, bandPaths) * int64(periods*indices) * 8
	}
	return total
}

// estimatedRuns counts the runs a job keeps at once: the baseline, each
// scenario and, for the record's own seasons beside a run from the data
// end, the climate-start run they are compared with.
func estimatedRuns(job *Job) int {
	n := 1 + len(job.Scenarios)
	if job.History && (job.Config.Start == sim.StartConditional || job.Observed) {
		n++
	}
	return n
}

// checkMemory refuses a job whose estimate exceeds limit (0: no limit).
func checkMemory(job *Job, limit int64) error {
	if job.Config.Paths > MaxPaths {
		return fmt.Errorf("%w: %d paths: at most %d", ErrJob, job.Config.Paths, MaxPaths)
	}
	if limit <= 0 {
		return nil
	}
	periods := len(job.Config.Periods)
	if periods == 0 {
		periods = len(sim.DefaultPeriods())
	}
	indices := 6
	if job.Demand != nil || job.DemandHistory != nil {
		indices += 4
	}
	if est := MemoryEstimate(job, periods, indices); est > limit {
		count := func(n int, one, many string) string {
			if n == 1 {
				return "1 " + one
			}
			return numfmt.Number(float64(n)) + " " + many
		}
		return fmt.Errorf("%w: %s × %s × %s × %s needs about %s, above the limit of %s; "+
			"run fewer paths or raise the limit with --max-memory", ErrMemory, count(job.Config.Paths, "path", "paths"),
			count(periods, "period", "periods"), count(indices, "index", "indices"), count(estimatedRuns(job), "run", "runs"),
			FormatBytes(est), FormatBytes(limit))
	}
	return nil
}

// FormatBytes writes a byte count for people: "1.5 GiB", "730 MiB".
func FormatBytes(b int64) string {
	switch {
	case b >= 1<<30:
		return fmt.Sprintf("%.1f GiB", float64(b)/(1<<30))
	case b >= 1<<20:
		return fmt.Sprintf("%.0f MiB", float64(b)/(1<<20))
	}
	return fmt.Sprintf("%d KiB", (b+1023)/1024)
}

// DefaultMemoryLimit is half the machine's physical memory (MemTotal of
// /proc/meminfo), or 4 GiB where that cannot be read.
func DefaultMemoryLimit() int64 {
	const fallback = 4 << 30
	f, err := os.Open("/proc/meminfo")
	if err != nil {
		return fallback
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if rest, ok := strings.CutPrefix(sc.Text(), "MemTotal:"); ok {
			fields := strings.Fields(rest)
			if len(fields) >= 1 {
				if kb, err := strconv.ParseInt(fields[0], 10, 64); err == nil && kb > 0 {
					return kb * 1024 / 2
				}
			}
		}
	}
	return fallback
}

// ParseBytes reads a memory size: a number with an optional unit K, M, G or
// T (binary: 1 G = 2³⁰ bytes), e.g. "1.5G", "800M".
func ParseBytes(s string) (int64, error) {
	t := strings.ToUpper(strings.TrimSpace(s))
	t = strings.TrimSuffix(strings.TrimSuffix(t, "B"), "I")
	mult := int64(1)
	if n := len(t); n > 0 {
		switch t[n-1] {
		case 'K':
			mult, t = 1<<10, t[:n-1]
		case 'M':
			mult, t = 1<<20, t[:n-1]
		case 'G':
			mult, t = 1<<30, t[:n-1]
		case 'T':
			mult, t = 1<<40, t[:n-1]
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || !(v > 0) || v*float64(mult) > 1<<62 {
		return 0, fmt.Errorf("stress: memory size %q: want a positive number with an optional unit K, M, G or T, e.g. 8G", s)
	}
	return int64(v * float64(mult)), nil
}
