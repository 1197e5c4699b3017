package main

// Helpers the subcommands share: reading model files with their hashes,
// printing and writing fitted models, writing a simulation's output files
// and report, the progress bar. Each subcommand file parses its flags, runs
// the pipeline (package stress) and prints through these.

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"slices"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"

	"wxstress/internal/outputs"
	"wxstress/internal/render"
	"wxstress/internal/report"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

// emitFit prints the model summary or JSON, with the fit's warnings
// (render.FitWarnings) on stderr.
func emitFit(stdout, stderr io.Writer, m *model.File, format string, checks ...stress.ExtremeCheck) error {
	return emit(stdout, stderr, render.FitWarnings(m, checks), format, m.MarshalIndent, func() error { return render.FitSummaryWith(stdout, m, checks) })
}

// emitDemand prints the demand summary or JSON, with the fit's warnings on
// stderr.
func emitDemand(stdout, stderr io.Writer, m *model.Demand, format string, normals []sim.YearNormal) error {
	return emit(stdout, stderr, m.Warnings, format, m.MarshalIndent, func() error { return render.DemandSummaryWith(stdout, m, normals) })
}

// warn prints a warning on standard error, wrapped at 100 columns like
// every other note (one grep-able first line: "wxstress: warning: …").
func warn(stderr io.Writer, w string) {
	fmt.Fprintf(stderr, "%s\n", render.Wrap("wxstress: warning: "+w, "  "))
}

// emit prints a fitted model: its warnings on stderr, then its file's JSON
// or its summary.
func emit(stdout, stderr io.Writer, warnings []string, format string, marshal func() ([]byte, error), summary func() error) error {
	for _, w := range warnings {
		warn(stderr, w)
	}
	if format != "json" {
		return summary()
	}
	b, err := marshal()
	if err != nil {
		return err
	}
	_, err = stdout.Write(b)
	return err
}

// outputPlan is a command's output files. Each path is checked before any
// work (outputs.Check: not one of the inputs, not a link or a special file,
// not an existing file without --force), and the files are written into a
// staging directory and moved into place together at the end, or not at
// all: a failure or an interrupt leaves what was there before.
type outputPlan struct {
	ctx    context.Context // ends writing early when done; set by the command
	seen   map[string]bool // cleaned absolute paths checked so far
	inputs []string
	force  bool
	set    *outputs.Set
	made   []string // directories created for the outputs, removed on abort
}

func newOutputPlan(ctx context.Context, force bool, inputs ...string) *outputPlan {
	var in []string
	for _, p := range inputs {
		if p != "" {
			in = append(in, p)
		}
	}
	return &outputPlan{ctx: ctx, inputs: in, force: force, set: outputs.NewSet(""), seen: map[string]bool{}}
}

// check refuses, before any work, the output paths that may not be written.
func (p *outputPlan) check(paths ...string) error {
	for _, path := range paths {
		if path == "" {
			continue
		}
		if err := outputs.Check(path, p.inputs, p.force); err != nil {
			return err
		}
		// A missing directory is made, one level only: a path whose
		// directory's parent is missing too is more likely a typo than a
		// tree to create.
		if dir := filepath.Dir(path); !exists(dir) && !exists(filepath.Dir(dir)) {
			return &outputs.RefusedError{Path: path, Reason: fmt.Sprintf("neither its directory %s nor that directory's parent exists", dir)}
		}
		abs, err := filepath.Abs(path)
		if err != nil {
			return err
		}
		if p.seen[abs] {
			return &outputs.RefusedError{Path: path, Reason: "two outputs of this run would go there"}
		}
		p.seen[abs] = true
	}
	return nil
}

// checkDir checks a directory of outputs: the directory itself (an existing
// one must be a real directory) and each file in it.
func (p *outputPlan) checkDir(dir string, names ...string) error {
	if fi, err := os.Lstat(dir); err == nil && !fi.IsDir() {
		return &outputs.RefusedError{Path: dir, Reason: "it is not a directory"}
	}
	for _, n := range names {
		if err := p.check(filepath.Join(dir, n)); err != nil {
			return err
		}
	}
	return nil
}

// add stages one output file, making its directory when it does not exist.
func (p *outputPlan) add(path string, fill func(io.Writer) error) error {
	dir := filepath.Dir(path)
	if _, err := os.Stat(dir); errors.Is(err, fs.ErrNotExist) {
		if err := os.Mkdir(dir, 0o755); err != nil { // one level, as check allowed
			return err
		}
		p.made = append(p.made, dir)
	}
	return p.set.Add(path, func(w io.Writer) error { return fill(&ctxWriter{w: w, ctx: p.ctx}) })
}

// exists reports whether path names anything (a broken link counts).
func exists(path string) bool {
	_, err := os.Lstat(path)
	return err == nil
}

// ctxWriter fails its writes once ctx is done, so that writing a large
// output stops within a buffer of an interrupt.
type ctxWriter struct {
	w   io.Writer
	ctx context.Context
}

func (c *ctxWriter) Write(b []byte) (int, error) {
	if c.ctx != nil {
		if err := c.ctx.Err(); err != nil {
			return 0, err
		}
	}
	return c.w.Write(b)
}

// addModel stages a model file's JSON, when path is set.
func (p *outputPlan) addModel(path string, marshal func() ([]byte, error)) error {
	if path == "" {
		return nil
	}
	b, err := marshal()
	if err != nil {
		return err
	}
	return p.addBytes(path, b)
}

func (p *outputPlan) addBytes(path string, b []byte) error {
	return p.add(path, func(w io.Writer) error { _, err := w.Write(b); return err })
}

// commit moves every staged file into place.
func (p *outputPlan) commit(ctx context.Context) error {
	if err := p.set.Commit(ctx); err != nil {
		p.abort()
		return err
	}
	p.made = nil
	return nil
}

// abort drops the staged files and the directories made for them; it is
// safe to defer after commit.
func (p *outputPlan) abort() {
	p.set.Abort()
	for i := len(p.made) - 1; i >= 0; i-- {
		os.Remove(p.made[i]) // only if empty
	}
	p.made = nil
}

func (p *outputPlan) runID() string { return p.set.RunID() }

// runPipeline runs the job and returns as soon as ctx is cancelled (Ctrl-C,
// SIGTERM), whether or not the computation has reached a point where it
// checks: the command then exits with nothing written, and the process's
// exit ends the abandoned work.
func runPipeline(ctx context.Context, job *stress.Job) (*stress.Result, error) {
	type outcome struct {
		res *stress.Result
		err error
	}
	done := make(chan outcome, 1)
	go func() {
		res, err := stress.Run(ctx, job)
		done <- outcome{res, err}
	}()
	select {
	case o := <-done:
		return o.res, o.err
	case <-ctx.Done():
		return nil, ctx.Err()
	}
}

// interruptible runs f (a read of a large file, a fit) and returns early
// with ctx's error when ctx is cancelled, as runPipeline does.
func interruptible[T any](ctx context.Context, f func() (T, error)) (T, error) {
	type outcome struct {
		v   T
		err error
	}
	done := make(chan outcome, 1)
	go func() {
		v, err := f()
		done <- outcome{v, err}
	}()
	select {
	case o := <-done:
		return o.v, o.err
	case <-ctx.Done():
		var zero T
		return zero, ctx.Err()
	}
}

// readDemandModel reads a demand model file and returns its SHA-256.
func readDemandModel(path string) (*model.Demand, string, error) {
	return readHashed(path, model.DecodeDemand)
}

// readModel reads and validates a model file and returns its SHA-256.
func readModel(path string) (*model.File, string, error) {
	return readHashed(path, model.Decode)
}

// readHashed reads path, decodes it, and returns the hex SHA-256 of its bytes
// for the manifest.
func readHashed[T any](path string, decode func([]byte, string) (*T, error)) (*T, string, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, "", err
	}
	v, err := decode(b, path)
	if err != nil {
		return nil, "", err
	}
	h := sha256.Sum256(b)
	return v, hex.EncodeToString(h[:]), nil
}

func manifest(m *model.File, modelPath, sum string, res *sim.Result) render.Manifest {
	c := res.Config
	var dates []render.PeriodDates
	for _, p := range res.Periods {
		dates = append(dates, render.PeriodDates{Name: p.Name, From: p.From, To: p.To})
	}
	return render.Manifest{PeriodDates: dates,
		Tool: "wxstress", ToolVersion: version, ModelFile: filepath.Base(modelPath), ModelSHA256: sum,
		DataSHA256: m.Data.SHA256, Seed: c.Seed, Paths: c.Paths, Year: c.Year, Start: c.Start, Periods: c.Periods, SimulatedDays: res.SimulatedDays,
		Units: m.Data.Units, HDDBase: c.Bases.HDD, CDDBase: c.Bases.CDD, ColdBelow: c.Bases.ColdBelow,
		Shocks: m.Shocks.Family, Quantiles: render.QuantileConvention, Caution: render.Caution, Capacity: c.Capacity,
		SnapDays: c.SnapDays, DemandGrowth: c.Growth,
	}
}

// simFiles are the files a simulation writes into its --out directory, and
// pathsFile the per-path file it adds on request (--per-path).
var simFiles = []string{"tails.json", "tails.csv"}

const pathsFile = "paths.csv"

// outFiles lists the files of an --out directory.
func outFiles(perPath bool) []string {
	if perPath {
		return append(slices.Clone(simFiles), pathsFile)
	}
	return simFiles
}

// addSimDir stages the tail tables and, with perPath, the per-path
// aggregates in dir.
func addSimDir(p *outputPlan, dir string, rep *render.SimReport, res *sim.Result, perPath bool) error {
	fills := map[string]func(io.Writer) error{
		"tails.json": func(w io.Writer) error { return render.SimJSON(w, rep) },
		"tails.csv":  func(w io.Writer) error { return render.SimCSV(w, rep) },
		pathsFile:    func(w io.Writer) error { return render.PathsCSV(w, res, rep.Hedge) },
	}
	for _, name := range outFiles(perPath) {
		if err := p.add(filepath.Join(dir, name), fills[name]); err != nil {
			return err
		}
	}
	return nil
}

// attachProgress shows a progress bar on stderr for work of more than about
// a second (runs simulations of cfg.Paths), when stderr is a terminal; it
// returns the function that clears it.
func attachProgress(cfg *sim.Config, stderr io.Writer, runs int) func() {
	f, ok := stderr.(*os.File)
	if !ok || !term.IsTerminal(int(f.Fd())) || cfg.Paths*runs < 200_000 {
		return func() {}
	}
	bar := progressbar.NewOptions(cfg.Paths*runs, progressbar.OptionSetWriter(f), progressbar.OptionSetDescription("simulating"),
		progressbar.OptionShowCount(), progressbar.OptionThrottle(100_000_000), progressbar.OptionClearOnFinish())
	cfg.Progress = func(n int) { bar.Add(n) }
	return func() { bar.Finish() }
}

// bytesSHA returns the hex SHA-256 of b.
func bytesSHA(b []byte) string {
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// fileSHA returns the hex SHA-256 of a file, or "" when it cannot be read.
func fileSHA(path string) string {
	b, err := os.ReadFile(path)
	if err != nil {
		return ""
	}
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// addReport stages the HTML report of a run.
// writeReport builds a report page (report.Write; a test may stand in a
// slow one).
var writeReport = report.Write

func addReport(p *outputPlan, path string, res *stress.Result, meta report.Meta) error {
	return p.add(path, func(w io.Writer) error {
		// The page's figures take seconds for a million paths and do not
		// look at the context: build it aside, so that an interrupt ends
		// the run at once (the abandoned build dies with the process).
		type page struct {
			b   []byte
			err error
		}
		ctx := p.ctx
		if ctx == nil {
			ctx = context.Background()
		}
		if err := ctx.Err(); err != nil {
			return err
		}
		done := make(chan page, 1)
		go func() {
			defer func() { // a failure here must still let the run clean up its staging
				if r := recover(); r != nil {
					done <- page{nil, fmt.Errorf("building the report failed: %v", r)}
				}
			}()
			var b bytes.Buffer
			err := writeReport(&b, report.New(res, meta))
			done <- page{b.Bytes(), err}
		}()
		select {
		case pg := <-done:
			if pg.err != nil {
				return pg.err
			}
			_, err := w.Write(pg.b)
			return err
		case <-ctx.Done():
			return ctx.Err()
		}
	})
}
