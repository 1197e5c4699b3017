package report

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"image/png"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"golang.org/x/net/html"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/demo"
	"wxstress/internal/render"
	"wxstress/model"
	"wxstress/scenarios"
	"wxstress/sim"
	"wxstress/stress"
)

var update = flag.Bool("update", false, "rewrite testdata/manifest.golden.html and docs/report.png")

// testCapacity is an invented daily capacity for the demo retailer, in its
// demand unit (GJ/day).
const testCapacity = 120000

// fixture describes a run on the embedded demo data: paths 0 only fits the
// temperature model; otherwise the demand history is fitted too and the
// baseline and the scenarios are simulated with demand, keeping fanPaths
// paths whole, with the weather-normalized history.
type fixture struct {
	paths, fanPaths int
	scenarios       []string
}

// runDemo runs the fixture's job through the pipeline, as "wxstress demo"
// does.
func runDemo(fx fixture) (*stress.Result, error) {
	temps, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile, calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		return nil, err
	}
	job := &stress.Job{Temps: temps, Fit: &calibrate.Settings{}, ToolVersion: "0.0.0-test"}
	if fx.paths > 0 {
		if job.DemandHistory, err = calibrate.ReadDemand(bytes.NewReader(demo.Demand()), demo.DemandFile,
			calibrate.DemandReadOptions{}); err != nil {
			return nil, err
		}
		job.DemandFit = &calibrate.DemandSettings{Form: "auto", Unit: demo.DemandUnit}
		job.Config = sim.Config{Paths: fx.paths, Seed: 1, Workers: 2, Bases: sim.BasesFor(model.Celsius), Capacity: testCapacity}
		job.Thresholds = []sim.Threshold{{Index: sim.HDD, Period: "year", Value: 3300}, {Index: sim.Coldest, Value: -15}}
		job.Detail, job.Normals = fx.fanPaths, true
		for _, name := range fx.scenarios {
			sc, err := scenarios.Lookup(name)
			if err != nil {
				return nil, err
			}
			job.Scenarios = append(job.Scenarios, sc)
		}
	}
	res, err := stress.Run(context.Background(), job)
	if err != nil {
		return nil, err
	}
	res.Model.Data.Description = demo.StationName + " (invented demonstration data)"
	return res, nil
}

// demoFit is the temperature fit of the embedded demo station alone, shared
// by the tests (read-only).
var demoFit = sync.OnceValues(func() (*stress.Result, error) { return runDemo(fixture{}) })

// Inputs shared by the tests: a small one (a few hundred paths, two
// scenarios) and one the size of what "wxstress demo" makes.
var (
	smallInput = sync.OnceValues(func() (*Input, error) {
		return buildInput(fixture{paths: 400, fanPaths: 200, scenarios: []string{"warm-1c", "cold-spell-10d"}})
	})
	demoInput = sync.OnceValues(func() (*Input, error) {
		return buildInput(fixture{paths: 10000, fanPaths: 2000,
			scenarios: []string{"warm-1c", "trend-2050", "volatile-winter", "cold-spell-10d"}})
	})
)

func mustInput(t *testing.T, f func() (*Input, error)) *Input {
	t.Helper()
	in, err := f()
	if err != nil {
		t.Fatal(err)
	}
	return in
}

// buildInput runs the fixture through the pipeline and lays the result out
// with New, with the manifest and input files a command would give.
func buildInput(fx fixture) (*Input, error) {
	res, err := runDemo(fx)
	if err != nil {
		return nil, err
	}
	m, c := res.Model, res.Set.Base.Config
	meta := Meta{
		Title:   "wxstress demo: " + demo.StationName,
		Created: time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC),
		RunTime: 1500 * time.Millisecond,
		Inputs: []InputFile{{Role: "temperatures", Name: demo.StationFile, SHA256: res.Fit.Series.SHA256},
			{Role: "demand", Name: demo.DemandFile, SHA256: res.Demand.Data.DemandSHA256}},
		Manifest: render.Manifest{Tool: "wxstress", ToolVersion: "0.0.0-test", ModelFile: "kestrel_model.json",
			ModelSHA256: strings.Repeat("ab", 32), DataSHA256: m.Data.SHA256, Seed: c.Seed, Paths: c.Paths, Year: c.Year,
			Start: c.Start, Periods: c.Periods, SimulatedDays: res.Set.Base.SimulatedDays, Units: m.Data.Units,
			HDDBase: c.Bases.HDD, CDDBase: c.Bases.CDD, ColdBelow: c.Bases.ColdBelow, Shocks: m.Shocks.Family,
			Scenarios: fx.scenarios, DemandModel: "demand.json", DemandSHA256: strings.Repeat("cd", 32),
			Capacity: c.Capacity, Quantiles: render.QuantileConvention, Caution: render.Caution},
		Retailer: demo.Retailer,
	}
	return New(res, meta), nil
}

func renderReport(t *testing.T, in *Input) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := Write(&b, in); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func parse(t *testing.T, page []byte) *html.Node {
	t.Helper()
	doc, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		t.Fatalf("report does not parse as HTML: %v", err)
	}
	return doc
}

func walk(n *html.Node, f func(*html.Node)) {
	f(n)
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		walk(c, f)
	}
}

func attr(n *html.Node, key string) (string, bool) {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val, true
		}
	}
	return "", false
}

// expectedPlots counts the plots the input implies: one per plot the report
// promises, leaving out indices whose simulated values are all equal.
func expectedPlots(in *Input) int {
	n := 0
	if in.Series != nil {
		n += 1 + 1 // record, shock histogram
	}
	if in.Model != nil {
		n += 2 // seasonal cycle, σ by month
		if dg := in.Model.Diagnostics; dg != nil {
			n += 2 + 1 // ACF, PACF, QQ
		}
	}
	if in.Fan != nil {
		n++
	}
	if in.Demand != nil {
		n++ // load against temperature
	}
	if in.Fan != nil && in.Fan.DemandQ != nil {
		n++ // daily demand fan
	}
	if in.Sim != nil && in.Sim.Planning != nil && in.Sim.Planning.LoadDuration != nil {
		n++ // load-duration curve
	}
	varies := func(res *sim.Result, r sim.Row) bool {
		for _, a := range res.Aggregates {
			if a.Index == r.Index && a.Period.Name == r.Period {
				return slices.Min(a.Values) < slices.Max(a.Values)
			}
		}
		return false
	}
	if in.Sim != nil && in.Base != nil {
		first := in.Sim.Rows[0].Period
		for _, r := range in.Sim.Rows {
			if !varies(in.Base, r) {
				continue
			}
			n++ // histogram
			if r.Index == sim.PeakDay {
				continue // a date: no exceedance curve
			}
			n++ // exceedance curve
			if len(in.Sim.Scenarios) > 0 && (r.Period == first || r.Info.Key == "hdd" || r.Info.Key == "cdd") {
				n++ // overlaid exceedance curves
			}
		}
	}
	return n
}

func TestReportIsSelfContainedHTML(t *testing.T) {
	t.Parallel()
	in := mustInput(t, smallInput)
	page := renderReport(t, in)
	doc := parse(t, page)
	svgs, figures := 0, 0
	walk(doc, func(n *html.Node) {
		if n.Type != html.ElementNode {
			return
		}
		switch n.Data {
		case "svg":
			svgs++
		case "figure":
			figures++
		case "script", "link", "img", "iframe", "object", "embed", "base":
			t.Errorf("report has a <%s> element", n.Data)
		case "style":
			if css := n.FirstChild; css != nil && (strings.Contains(css.Data, "url(") || strings.Contains(css.Data, "@import")) {
				t.Errorf("stylesheet refers to an external resource")
			}
		}
		for _, a := range n.Attr {
			v := strings.ToLower(a.Val)
			switch {
			case a.Key == "src" || a.Key == "xlink:href" || strings.HasPrefix(a.Key, "xmlns"):
				t.Errorf("<%s> has attribute %s=%q", n.Data, a.Key, a.Val)
			case a.Key == "href" && !strings.HasPrefix(a.Val, "#"):
				t.Errorf("<%s> links outside the page: href=%q", n.Data, a.Val)
			case strings.Contains(v, "http") || strings.Contains(v, "url(") || strings.Contains(v, "//"):
				t.Errorf("<%s> attribute %s=%q names a URL", n.Data, a.Key, a.Val)
			}
		}
	})
	for _, s := range []string{"http:", "https:", "<?xml", "<!DOCTYPE svg"} {
		if bytes.Contains(page, []byte(s)) {
			t.Errorf("report contains %q", s)
		}
	}
	want := expectedPlots(in)
	if svgs != want {
		t.Errorf("report has %d <svg> plots, the input implies %d", svgs, want)
	}
	if figures != svgs {
		t.Errorf("%d figures for %d plots: every plot should be one figure", figures, svgs)
	}
	const minPlots = 10 // what scripts rely on for the demo report
	if svgs < minPlots {
		t.Errorf("report has %d plots, want at least %d", svgs, minPlots)
	}
	ids := map[string]bool{}
	walk(doc, func(n *html.Node) {
		if id, ok := attr(n, "id"); ok && n.Type == html.ElementNode {
			if ids[id] {
				t.Errorf("duplicate id %q", id)
			}
			ids[id] = true
		}
	})
	walk(doc, func(n *html.Node) {
		if href, ok := attr(n, "href"); ok && !ids[strings.TrimPrefix(href, "#")] {
			t.Errorf("link %q has no target", href)
		}
	})
	for _, id := range []string{"data", "fit", "simulation", "scenarios", "demand", "manifest"} {
		if !ids[id] {
			t.Errorf("section %q missing", id)
		}
	}
}

// jsonIndex finds the JSON row of an index and period.
func jsonIndex(rows []any, key, period string) map[string]any {
	for _, r := range rows {
		m := r.(map[string]any)
		if m["key"] == key && m["period"] == period {
			return m
		}
	}
	return nil
}

var quantileStat = regexp.MustCompile(`^p(\d\d)$`)

// jsonValue returns the JSON number that a report cell of statistic stat
// shows.
func jsonValue(row map[string]any, stat string) (float64, bool) {
	get := func(m any, k string) (float64, bool) {
		mm, ok := m.(map[string]any)
		if !ok {
			return 0, false
		}
		v, ok := mm[k].(float64)
		return v, ok
	}
	switch {
	case slices.Contains([]string{"mean", "sd", "mean_se", "var95", "var99", "es95", "es99"}, stat):
		return get(row, stat)
	case quantileStat.MatchString(stat):
		return get(row["quantiles"], "0."+stat[1:])
	case strings.HasPrefix(stat, "rl"):
		return get(row["return_levels"], stat[2:])
	case strings.HasPrefix(stat, "change_"):
		return get(row["change_vs_baseline"], strings.TrimPrefix(stat, "change_"))
	case strings.HasPrefix(stat, "exceed:"), strings.HasPrefix(stat, "exceed_se:"):
		kind, th, _ := strings.Cut(stat, ":")
		x, err := strconv.ParseFloat(th, 64)
		if err != nil {
			return 0, false
		}
		list, _ := row["exceedance"].([]any)
		for _, e := range list {
			if v, _ := get(e, "threshold"); v == x {
				if kind == "exceed" {
					return get(e, "probability")
				}
				return get(e, "se")
			}
		}
	}
	return 0, false
}

func text(n *html.Node) string {
	var b strings.Builder
	walk(n, func(c *html.Node) {
		if c.Type == html.TextNode {
			b.WriteString(c.Data)
		}
	})
	return b.String()
}

// roundedText is v at d decimals, with "-0.0" read as "0.0".
func roundedText(v float64, d int) string {
	s := strconv.FormatFloat(v, 'f', d, 64)
	if strings.Trim(s, "-0.") == "" {
		return strings.TrimPrefix(s, "-")
	}
	return s
}

func TestReportNumbersMatchJSON(t *testing.T) {
	t.Parallel()
	in := mustInput(t, smallInput)
	page := renderReport(t, in)
	doc := parse(t, page)
	var js bytes.Buffer
	if err := render.SimJSON(&js, in.Sim); err != nil {
		t.Fatal(err)
	}
	var out struct {
		Indices   []any `json:"indices"`
		Scenarios []struct {
			Name    string `json:"name"`
			Indices []any  `json:"indices"`
		} `json:"scenarios"`
		Planning struct {
			LoadDuration []struct {
				Rank      int                `json:"rank"`
				Quantiles map[string]float64 `json:"quantiles"`
			} `json:"load_duration"`
			Normals []map[string]float64 `json:"weather_normalized"`
		} `json:"planning"`
	}
	if err := json.Unmarshal(js.Bytes(), &out); err != nil {
		t.Fatal(err)
	}
	rowsOf := map[string][]any{"baseline": out.Indices}
	for _, s := range out.Scenarios {
		rowsOf[s.Name] = s.Indices
	}
	cells := 0
	seen := map[string]bool{} // scenario/period/index/statistic
	walk(doc, func(n *html.Node) {
		stat, ok := attr(n, "data-stat")
		if !ok {
			return
		}
		scen, _ := attr(n, "data-scen")
		period, _ := attr(n, "data-period")
		index, _ := attr(n, "data-index")
		cell := strings.TrimSpace(text(n))
		var want float64
		ok = false
		switch index {
		case "load-duration": // statistic rankN:pQQ, as in the CSV
			var rank, pct int
			if _, err := fmt.Sscanf(stat, "rank%d:p%d", &rank, &pct); err == nil {
				for _, r := range out.Planning.LoadDuration {
					if r.Rank == rank {
						want, ok = r.Quantiles[fmt.Sprintf("%.2f", float64(pct)/100)]
					}
				}
			}
		case "history": // period is the year
			for _, y := range out.Planning.Normals {
				if strconv.Itoa(int(y["year"])) == period {
					want, ok = y[stat]
				}
			}
		default:
			row := jsonIndex(rowsOf[scen], index, period)
			if row == nil {
				t.Errorf("cell %s/%s/%s/%s: no such row in the JSON", scen, period, index, stat)
				return
			}
			want, ok = jsonValue(row, stat)
		}
		if !ok {
			t.Errorf("cell %s/%s/%s/%s: no such statistic in the JSON", scen, period, index, stat)
			return
		}
		got, err := strconv.ParseFloat(strings.ReplaceAll(cell, ",", ""), 64) // thousands separators
		if err != nil {
			t.Errorf("cell %s/%s/%s/%s = %q is not a number", scen, period, index, stat, cell)
			return
		}
		decimals := 0
		if _, frac, ok := strings.Cut(cell, "."); ok {
			decimals = len(frac)
		}
		if g, w := roundedText(got, decimals), roundedText(want, decimals); g != w {
			t.Errorf("cell %s/%s/%s/%s = %s, JSON has %v (%s at %d decimals)", scen, period, index, stat, cell, want, w, decimals)
		}
		cells++
		seen[scen+"/"+period+"/"+index+"/"+stat] = true
	})
	// Every statistic of every baseline row, and the compared statistics of
	// every scenario row, must have a cell.
	need := func(scen string, r sim.Row, stats ...string) {
		for _, s := range stats {
			if !seen[scen+"/"+r.Period+"/"+r.Info.Key+"/"+s] {
				t.Errorf("no cell for %s/%s/%s/%s", scen, r.Period, r.Info.Key, s)
			}
		}
	}
	all := []string{"mean", "sd", "mean_se", "p01", "p05", "p10", "p25", "p50", "p75", "p90", "p95", "p99",
		"var95", "es95", "var99", "es99", "rl2", "rl5", "rl10", "rl20", "rl50", "rl100"}
	for _, r := range in.Sim.Rows {
		if r.Index == sim.PeakDay {
			// A date: its median and month shares, in words, not a column.
			if !strings.Contains(string(page), render.DatesText(r)) {
				t.Errorf("the report lacks %q", render.DatesText(r))
			}
			continue
		}
		need("baseline", r, all...)
		for _, e := range r.Tail.Exceedances {
			th := strconv.FormatFloat(e.Threshold, 'g', -1, 64)
			need("baseline", r, "exceed:"+th, "exceed_se:"+th)
		}
	}
	for _, sc := range in.Sim.Scenarios {
		for _, r := range sc.Rows {
			if r.Index == sim.PeakDay {
				continue // a date: not compared
			}
			need(sc.Name, r, "mean", "p50", "var95", "var99", "es95", "change_mean", "change_mean_se")
		}
	}
	p := in.Sim.Planning
	if p == nil || len(p.LoadDuration) == 0 || len(p.Normals) == 0 {
		t.Fatal("the fixture has no planning tables to check")
	}
	for _, rank := range render.LoadDurationRanks() {
		if rank <= len(p.LoadDuration[0]) {
			need("baseline", sim.Row{Period: "year", Info: sim.Info{Key: "load-duration"}},
				fmt.Sprintf("rank%d:p05", rank), fmt.Sprintf("rank%d:p50", rank), fmt.Sprintf("rank%d:p95", rank))
		}
	}
	for _, y := range p.Normals {
		need("baseline", sim.Row{Period: strconv.Itoa(y.Year), Info: sim.Info{Key: "history"}},
			"actual", "model_at_actual_weather", "model_at_normal_weather", "weather_normalized")
	}
	if cells == 0 {
		t.Fatal("no number cells found")
	}
}

// goldenInput is a fixed input without any fitting or simulation, so that
// the manifest section only changes when the report's code does.
func goldenInput() *Input {
	m := &model.File{
		Schema: model.Schema, SchemaVersion: model.SchemaVersion, ToolVersion: "1.2.3",
		Data: model.Data{File: "kestrel_bay_daily.csv", SHA256: strings.Repeat("0f", 32),
			FirstDate: calendar.FromYMD(1955, 1, 1), LastDate: calendar.FromYMD(2025, 12, 31), Units: "C",
			MeanFrom: "column tavg", Days: 25933, Missing: 15, LongestGap: 3,
			Description: "Kestrel Bay Airfield (invented demonstration data)"},
		Trend: model.Trend{Kind: "linear", Epoch: calendar.Epoch, Intercept: 10.25, SlopePerYear: 0.021,
			Estimate: model.TrendEstimate{PerDecade: 0.21, SEOLS: 0.01, SEAdjusted: 0.025}, Rule: "linear trend requested"},
		Seasonal: model.Seasonal{PeriodDays: 365.25, PeakDayOfYear: 205.4, TroughDayOfYear: 22.8, R2: 0.8123,
			Harmonics: []model.Harmonic{{K: 1, Cos: -10.5, Sin: -3.3, Amplitude: 11.006, Phase: -1.8750, PeakDayOfYear: 205.4}}},
		AR:         model.AR{Phi: []float64{0.7321}, PhiSE: []float64{0.0042}, Last: []float64{1.5}},
		Volatility: model.Volatility{Kind: "monthly"},
		Shocks:     model.Shocks{Family: model.FamilySkewT, DF: 10.49, Skew: 0.85},
	}
	for k := range 12 {
		s := 2.4 + 0.6*math.Cos(2*math.Pi*float64(k)/12)
		m.Volatility.Monthly[k] = s
		m.Volatility.Band[k] = [2]float64{0.95 * s, 1.05 * s}
		m.Volatility.Count[k] = 2100
	}
	return &Input{
		Title:   "Kestrel Bay Airfield, golden manifest",
		Created: time.Date(2026, 12, 1, 9, 30, 0, 0, time.UTC),
		RunTime: 2345 * time.Millisecond,
		Inputs: []InputFile{{Role: "temperatures", Name: "kestrel_bay_daily.csv", SHA256: strings.Repeat("0f", 32)},
			{Role: "scenario", Name: "cold_spell.toml", SHA256: strings.Repeat("c4", 32)}},
		Model: m,
		Sim: &render.SimReport{Manifest: render.Manifest{Tool: "wxstress", ToolVersion: "1.2.3", ModelFile: "model.json",
			ModelSHA256: strings.Repeat("9e", 32), DataSHA256: strings.Repeat("0f", 32), Seed: 7, Paths: 10000,
			Year: 2026, Start: "climate", Periods: []string{"year", "heating", "cooling"}, SimulatedDays: 457,
			Units: "C", HDDBase: 18, CDDBase: 18, ColdBelow: 0, Shocks: "skew-t",
			Scenarios: []string{"warm-1c", "cold_spell.toml"}, DemandModel: "demand.json",
			DemandSHA256: strings.Repeat("d1", 32), Capacity: 120000, Quantiles: render.QuantileConvention, Caution: render.Caution}},
	}
}

// section returns the HTML of the top-level section with the given id.
func section(t *testing.T, page []byte, id string) string {
	t.Helper()
	s := string(page)
	start := strings.Index(s, `<section class="top" id="`+id+`">`)
	if start < 0 {
		t.Fatalf("no section %q", id)
	}
	end := strings.Index(s[start:], "</section>")
	if end < 0 {
		t.Fatalf("section %q is not closed", id)
	}
	return s[start:start+end+len("</section>")] + "\n"
}

func TestManifestGolden(t *testing.T) {
	t.Parallel()
	got := section(t, renderReport(t, goldenInput()), "manifest")
	path := filepath.Join("testdata", "manifest.golden.html")
	if *update {
		if err := os.MkdirAll("testdata", 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./internal/report -run TestManifestGolden -update)", err)
	}
	if got != string(want) {
		t.Errorf("manifest section differs from %s (regenerate with -update if the change is meant):\n%s", path,
			firstDiff(string(want), got))
	}
}

// firstDiff shows the first differing line of two texts.
func firstDiff(want, got string) string {
	w, g := strings.Split(want, "\n"), strings.Split(got, "\n")
	for i := range max(len(w), len(g)) {
		var a, b string
		if i < len(w) {
			a = w[i]
		}
		if i < len(g) {
			b = g[i]
		}
		if a != b {
			return fmt.Sprintf("line %d:\nwant %q\ngot  %q", i+1, a, b)
		}
	}
	return ""
}

func TestManifestShowsTheRun(t *testing.T) {
	t.Parallel()
	in := goldenInput()
	in.Sim.Manifest.RunID = "20261201T093000Z-0badc0de" // the run id of the tails files written beside the page
	doc := parse(t, []byte(section(t, renderReport(t, in), "manifest")))
	txt := text(doc)
	for _, want := range []string{"20261201T093000Z-0badc0de", "wxstress 1.2.3", "2026-12-01 09:30:00 UTC", "2.345s", in.Sim.Manifest.ModelSHA256,
		in.Inputs[1].SHA256, "cold_spell.toml", "10000", "2026", "year, heating, cooling", "HDD 18 °C",
		"warm-1c, cold_spell.toml", render.QuantileConvention, "φ1 = 0.7321", "ν = 10.49, ξ = 0.850", "demand.json",
		in.Sim.Manifest.DemandSHA256, "120,000"} {
		if !strings.Contains(txt, want) {
			t.Errorf("manifest lacks %q", want)
		}
	}
}

// normalize collapses runs of white space, as a browser shows text.
func normalize(s string) string { return strings.Join(strings.Fields(s), " ") }

func TestCautionsAppearInText(t *testing.T) {
	t.Parallel()
	for name, in := range map[string]*Input{"demo": mustInput(t, smallInput), "golden": goldenInput(),
		"fit only": {Model: goldenInput().Model}} {
		doc := parse(t, renderReport(t, in))
		var body *html.Node
		walk(doc, func(n *html.Node) {
			if n.Type == html.ElementNode && n.Data == "body" {
				body = n
			}
		})
		txt := normalize(text(body))
		caution := normalize(render.Caution)
		if c := strings.Count(txt, caution); c < 2 {
			t.Errorf("%s: the caution appears %d times, want it at the top and in the manifest", name, c)
		}
		first := strings.Index(txt, caution)
		if sec := strings.Index(txt, "1. Data"); first < 0 || sec < 0 || first > sec {
			t.Errorf("%s: the caution is not near the top (at %d, first section at %d)", name, first, sec)
		}
		for _, want := range []string{"not forecasts", "planning standards", "licensed professional judgement"} {
			if !strings.Contains(txt, want) {
				t.Errorf("%s: text lacks %q", name, want)
			}
		}
	}
}

func TestFitOnlyReportLeavesOutTheSimulation(t *testing.T) {
	t.Parallel()
	fit, err := demoFit()
	if err != nil {
		t.Fatal(err)
	}
	in := New(fit, Meta{Title: `Fit <only> & "quoted"`})
	page := renderReport(t, in)
	doc := parse(t, page)
	var sections []string
	svgs := 0
	walk(doc, func(n *html.Node) {
		if n.Type == html.ElementNode && n.Data == "section" {
			id, _ := attr(n, "id")
			sections = append(sections, id)
		}
		if n.Type == html.ElementNode && n.Data == "svg" {
			svgs++
		}
	})
	if want := []string{"data", "fit", "manifest"}; !slices.Equal(sections, want) {
		t.Errorf("sections %v, want %v", sections, want)
	}
	if want := expectedPlots(in); svgs != want {
		t.Errorf("%d plots, want %d", svgs, want)
	}
	if !bytes.Contains(page, []byte("Fit &lt;only&gt; &amp; &#34;quoted&#34;")) || bytes.Contains(page, []byte("<only>")) {
		t.Error("the title is not escaped")
	}
}

// TestTextOfTheInputIsEscaped puts markup into every kind of text a user
// controls (title, file names, scenario names and descriptions, warnings):
// html/template must show it as text, never as elements or attributes.
func TestTextOfTheInputIsEscaped(t *testing.T) {
	t.Parallel()
	const evil = `<script>alert("x")</script><img src=x onerror=alert(1)>'&`
	in := goldenInput()
	in.Title = "title " + evil
	in.Inputs = append(in.Inputs, InputFile{Role: "scenario", Name: `a"><img src=x>.toml`, SHA256: evil})
	in.Model.Data.Warnings = []string{"warning " + evil}
	in.Sim.Scenarios = []render.ScenarioReport{{Name: "scenario " + evil, Description: "description " + evil,
		What: []string{"what " + evil}}}
	page := renderReport(t, in)
	doc := parse(t, page)
	walk(doc, func(n *html.Node) {
		if n.Type == html.ElementNode && (n.Data == "script" || n.Data == "img") {
			t.Errorf("text of the input became a <%s> element", n.Data)
		}
		for _, a := range n.Attr {
			if a.Key == "onerror" || a.Key == "src" {
				t.Errorf("text of the input became an attribute %s=%q", a.Key, a.Val)
			}
		}
	})
	txt := text(doc)
	for _, want := range []string{"title " + evil, "warning " + evil, "scenario " + evil, "description " + evil,
		"what " + evil, `a"><img src=x>.toml`} {
		if !strings.Contains(txt, want) {
			t.Errorf("page text lacks %q", want)
		}
	}
}

func TestDemandRowsAreTold(t *testing.T) {
	t.Parallel()
	for _, c := range []struct {
		row  sim.Row
		want bool
	}{
		{sim.Row{Index: sim.HDD, Unit: "°C·day", Info: sim.HDD.Info()}, false},
		{sim.Row{Index: sim.ColdSpell, Unit: "days", Info: sim.ColdSpell.Info()}, false},
		{sim.Row{Index: sim.Coldest, Unit: "°F", Info: sim.Coldest.Info()}, false},
		{sim.Row{Index: sim.OverCapacity, Unit: "days", Info: sim.OverCapacity.Info()}, true}, // days, but of demand
		{sim.Row{Index: sim.Energy, Unit: "GJ", Info: sim.Energy.Info()}, true},
		{sim.Row{Index: sim.PeakDay, Unit: "day of period", Info: sim.PeakDay.Info()}, true},
		{sim.Row{Index: 0, Unit: "MWh", Info: sim.Info{Key: "load"}}, true}, // an unknown index in a demand unit
	} {
		if got := isDemandRow(c.row); got != c.want {
			t.Errorf("isDemandRow(%s, %s) = %v, want %v", c.row.Info.Key, c.row.Unit, got, c.want)
		}
	}
}

func TestExceedanceCurve(t *testing.T) {
	t.Parallel()
	const n = 1000
	values := make([]float64, n)
	rng := rand.New(rand.NewPCG(1, 2))
	for i := range values {
		values[i] = rng.NormFloat64()
	}
	for _, high := range []bool{true, false} {
		xy := exceedance(values, high)
		if xy[0].Y != 1 || xy[len(xy)-1].Y != 1.0/n {
			t.Errorf("high=%v: curve runs from p=%v to %v, want 1 to %v", high, xy[0].Y, xy[len(xy)-1].Y, 1.0/n)
		}
		for k, p := range xy {
			worse := 0
			for _, v := range values {
				if high && v >= p.X || !high && v <= p.X {
					worse++
				}
			}
			if got := float64(worse) / n; got != p.Y {
				t.Errorf("high=%v: point %d: P(at least as adverse as %v) = %v, curve says %v", high, k, p.X, got, p.Y)
			}
			if k > 0 && p.Y >= xy[k-1].Y {
				t.Errorf("high=%v: probabilities not decreasing at point %d", high, k)
			}
		}
	}
}

func TestHistogramBins(t *testing.T) {
	t.Parallel()
	const sumTol = 1e-12 // the shares are sums of 1/N
	for name, values := range map[string][]float64{
		"integers":   {0, 0, 1, 3, 3, 3, 7},
		"continuous": {2709.9, 2819.7, 2875.1, 2966.6, 3067.1, 3174.2, 3273.5, 3332.9, 3437.2},
	} {
		bins, width := histBins(values, slices.Min(values), slices.Max(values))
		sum := 0.0
		for k, b := range bins {
			sum += b.Weight
			if math.Abs(b.Max-b.Min-width) > sumTol*width {
				t.Errorf("%s: bin %d is %v wide, want %v", name, k, b.Max-b.Min, width)
			}
		}
		if math.Abs(sum-1) > sumTol {
			t.Errorf("%s: shares sum to %v, want 1", name, sum)
		}
		if lo, hi := slices.Min(values), slices.Max(values); bins[0].Min > lo || bins[len(bins)-1].Max <= hi {
			t.Errorf("%s: bins [%v, %v) do not cover [%v, %v]", name, bins[0].Min, bins[len(bins)-1].Max, lo, hi)
		}
	}
	if bins, width := histBins([]float64{0, 0, 1, 3, 3, 3, 7}, 0, 7); width != 1 || len(bins) != 8 || bins[3].Weight != 3.0/7 {
		t.Errorf("integer values: got %d bins of width %v, bin of 3 holds %v; want 8 of width 1 holding 3/7",
			len(bins), width, bins[3].Weight)
	}
	// Values outside the range are left out, but the shares stay shares of all.
	bins, _ := histBins([]float64{0, 0, 1, 3, 3, 3, 7}, 0, 3)
	sum := 0.0
	for _, b := range bins {
		sum += b.Weight
	}
	if math.Abs(sum-6.0/7) > sumTol {
		t.Errorf("range [0, 3]: shares sum to %v, want 6/7", sum)
	}
}

func TestHistogramRangeLeavesOutLoneExtremes(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(1, 2))
	values := make([]float64, 10000)
	for i := range values {
		values[i] = 27 + 1.4*rng.NormFloat64()
	}
	lo, hi := histRange(values)
	if lo != slices.Min(values) || hi != slices.Max(values) {
		t.Errorf("normal values: range [%v, %v], want all of [%v, %v]", lo, hi, slices.Min(values), slices.Max(values))
	}
	values[17] = 45 // one freak year
	if _, hi := histRange(values); hi >= 45 || hi < 30 {
		t.Errorf("with one year at 45: range ends at %v, want the bulk's end (30..45)", hi)
	}
}

func TestDemoSizedReport(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the demo-sized pipeline")
	}
	t.Parallel()
	page := renderReport(t, mustInput(t, demoInput))
	const maxBytes = 3 << 20 // the demo report must stay easy to mail and open
	t.Logf("demo-sized report: %d bytes (%.2f MB)", len(page), float64(len(page))/(1<<20))
	if len(page) > maxBytes {
		t.Errorf("demo-sized report is %d bytes, want at most %d", len(page), maxBytes)
	}
}

// chromium is Debian's Chromium; the screenshot test skips without it.
const chromium = "/usr/bin/chromium"

func TestChromiumRendersReport(t *testing.T) {
	if testing.Short() {
		t.Skip("starts a browser")
	}
	t.Parallel()
	if _, err := os.Stat(chromium); err != nil {
		t.Skipf("Chromium not found at %s (apt-get install chromium): %v", chromium, err)
	}
	dir := t.TempDir()
	report := filepath.Join(dir, "report.html")
	shot := filepath.Join(dir, "report.png")
	if err := os.WriteFile(report, renderReport(t, mustInput(t, demoInput)), 0o644); err != nil {
		t.Fatal(err)
	}
	profile := filepath.Join(dir, "profile")
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
		"--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--hide-scrollbars", "--user-data-dir="+profile, "--screenshot="+shot, "--window-size=1280,2000",
		"file://"+report)
	cmd.Env = append(os.Environ(), "HOME="+dir)
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("chromium: %v\n%s", err, out)
	}
	b, err := os.ReadFile(shot)
	if err != nil {
		t.Fatalf("no screenshot: %v", err)
	}
	const minPNG = 20 << 10 // a page of text and plots compresses to far more than this
	if len(b) < minPNG {
		t.Errorf("screenshot is %d bytes, want at least %d", len(b), minPNG)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if sz := img.Bounds().Size(); sz.X != 1280 || sz.Y != 2000 {
		t.Errorf("screenshot is %v, want 1280×2000", sz)
	}
	colours := map[[4]uint32]bool{}
	for y := img.Bounds().Min.Y; y < img.Bounds().Max.Y; y += 7 {
		for x := img.Bounds().Min.X; x < img.Bounds().Max.X; x += 7 {
			r, g, b, a := img.At(x, y).RGBA()
			colours[[4]uint32{r, g, b, a}] = true
		}
	}
	const minColours = 16 // text, the caution box and coloured plots
	if len(colours) < minColours {
		t.Errorf("screenshot has %d colours, want at least %d: the page did not render", len(colours), minColours)
	}
	if *update {
		if err := os.WriteFile(filepath.Join("..", "..", "docs", "report.png"), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// TestTablesKeepTableLayout checks that no class the report's tables carry
// is one the style sheet lays out otherwise (display: flex, block …): the
// summary's tables once shared the plot legend's class and drew their
// header beside their rows.
func TestTablesKeepTableLayout(t *testing.T) {
	page, err := templateFiles.ReadFile("templates/page.html")
	if err != nil {
		t.Fatal(err)
	}
	css := styleSheet
	classes := map[string]bool{}
	for _, m := range regexp.MustCompile(`<table class="([^"]+)"`).FindAllStringSubmatch(string(page), -1) {
		for _, c := range strings.Fields(m[1]) {
			classes[c] = true
		}
	}
	if len(classes) == 0 {
		t.Fatal("no table classes found in page.html")
	}
	for _, rule := range regexp.MustCompile(`([^{}]+)\{([^}]*)\}`).FindAllStringSubmatch(string(css), -1) {
		if !strings.Contains(rule[2], "display") {
			continue
		}
		for c := range classes {
			if regexp.MustCompile(`\.` + c + `\b`).MatchString(rule[1]) {
				t.Errorf("tables of class %q are laid out by %q", c, strings.TrimSpace(rule[1]+"{"+rule[2]+"}"))
			}
		}
	}
}

// TestReportNumberFormats: Monte Carlo errors keep two significant digits
// (no "± 0.00" for a paired error of 0.00094), a change is shown to the
// decade of its error's first digit as in the terminal, and large values
// drop their tenths.
func TestReportNumberFormats(t *testing.T) {
	for _, c := range []struct{ got, want string }{
		{seText(0.00094), "0.00094"}, {seText(0.25), "0.25"}, {seText(242.93), "243"}, {seText(0), "0"},
		{changeText(-89.98723, 0.00094), "-89.99"}, {changeText(6880.3, 25), "+6,880"}, {changeText(0.3, 0.25), "+0.3"},
		{changeText(-0.125, 0.0027), "-0.125"}, {changeText(-90, 0), "-90.0"},
		{value(2396910.1), "2,396,910"}, {value(-14.83), "-14.8"}, {value(-0.04), "0.0"},
	} {
		if c.got != c.want {
			t.Errorf("got %q, want %q", c.got, c.want)
		}
	}
}
