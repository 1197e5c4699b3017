package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"wxstress/demo"
	"wxstress/internal/report"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

// writeStation writes the demo station record to dir and returns its path.
func writeStation(t *testing.T, dir string) string {
	t.Helper()
	p := filepath.Join(dir, "station.csv")
	if err := os.WriteFile(p, demo.Station(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func mustRead(t *testing.T, p string) string {
	t.Helper()
	b, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// TestOutputsNeverDestroyInputs covers the outputs a run must refuse: one of
// its inputs, a symlink, a device, a directory, and an existing file without
// --force. Each is refused with exit 1 before any work, naming the path, and
// the input is unchanged.
func TestOutputsNeverDestroyInputs(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	station := writeStation(t, dir)
	before := mustRead(t, station)
	m := demoModel(t)
	modelBefore := mustRead(t, m)
	link := filepath.Join(dir, "link.json")
	if err := os.Symlink(filepath.Join(dir, "elsewhere.json"), link); err != nil {
		t.Fatal(err)
	}
	existing := filepath.Join(dir, "existing.json")
	if err := os.WriteFile(existing, []byte("keep me"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"fit", "--temps", station, "--out", station}, "input"},
		{[]string{"fit", "--temps", station, "--report", station}, "input"},
		{[]string{"simulate", "--model", m, "--paths", "100", "--report", m}, "input"},
		{[]string{"fit", "--temps", station, "--out", link}, "link"},
		{[]string{"fit", "--temps", station, "--out", os.DevNull}, os.DevNull},
		{[]string{"fit", "--temps", station, "--out", dir}, dir},
		{[]string{"fit", "--temps", station, "--out", existing}, "--force"},
		{[]string{"fit", "--temps", station, "--out", filepath.Join(dir, "a.json"), "--report", filepath.Join(dir, "a.json")}, "two outputs"},
		{[]string{"simulate", "--model", m, "--paths", "100", "--out", existing}, "not a directory"},
	} {
		start := time.Now()
		code, _, stderr := call(t, context.Background(), c.args...)
		if code != exitFailure || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: exit %d, %q; want exit 1 naming %q", c.args, code, stderr, c.want)
		}
		if time.Since(start) > 2*time.Second {
			t.Errorf("%v: refused only after %v: the check must come before the work", c.args, time.Since(start))
		}
	}
	if mustRead(t, station) != before || mustRead(t, m) != modelBefore || mustRead(t, existing) != "keep me" {
		t.Error("an input or an existing file was changed")
	}
	if _, err := os.Lstat(filepath.Join(dir, "elsewhere.json")); err == nil {
		t.Error("the symlink's target was written")
	}
	// With --force an existing regular file is replaced.
	if code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "100", "--format", "json",
		"--report", existing, "--force"); code != exitOK {
		t.Errorf("--force: exit %d: %s", code, stderr)
	}
	if strings.HasPrefix(mustRead(t, existing), "keep me") {
		t.Error("--force did not replace the existing file")
	}
}

// TestOutputSetIsAllOrNothing makes one output of a run fail (its
// directory, /proc, cannot take files even for root) and checks that the
// other outputs are not written either: the previous set in the output
// directory is untouched and no staging is left.
func TestOutputSetIsAllOrNothing(t *testing.T) {
	t.Parallel()
	if _, err := os.Stat("/proc/self"); err != nil {
		t.Skip("no /proc")
	}
	dir := t.TempDir()
	m := demoModel(t)
	out := filepath.Join(dir, "res")
	if code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "200", "--out", out); code != exitOK {
		t.Fatalf("first run: exit %d: %s", code, stderr)
	}
	first := mustRead(t, filepath.Join(out, "tails.json"))
	code, _, _ := call(t, context.Background(), "simulate", "--model", m, "--paths", "300", "--seed", "9", "--out", out, "--force",
		"--report", "/proc/wxstress-test-report.html")
	if code != exitFailure {
		t.Fatalf("exit %d, want 1", code)
	}
	if mustRead(t, filepath.Join(out, "tails.json")) != first {
		t.Error("a failed run replaced tails.json of the previous run")
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".wxstress") {
			t.Errorf("staging left behind: %s", e.Name())
		}
	}
}

// TestRunIDSharedBySet checks that the files of one run carry the same run
// id and that two runs differ.
func TestRunIDSharedBySet(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	m := demoModel(t)
	ids := map[string]bool{}
	for i := range 2 {
		out := filepath.Join(dir, fmt.Sprint(i))
		if code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "100", "--out", out); code != exitOK {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		j, c := mustRead(t, filepath.Join(out, "tails.json")), mustRead(t, filepath.Join(out, "tails.csv"))
		id := between(j, `"run_id": "`, `"`)
		if id == "" || !strings.Contains(c, id) {
			t.Errorf("run %d: run id %q not in both files", i, id)
		}
		ids[id] = true
	}
	if len(ids) != 2 {
		t.Errorf("two runs share a run id: %v", ids)
	}
}

func between(s, a, b string) string {
	_, rest, ok := strings.Cut(s, a)
	if !ok {
		return ""
	}
	v, _, _ := strings.Cut(rest, b)
	return v
}

// TestMemoryLimitRefuses10MillionPaths asks for 10⁷ paths of the default
// job under a 1 GiB limit: refused before any allocation, with the estimate
// and the flag that lifts the limit. (The default job at 10⁷ paths needs
// about 1.5 GiB: three periods × six indices × 8 bytes × 10⁷, and a working
// copy of a column for each of two workers.)
func TestMemoryLimitRefuses10MillionPaths(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	start := time.Now()
	code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "10000000", "--max-memory", "1G",
		"--workers", "2")
	if code != exitFailure || !strings.Contains(stderr, "--max-memory") || !strings.Contains(stderr, "1.5 GiB") {
		t.Errorf("exit %d: %s", code, stderr)
	}
	if time.Since(start) > 2*time.Second {
		t.Errorf("refused only after %v", time.Since(start))
	}
	for _, p := range []string{"0", "-5", "9223372036854775807"} {
		if code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", p); code != exitUsage {
			t.Errorf("--paths %s: exit %d, want 2: %s", p, code, stderr)
		}
	}
}

// TestWriteFailureIsExitOne: a command whose output cannot be written fails.
func TestWriteFailureIsExitOne(t *testing.T) {
	t.Parallel()
	full, err := os.OpenFile("/dev/full", os.O_WRONLY, 0)
	if err != nil {
		t.Skip("no /dev/full")
	}
	defer full.Close()
	for _, args := range [][]string{{"version"}, {"help"}, {"scenarios"}} {
		if code := run(context.Background(), args, full, new(strings.Builder)); code != exitFailure {
			t.Errorf("%v to a full device: exit %d, want 1", args, code)
		}
	}
}

// TestSIGINTDuringFit starts the built command on a long record, interrupts
// it while it fits, and checks it exits 130 within a second, with nothing
// written.
func TestSIGINTDuringFit(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the command")
	}
	t.Parallel()
	dir := t.TempDir()
	bin := filepath.Join(dir, "wxstress")
	if out, err := exec.Command("go", "build", "-o", bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("build: %v\n%s", err, out)
	}
	// 600 years of daily means: a fit of a few seconds (150 years took
	// under the 0.7 s the test waits once the fit got faster).
	var b strings.Builder
	b.WriteString("date,tavg\n")
	r := rand.New(rand.NewPCG(1, 2))
	d := time.Date(1420, 1, 1, 0, 0, 0, 0, time.UTC)
	x := 0.0
	for ; d.Year() < 2020; d = d.AddDate(0, 0, 1) {
		x = 0.7*x + 2.5*r.NormFloat64()
		fmt.Fprintf(&b, "%s,%.1f\n", d.Format("2006-01-02"), 10+10*math.Cos(2*math.Pi*float64(d.YearDay()-200)/365.25)+x)
	}
	station := filepath.Join(dir, "long.csv")
	if err := os.WriteFile(station, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "m.json")
	cmd := exec.Command(bin, "fit", "--temps", station, "--out", out)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	time.Sleep(500 * time.Millisecond)
	sent := time.Now()
	if err := cmd.Process.Signal(syscall.SIGINT); err != nil {
		t.Fatal(err)
	}
	err := cmd.Wait()
	took := time.Since(sent)
	ee, ok := err.(*exec.ExitError)
	if !ok || ee.ExitCode() != exitInterrupted {
		t.Fatalf("after SIGINT: %v, want exit 130", err)
	}
	if took > time.Second {
		t.Errorf("exit %v after the signal, want within a second", took)
	}
	if _, err := os.Stat(out); err == nil {
		t.Error("an interrupted fit wrote its model")
	}
}

// TestReturnPeriodsFollow: --return-periods sets the 1-in-T levels the JSON
// lists, and each equals the quantile 1 − 1/T of the per-path values in
// paths.csv (the definition, recomputed here with sorting and type-4
// interpolation by hand).
func TestReturnPeriodsFollow(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	dir := filepath.Join(t.TempDir(), "rp")
	code, stdout, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "999", "--period", "year",
		"--return-periods", "3,30,250", "--format", "json", "--out", dir, "--per-path")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var doc struct {
		Indices []struct {
			Key          string             `json:"key"`
			ReturnLevels map[string]float64 `json:"return_levels"`
		} `json:"indices"`
	}
	if err := json.Unmarshal([]byte(stdout), &doc); err != nil {
		t.Fatal(err)
	}
	rl := doc.Indices[0].ReturnLevels
	if len(rl) != 3 || rl["3"] == 0 || rl["30"] == 0 || rl["250"] == 0 {
		t.Fatalf("return levels %v, want keys 3, 30, 250", rl)
	}
	// The year's HDD column of paths.csv, by hand.
	lines := strings.Split(strings.TrimSpace(mustRead(t, filepath.Join(dir, "paths.csv"))), "\n")
	col := slices.Index(strings.Split(lines[0], ","), "year.hdd")
	var v []float64
	for _, l := range lines[1:] {
		x, _ := strconv.ParseFloat(strings.Split(l, ",")[col], 64)
		v = append(v, x)
	}
	slices.Sort(v)
	n := float64(len(v))
	for key, T := range map[string]float64{"3": 3, "30": 30, "250": 250} {
		h := n*(1-1/T) - 1 // type 4: position n·p, 1-based
		i := int(math.Floor(h))
		want := v[i] + (h-float64(i))*(v[i+1]-v[i])
		if math.Abs(rl[key]-want) > 1e-9*math.Abs(want) {
			t.Errorf("1-in-%s %.6f, the definition gives %.6f", key, rl[key], want)
		}
	}
}

// TestWritingStopsOnInterrupt: once the run's context is cancelled (Ctrl-C
// while the outputs are written), a large output stops within a buffer,
// the set is not committed, and nothing is left.
func TestWritingStopsOnInterrupt(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	plan := newOutputPlan(ctx, false)
	target := filepath.Join(dir, "big.csv")
	if err := plan.check(target); err != nil {
		t.Fatal(err)
	}
	written := 0
	err := plan.add(target, func(w io.Writer) error {
		line := []byte(strings.Repeat("1.2345,", 15) + "\n")
		for i := range 1_000_000 {
			if i == 1000 {
				cancel() // the interrupt arrives mid-write
			}
			n, err := w.Write(line)
			written += n
			if err != nil {
				return err
			}
		}
		return nil
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("writing went on after the interrupt: %v, %d bytes", err, written)
	}
	if written > 2_000_000 {
		t.Errorf("%d bytes written after the interrupt", written)
	}
	plan.abort()
	entries, _ := os.ReadDir(dir)
	if len(entries) != 0 {
		t.Errorf("left behind: %v", entries)
	}
}

// TestPerPathIsAskedFor checks that paths.csv is written only with
// --per-path, that --per-path needs --out, and that a run without it
// refuses a directory holding an earlier run's paths.csv (the directory's
// files would come from two runs).
func TestPerPathIsAskedFor(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	out := filepath.Join(t.TempDir(), "res")
	if code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "100", "--out", out); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(out, "paths.csv")); err == nil {
		t.Error("paths.csv written without --per-path")
	}
	if code, _, _ := call(t, context.Background(), "simulate", "--model", m, "--paths", "100", "--per-path"); code != exitUsage {
		t.Errorf("--per-path without --out: exit %d, want %d", code, exitUsage)
	}
	if code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "100", "--out", out, "--per-path", "--force"); code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	before := mustRead(t, filepath.Join(out, "tails.json"))
	code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "100", "--seed", "5", "--out", out, "--force")
	if code == exitOK || !strings.Contains(stderr, "per-path") {
		t.Errorf("a run without --per-path over an earlier paths.csv: exit %d, %s", code, stderr)
	}
	if mustRead(t, filepath.Join(out, "tails.json")) != before {
		t.Error("the refused run replaced tails.json")
	}
}

// TestOutputDirectoryOneLevel: a missing output directory is made when its
// parent exists, and nothing is made when the parent is missing too (a
// typo rather than a tree to create): the run is refused before any work.
func TestOutputDirectoryOneLevel(t *testing.T) {
	t.Parallel()
	m := demoModel(t)
	dir := t.TempDir()
	code, _, stderr := call(t, context.Background(), "simulate", "--model", m, "--paths", "20",
		"--report", filepath.Join(dir, "typo", "deeper", "r.html"))
	if code != exitFailure || !strings.Contains(stderr, "nor that directory's parent exists") {
		t.Errorf("two missing levels: exit %d, stderr %q", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(dir, "typo")); err == nil {
		t.Error("a refused run made a directory")
	}
	code, _, stderr = call(t, context.Background(), "simulate", "--model", m, "--paths", "20",
		"--report", filepath.Join(dir, "reports", "r.html"))
	if _, err := os.Stat(filepath.Join(dir, "reports", "r.html")); code != 0 || err != nil {
		t.Errorf("one missing level: exit %d, %v, stderr %q", code, err, stderr)
	}
}

// TestReportStopsOnInterrupt: an interrupt while the report is being built
// (seconds for a million paths; the page builder does not look at the
// context) ends addReport at once, and nothing is left. A stand-in builder
// blocks until the test ends, so the interrupt is sure to come mid-build.
// Not parallel: it replaces writeReport.
func TestReportStopsOnInterrupt(t *testing.T) {
	m, err := model.Read(demoModel(t))
	if err != nil {
		t.Fatal(err)
	}
	res, err := stress.Run(context.Background(), &stress.Job{Model: m,
		Config: sim.Config{Paths: 200, Seed: 1, Bases: sim.BasesFor(model.Celsius)}})
	if err != nil {
		t.Fatal(err)
	}
	started, release := make(chan struct{}), make(chan struct{})
	defer close(release)
	saved := writeReport
	defer func() { writeReport = saved }()
	writeReport = func(w io.Writer, in *report.Input) error {
		close(started)
		<-release // a build that outlasts the interrupt
		return saved(w, in)
	}
	dir := t.TempDir()
	ctx, cancel := context.WithCancel(context.Background())
	plan := newOutputPlan(ctx, false)
	target := filepath.Join(dir, "r.html")
	if err := plan.check(target); err != nil {
		t.Fatal(err)
	}
	go func() {
		<-started
		cancel() // Ctrl-C mid-build
	}()
	errc := make(chan error, 1)
	go func() { errc <- addReport(plan, target, res, report.Meta{Title: "t"}) }()
	select {
	case err := <-errc:
		if !errors.Is(err, context.Canceled) {
			t.Fatalf("addReport after the interrupt: %v", err)
		}
	case <-time.After(30 * time.Second): // the build never ends: only the interrupt can
		t.Fatal("addReport waited for the build past the interrupt")
	}
	plan.abort()
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("left behind: %v", entries)
	}
}
