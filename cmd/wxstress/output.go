package main

// Helpers the subcommands share: reading model files with their hashes,
// printing and writing fitted models, writing a simulation's output files
// and report, the progress bar. Each subcommand file parses its flags, runs
// the pipeline (package stress) and prints through these.

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"

	"wxstress/internal/atomicfile"
	"wxstress/internal/render"
	"wxstress/internal/report"
	"wxstress/model"
	"wxstress/sim"
	"wxstress/stress"
)

// emitFit prints the model summary or JSON and writes the model file.
func emitFit(stdout, stderr io.Writer, m *model.File, format, out string) error {
	for _, w := range m.Data.Warnings {
		fmt.Fprintf(stderr, "wxstress: warning: %s\n", w)
	}
	if out != "" {
		if err := m.Write(out); err != nil {
			return err
		}
	}
	if format == "json" {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(m)
	}
	if err := render.FitSummary(stdout, m); err != nil {
		return err
	}
	if out != "" {
		fmt.Fprintf(stdout, "\nModel written to %s\n", out)
	}
	return nil
}

// emitDemand prints the demand summary or JSON and writes the model file.
func emitDemand(stdout, stderr io.Writer, m *model.Demand, format, out string) error {
	for _, w := range m.Warnings {
		fmt.Fprintf(stderr, "wxstress: warning: %s\n", w)
	}
	if out != "" {
		if err := m.Write(out); err != nil {
			return err
		}
	}
	if format == "json" {
		b, err := m.MarshalIndent()
		if err != nil {
			return err
		}
		_, err = stdout.Write(b)
		return err
	}
	if err := render.DemandSummary(stdout, m); err != nil {
		return err
	}
	if out != "" {
		fmt.Fprintf(stdout, "\nDemand model written to %s\n", out)
	}
	return nil
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
	return render.Manifest{
		Tool: "wxstress", ToolVersion: version, ModelFile: filepath.Base(modelPath), ModelSHA256: sum,
		DataSHA256: m.Data.SHA256, Seed: c.Seed, Paths: c.Paths, Year: c.Year, Start: c.Start, Periods: c.Periods, SimulatedDays: res.SimulatedDays,
		Units: m.Data.Units, HDDBase: c.Bases.HDD, CDDBase: c.Bases.CDD, ColdBelow: c.Bases.ColdBelow,
		Shocks: m.Shocks.Family, Quantiles: render.QuantileConvention, Caution: render.Caution, Capacity: c.Capacity,
	}
}

// writeSimDir writes the tail tables and per-path aggregates into dir, each
// file atomically.
func writeSimDir(dir string, rep *render.SimReport, res *sim.Result) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	files := []struct {
		name string
		fill func(io.Writer) error
	}{
		{"tails.json", func(w io.Writer) error { return render.SimJSON(w, rep) }},
		{"tails.csv", func(w io.Writer) error { return render.SimCSV(w, rep) }},
		{"paths.csv", func(w io.Writer) error { return render.PathsCSV(w, res) }},
	}
	for _, f := range files {
		if err := atomicfile.Write(filepath.Join(dir, f.name), f.fill); err != nil {
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

// fileSHA returns the hex SHA-256 of a file, or "" when it cannot be read.
func fileSHA(path string) string {
	b, err := os.ReadFile(path)
	if err != nil {
		return ""
	}
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// writeReport renders the HTML report of a run into path, atomically.
func writeReport(path string, res *stress.Result, meta report.Meta) error {
	return atomicfile.Write(path, func(w io.Writer) error { return report.Write(w, report.New(res, meta)) })
}
