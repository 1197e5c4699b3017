package demo

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
	"strings"
	"testing"
	"time"

	"wxstress/calibrate"
)

// The generating values, as stated in TRUTH.md.
const (
	truthLevel      = 10.0  // °C at 2000-01-01 without the seasonal cycle
	truthTrend      = 0.2   // °C per decade
	truthAmp1       = 11.0  // °C
	truthPeak1      = 206.0 // days after 2000-01-01 (25 July), modulo 365.25
	truthAmp2       = 0.8   // °C
	truthAcf1       = 0.728 // lag-1 autocorrelation of the anomaly (fast + slow component)
	truthSigmaJan   = 2.99  // °C, innovation sd, January
	truthSigmaJul   = 1.71  // °C, innovation sd, July
	truthHeatSlope  = 3100.0
	truthBase       = 38000.0
	truthHeatBase   = 15.5
	truthCoolBase   = 22.0
	stationRows     = 25932
	stationEmpty    = 14
	stationMissing  = 15
	demandRows      = 1826
	daysPerYear     = 365.25
	holidaysPerYear = 6
)

var epoch = time.Date(2000, time.January, 1, 0, 0, 0, 0, time.UTC)

func day(s string) int {
	d, err := time.Parse(time.DateOnly, s)
	if err != nil {
		panic(err)
	}
	return int(d.Sub(epoch).Hours() / 24)
}

func dateOf(t int) time.Time { return epoch.AddDate(0, 0, t) }

// grid is a daily series on a complete grid of days from first; NaN = missing.
type grid struct {
	first int // days since 2000-01-01
	v     []float64
}

func (g grid) t(i int) int            { return g.first + i }
func (g grid) at(t int) float64       { return g.v[t-g.first] }
func (g grid) month(i int) time.Month { return dateOf(g.t(i)).Month() }

type stationData struct {
	grid
	rows, empty int
	absentDays  []int
}

func readCSV(t *testing.T, data []byte, header string) [][]string {
	t.Helper()
	r := csv.NewReader(bytes.NewReader(data))
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(recs[0], ","); got != header {
		t.Fatalf("header %q, want %q", got, header)
	}
	return recs[1:]
}

func loadStation(t *testing.T) stationData {
	t.Helper()
	recs := readCSV(t, Station(), "date,tavg")
	var s stationData
	s.rows = len(recs)
	s.first = day(recs[0][0])
	prev := s.first - 1
	for i, rec := range recs {
		d := day(rec[0])
		if d <= prev {
			t.Fatalf("row %d: %s not after the previous date", i+2, rec[0])
		}
		for gap := prev + 1; gap < d; gap++ {
			s.absentDays = append(s.absentDays, gap)
			s.v = append(s.v, math.NaN())
		}
		prev = d
		if rec[1] == "" {
			s.empty++
			s.v = append(s.v, math.NaN())
			continue
		}
		x, err := strconv.ParseFloat(rec[1], 64)
		if err != nil {
			t.Fatalf("row %d: %v", i+2, err)
		}
		if strconv.FormatFloat(x, 'f', 1, 64) != rec[1] {
			t.Fatalf("row %d: %q is not written to one decimal", i+2, rec[1])
		}
		if x < -40 || x > 45 {
			t.Fatalf("row %d: implausible daily mean %v °C", i+2, x)
		}
		s.v = append(s.v, x)
	}
	return s
}

type demandData struct {
	grid             // load, GJ/day
	holiday []bool   // per grid day
	dates   []string // per grid day
}

func loadDemand(t *testing.T) demandData {
	t.Helper()
	recs := readCSV(t, Demand(), "date,load,holiday")
	var d demandData
	d.first = day(recs[0][0])
	for i, rec := range recs {
		if got := day(rec[0]); got != d.first+i {
			t.Fatalf("row %d: date %s, want %s", i+2, rec[0], dateOf(d.first+i).Format(time.DateOnly))
		}
		load, err := strconv.Atoi(rec[1])
		if err != nil || load <= 0 {
			t.Fatalf("row %d: load %q is not a positive integer", i+2, rec[1])
		}
		if rec[2] != "0" && rec[2] != "1" {
			t.Fatalf("row %d: holiday %q is not 0 or 1", i+2, rec[2])
		}
		d.v = append(d.v, float64(load))
		d.holiday = append(d.holiday, rec[2] == "1")
		d.dates = append(d.dates, rec[0])
	}
	return d
}

// ols solves the least-squares problem min |y − Xβ| by the normal equations
// (Gaussian elimination with partial pivoting; the regressors here are well
// scaled, so this is accurate enough for a test).
func ols(x [][]float64, y []float64) []float64 {
	k := len(x[0])
	a := make([][]float64, k)
	for i := range a {
		a[i] = make([]float64, k+1)
	}
	for r, row := range x {
		for i := range k {
			for j := range k {
				a[i][j] += row[i] * row[j]
			}
			a[i][k] += row[i] * y[r]
		}
	}
	for c := range k {
		p := c
		for r := c + 1; r < k; r++ {
			if math.Abs(a[r][c]) > math.Abs(a[p][c]) {
				p = r
			}
		}
		a[c], a[p] = a[p], a[c]
		for r := range k {
			if r != c {
				f := a[r][c] / a[c][c]
				for j := c; j <= k; j++ {
					a[r][j] -= f * a[c][j]
				}
			}
		}
	}
	beta := make([]float64, k)
	for i := range k {
		beta[i] = a[i][k] / a[i][i]
	}
	return beta
}

// seasonalFit is T ≈ a + b·t + c₁cos ωt + s₁sin ωt + c₂cos 2ωt + s₂sin 2ωt,
// t in days since 2000-01-01, b per decade.
type seasonalFit struct{ a, b, c1, s1, c2, s2 float64 }

func regressors(t int) []float64 {
	w := 2 * math.Pi / daysPerYear * float64(t)
	return []float64{1, float64(t) / (10 * daysPerYear), math.Cos(w), math.Sin(w), math.Cos(2 * w), math.Sin(2 * w)}
}

func fitSeasonal(g grid) seasonalFit {
	var x [][]float64
	var y []float64
	for i, v := range g.v {
		if !math.IsNaN(v) {
			x = append(x, regressors(g.t(i)))
			y = append(y, v)
		}
	}
	b := ols(x, y)
	return seasonalFit{b[0], b[1], b[2], b[3], b[4], b[5]}
}

func (f seasonalFit) cycle(t int) float64 {
	r := regressors(t)
	return f.c1*r[2] + f.s1*r[3] + f.c2*r[4] + f.s2*r[5]
}

func (f seasonalFit) mean(t int) float64 { return f.a + f.b*float64(t)/(10*daysPerYear) + f.cycle(t) }

// anomalies returns T − S on the grid (NaN where T is missing).
func anomalies(g grid, f seasonalFit) []float64 {
	x := make([]float64, len(g.v))
	for i, v := range g.v {
		x[i] = v - f.mean(g.t(i))
	}
	return x
}

func mean(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

func sd(v []float64) float64 {
	m, s := mean(v), 0.0
	for _, x := range v {
		s += (x - m) * (x - m)
	}
	return math.Sqrt(s / float64(len(v)-1))
}

func TestStationShape(t *testing.T) {
	t.Parallel()
	s := loadStation(t)
	if got, want := dateOf(s.first).Format(time.DateOnly), "1955-01-01"; got != want {
		t.Errorf("first date %s, want %s", got, want)
	}
	if got, want := dateOf(s.t(len(s.v)-1)).Format(time.DateOnly), "2025-12-31"; got != want {
		t.Errorf("last date %s, want %s", got, want)
	}
	if s.rows != stationRows || s.empty != stationEmpty {
		t.Errorf("%d rows with %d empty values, want %d and %d", s.rows, s.empty, stationRows, stationEmpty)
	}
	if len(s.absentDays) != 1 || s.absentDays[0] != day("2022-11-17") {
		t.Errorf("absent days %v, want only 2022-11-17", s.absentDays)
	}
	missing, run, longest, longestEnd := 0, 0, 0, 0
	for i, v := range s.v {
		if !math.IsNaN(v) {
			run = 0
			continue
		}
		missing++
		run++
		if run > longest {
			longest, longestEnd = run, s.t(i)
		}
	}
	if missing != stationMissing {
		t.Errorf("%d missing days, want %d", missing, stationMissing)
	}
	if longest != 6 || longestEnd != day("1987-02-14") {
		t.Errorf("longest gap %d days ending %s, want 6 ending 1987-02-14", longest, dateOf(longestEnd).Format(time.DateOnly))
	}
}

// The seasonal cycle's level, amplitudes and timing. Tolerances are about
// 3–4 standard errors of the fitted values: the persistent anomaly leaves
// the level with an SE near 0.07 °C and the annual amplitude near 0.09 °C,
// and the annual peak with about half a day.
func TestStationSeasonalCycle(t *testing.T) {
	t.Parallel()
	s := loadStation(t)
	f := fitSeasonal(s.grid)
	amp1 := math.Hypot(f.c1, f.s1)
	amp2 := math.Hypot(f.c2, f.s2)
	// c cos ωt + s sin ωt = α cos(ω(t − t₀)) with ωt₀ = atan2(s, c).
	peak := math.Mod(math.Atan2(f.s1, f.c1)/(2*math.Pi)*daysPerYear+daysPerYear, daysPerYear)
	t.Logf("a = %.3f °C, b = %.3f °C/decade, A1 = %.3f °C, peak day %.1f, A2 = %.3f °C", f.a, f.b, amp1, peak, amp2)
	if math.Abs(f.a-truthLevel) > 0.3 {
		t.Errorf("level %.3f °C, want %.1f ± 0.3", f.a, truthLevel)
	}
	if math.Abs(amp1-truthAmp1) > 0.3 {
		t.Errorf("annual amplitude %.3f °C, want %.1f ± 0.3", amp1, truthAmp1)
	}
	if math.Abs(peak-truthPeak1) > 3 {
		t.Errorf("annual peak %.1f days after 1 January 2000, want %.0f ± 3", peak, truthPeak1)
	}
	if math.Abs(amp2-truthAmp2) > 0.3 {
		t.Errorf("semi-annual amplitude %.3f °C, want %.1f ± 0.3", amp2, truthAmp2)
	}
}

// Month means over the whole record: the warmest month comes about half a
// year after the coldest (TRUTH.md: January and July).
func TestStationSeasonTiming(t *testing.T) {
	t.Parallel()
	s := loadStation(t)
	var sum [12]float64
	var n [12]int
	for i, v := range s.v {
		if !math.IsNaN(v) {
			sum[s.month(i)-1] += v
			n[s.month(i)-1]++
		}
	}
	warm, cold := 0, 0
	for m := range 12 {
		if sum[m]/float64(n[m]) > sum[warm]/float64(n[warm]) {
			warm = m
		}
		if sum[m]/float64(n[m]) < sum[cold]/float64(n[cold]) {
			cold = m
		}
	}
	t.Logf("coldest month %s (%.2f °C), warmest %s (%.2f °C)",
		time.Month(cold+1), sum[cold]/float64(n[cold]), time.Month(warm+1), sum[warm]/float64(n[warm]))
	if lag := (warm - cold + 12) % 12; lag < 5 || lag > 7 {
		t.Errorf("warmest month %s is %d months after the coldest %s, want about 6",
			time.Month(warm+1), lag, time.Month(cold+1))
	}
}

// The trend, from ordinary least squares on the 71 annual means. The annual
// means wander about the trend with an sd near 0.56 °C (about 0.46 from the
// fast AR(1) anomaly, 0.33 from the slow component), so with 71 years the
// slope's standard error is 0.56/√(Σ(year − mean year)²) ≈ 0.032 °C/decade;
// ±0.1 °C/decade is about three standard errors: any honest draw passes,
// and a slope in the wrong units (per year for per decade) fails.
func TestStationTrend(t *testing.T) {
	t.Parallel()
	s := loadStation(t)
	f := fitSeasonal(s.grid)
	// Annual means of T minus the seasonal cycle alone, so the days that are
	// missing (six in one February) do not bias their year.
	sums := map[int]float64{}
	counts := map[int]int{}
	for i, v := range s.v {
		if !math.IsNaN(v) {
			y := dateOf(s.t(i)).Year()
			sums[y] += v - f.cycle(s.t(i))
			counts[y]++
		}
	}
	var x [][]float64
	var y []float64
	for yr := 1955; yr <= 2025; yr++ {
		x = append(x, []float64{1, float64(yr-2000) / 10})
		y = append(y, sums[yr]/float64(counts[yr]))
	}
	if len(y) != 71 {
		t.Fatalf("%d years", len(y))
	}
	b := ols(x, y)
	res := make([]float64, len(y))
	for i := range y {
		res[i] = y[i] - b[0] - b[1]*x[i][1]
	}
	se := sd(res) / math.Sqrt(71*(71*71-1)/12.0) * 10
	t.Logf("trend of annual means %.3f °C/decade (SE %.3f), level at 2000 %.3f °C, annual-mean sd %.3f °C",
		b[1], se, b[0], sd(res))
	if math.Abs(b[1]-truthTrend) > 0.1 {
		t.Errorf("trend %.3f °C/decade, want %.1f ± 0.1", b[1], truthTrend)
	}
}

// Persistence, winter-heavy volatility and the cold-side skew of the shocks.
func TestStationAnomaly(t *testing.T) {
	t.Parallel()
	s := loadStation(t)
	x := anomalies(s.grid, fitSeasonal(s.grid))

	// Lag-1 autocorrelation over pairs of consecutive days with values.
	m := 0.0
	k := 0
	for _, v := range x {
		if !math.IsNaN(v) {
			m += v
			k++
		}
	}
	m /= float64(k)
	var c0, c1, sxy, sxx float64
	for i, v := range x {
		if math.IsNaN(v) {
			continue
		}
		c0 += (v - m) * (v - m)
		if i > 0 && !math.IsNaN(x[i-1]) {
			c1 += (v - m) * (x[i-1] - m)
			sxy += v * x[i-1]
			sxx += x[i-1] * x[i-1]
		}
	}
	acf1, phi := c1/c0, sxy/sxx
	t.Logf("lag-1 autocorrelation %.3f (truth %.3f), AR(1) φ %.3f", acf1, truthAcf1, phi)
	if acf1 < 0.6 || acf1 > 0.85 {
		t.Errorf("lag-1 autocorrelation %.3f, want 0.6–0.85", acf1)
	}

	// Day-to-day changes and AR(1) innovations by month.
	var diff, innov [12][]float64
	for i := 1; i < len(x); i++ {
		if math.IsNaN(x[i]) || math.IsNaN(x[i-1]) {
			continue
		}
		mo := s.month(i) - 1
		diff[mo] = append(diff[mo], s.v[i]-s.v[i-1])
		innov[mo] = append(innov[mo], x[i]-phi*x[i-1])
	}
	jan, jul := sd(diff[0]), sd(diff[6])
	t.Logf("day-to-day sd: January %.2f °C, July %.2f °C", jan, jul)
	if jan < 1.4*jul {
		t.Errorf("January day-to-day sd %.2f °C is not well above July's %.2f °C (truth: ratio ≈ 1.75)", jan, jul)
	}
	// Innovation sd: SE ≈ σ·√((2 + excess kurtosis)/n)/2 ≈ 0.07 °C in January
	// (n ≈ 2200), so ±0.3 °C is about four standard errors.
	for _, c := range []struct {
		mo   time.Month
		want float64
	}{{time.January, truthSigmaJan}, {time.July, truthSigmaJul}} {
		if got := sd(innov[c.mo-1]); math.Abs(got-c.want) > 0.3 {
			t.Errorf("%s innovation sd %.2f °C, want %.2f ± 0.3", c.mo, got, c.want)
		}
	}

	// Standardized innovations: skewed to the cold side and fat-tailed
	// (truth: skewness −0.55, excess kurtosis 3.4; with ν = 6 the sample
	// moments converge slowly, so only the sign and a clear excess are checked).
	var z []float64
	for mo := range 12 {
		sm, ss := mean(innov[mo]), sd(innov[mo])
		for _, e := range innov[mo] {
			z = append(z, (e-sm)/ss)
		}
	}
	var m3, m4 float64
	for _, e := range z {
		m3 += e * e * e
		m4 += e * e * e * e
	}
	skew, exkurt := m3/float64(len(z)), m4/float64(len(z))-3
	t.Logf("standardized innovations: skewness %.3f, excess kurtosis %.3f", skew, exkurt)
	if skew > -0.2 {
		t.Errorf("skewness %.3f, want clearly negative (cold outbreaks sharper than warm spells)", skew)
	}
	if exkurt < 0.5 { // a normal sample of this size has excess kurtosis within ±0.1 (sd √(24/n) ≈ 0.03)
		t.Errorf("excess kurtosis %.3f, want clearly fat-tailed", exkurt)
	}
}

func TestDemand(t *testing.T) {
	t.Parallel()
	d := loadDemand(t)
	s := loadStation(t)
	if len(d.v) != demandRows || d.dates[0] != "2021-01-01" || d.dates[len(d.dates)-1] != "2025-12-31" {
		t.Fatalf("%d rows %s to %s, want %d rows 2021-01-01 to 2025-12-31",
			len(d.v), d.dates[0], d.dates[len(d.dates)-1], demandRows)
	}
	holidays := map[string]bool{"01-01": true, "03-14": true, "05-01": true, "08-09": true, "12-25": true, "12-26": true}
	nHol := 0
	for i, h := range d.holiday {
		if want := holidays[d.dates[i][5:]]; h != want {
			t.Errorf("%s: holiday %v, want %v", d.dates[i], h, want)
		}
		if h {
			nHol++
		}
	}
	if nHol != 5*holidaysPerYear {
		t.Errorf("%d holidays, want %d", nHol, 5*holidaysPerYear)
	}

	// Heating side: load against tavg below 15 °C.
	var all, allT []float64
	var x [][]float64
	var y []float64
	var flat []float64
	for i, load := range d.v {
		tv := s.at(d.t(i))
		if math.IsNaN(tv) {
			continue
		}
		wd := dateOf(d.t(i)).Weekday()
		plain := wd != time.Saturday && wd != time.Sunday && !d.holiday[i]
		if tv < 15 {
			all = append(all, load)
			allT = append(allT, tv)
			if plain {
				x = append(x, []float64{1, tv})
				y = append(y, load)
			}
		}
		if plain && tv > truthHeatBase+0.5 && tv < truthCoolBase-0.5 {
			flat = append(flat, load)
		}
	}
	mT, mL := mean(allT), mean(all)
	var sxy, sxx, syy float64
	for i := range all {
		sxy += (allT[i] - mT) * (all[i] - mL)
		sxx += (allT[i] - mT) * (allT[i] - mT)
		syy += (all[i] - mL) * (all[i] - mL)
	}
	r := sxy / math.Sqrt(sxx*syy)
	b := ols(x, y)
	// Slope SE ≈ 1617/(5 °C·√800)·√3 ≈ 20 GJ/day per °C (AR(1) noise
	// inflates it by √((1+φ)/(1−φ))), so ±100 is five standard errors.
	t.Logf("below 15 °C: r = %.3f over %d days; heating slope %.0f GJ/day/°C over %d weekdays; %d weekdays between the balance points, mean %.0f GJ/day",
		r, len(all), -b[1], len(x), len(flat), mean(flat))
	if r > -0.9 {
		t.Errorf("correlation of load with tavg below 15 °C is %.3f, want strongly negative", r)
	}
	if math.Abs(-b[1]-truthHeatSlope) > 100 {
		t.Errorf("heating slope %.0f GJ/day per °C, want %.0f ± 100", -b[1], truthHeatSlope)
	}
	// Base load between the balance points: SE ≈ 1617·√3/√n ≈ 250 for n ≈ 130.
	if math.Abs(mean(flat)-truthBase) > 1000 {
		t.Errorf("weekday base load %.0f GJ/day, want %.0f ± 1000", mean(flat), truthBase)
	}
}

// TestHolidayList: the holiday list for simulate --holidays marks exactly
// the days the send-out record marks, every year, read by the same reader
// fit-demand and simulate use.
func TestHolidayList(t *testing.T) {
	t.Parallel()
	h, err := calibrate.ReadHolidaysFile("kestrel_bay_holidays.txt")
	if err != nil {
		t.Fatal(err)
	}
	d := loadDemand(t)
	listed := map[string]bool{}
	for _, day := range h.In(2021, 2025) {
		listed[day.String()] = true
	}
	for i, date := range d.dates {
		if listed[date] != d.holiday[i] {
			t.Errorf("%s: the list says %v, the send-out record %v", date, listed[date], d.holiday[i])
		}
	}
	if len(listed) != 5*holidaysPerYear {
		t.Errorf("%d listed days in 2021–2025, want %d", len(listed), 5*holidaysPerYear)
	}
}
