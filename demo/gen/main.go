// Command gen writes the invented demo data of package demo: a daily mean
// temperature record for the fictional station Kestrel Bay Airfield and the
// daily gas send-out of the fictional retailer Lanternfield Energy, together
// with TRUTH.md, the exact parameters that generated them.
//
// The output is a pure function of the constants below and a fixed seed
// (math/rand/v2 PCG), so running
//
//	go run ./demo/gen
//
// from the module root reproduces the committed files byte for byte.
package main

import (
	"flag"
	"fmt"
	"log"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"wxstress/calendar"
)

// seed is the PCG seed of the published files; stream 1 drives the
// temperatures, stream 2 the demand noise, so either can change without
// disturbing the other. Other seeds give other records of the same
// generator (the recovery test in this directory draws some).
const seed uint64 = 0x4b42_1955

// Temperature model, °C. Time t counts days from calendar.Epoch (2000-01-01):
//
//	T(t) = S(t) + F(t) + Y(t)
//	S(t) = level + trend·t + amp1·cos(ω(t − peak1)) + amp2·cos(2ω(t − peak2))
//	F(t) = phiSlow·F(t−1) + sdSlow·√(1 − phiSlow²)·η(t),     η ~ N(0, 1)
//	Y(t) = phiFast·Y(t−1) + σ(t)·ε(t),                       ε unit-variance skewed t
//	σ(t) = sigmaMid + sigmaHalfRange·cos(ω(t − sigmaPeak))
const (
	level          = 10.0  // °C at the epoch, without the seasonal cycle
	trendPerDecade = 0.2   // °C per decade
	amp1           = 11.0  // °C, annual harmonic
	peak1          = 206.0 // days after the epoch: 2000-07-25
	amp2           = 0.8   // °C, semi-annual harmonic
	peak2          = 206.0 // days after the epoch: with the annual peak, so summers peak higher than winters dip
	phiFast        = 0.72
	phiSlow        = 0.985
	sdSlow         = 0.6  // °C, stationary sd of F
	sigmaMid       = 2.35 // °C
	sigmaHalfRange = 0.65 // °C: σ runs from 3.0 (mid-January) to 1.7 (mid-July)
	sigmaPeak      = 14.0 // days after the epoch: 2000-01-15
	nu             = 10.0 // Student-t degrees of freedom of ε
	xi             = 0.85 // Fernández–Steel skew of ε (< 1: longer cold tail)
)

var (
	omega     = 2 * math.Pi / calendar.DaysPerYear
	slope     = trendPerDecade / (10 * calendar.DaysPerYear) // °C per day
	firstDay  = calendar.FromYMD(1955, time.January, 1)
	lastDay   = calendar.FromYMD(2025, time.December, 31)
	burnStart = calendar.FromYMD(1952, time.January, 1) // F and Y start at 0 here
)

// Missing data. Scattered days have an empty tavg; the run is six
// consecutive empty tavg values; the absent day has no row at all.
var (
	scattered = []calendar.Date{
		calendar.FromYMD(1958, time.August, 3),
		calendar.FromYMD(1963, time.December, 29),
		calendar.FromYMD(1971, time.April, 18),
		calendar.FromYMD(1979, time.October, 7),
		calendar.FromYMD(1994, time.January, 22),
		calendar.FromYMD(2003, time.July, 11),
		calendar.FromYMD(2011, time.March, 5),
		calendar.FromYMD(2024, time.February, 19),
	}
	runStart = calendar.FromYMD(1987, time.February, 9)
	runLen   = 6
	absent   = calendar.FromYMD(2022, time.November, 17)
)

// Demand model, GJ/day:
//
//	D(t) = (base + heatSlope·max(heatBase − T, 0) + coolSlope·max(T − coolBase, 0))
//	       · weekday factor · (holidayFactor on holidays) + u(t)
//	u(t) = demandPhi·u(t−1) + demandSigma·z(t),  z ~ N(0, 1)
const (
	base          = 38000.0
	heatSlope     = 3100.0
	heatBase      = 15.5
	coolSlope     = 450.0
	coolBase      = 22.0
	saturday      = 0.93
	sunday        = 0.90
	holidayFactor = 0.88
	demandPhi     = 0.5
	demandSigma   = 1400.0
)

var (
	demandFirst = calendar.FromYMD(2021, time.January, 1)
	demandLast  = calendar.FromYMD(2025, time.December, 31)
)

// holidays are Kestrel Bay's invented fixed-date public holidays. There are
// no substitute days: a holiday on a weekend takes both factors.
var holidays = []struct {
	month time.Month
	day   int
	name  string
}{
	{time.January, 1, "New Year's Day"},
	{time.March, 14, "Founders' Day"},
	{time.May, 1, "May Day"},
	{time.August, 9, "Harbour Day"},
	{time.December, 25, "Christmas Day"},
	{time.December, 26, "Boxing Day"},
}

func main() {
	dir := flag.String("dir", "demo", "directory to write the files into")
	flag.Parse()
	log.SetFlags(0)

	st := simulateTemperature(seed)
	must(writeFile(filepath.Join(*dir, "kestrel_bay_daily.csv"), st.stationCSV()))
	must(writeFile(filepath.Join(*dir, "lanternfield_demand.csv"), st.demandCSV()))
	must(writeFile(filepath.Join(*dir, "TRUTH.md"), st.truthMarkdown()))
	must(writeFile(filepath.Join(*dir, "kestrel_bay_holidays.txt"), holidaysText()))
}

func must(err error) {
	if err != nil {
		log.Fatal(err)
	}
}

func writeFile(name string, data []byte) error {
	return os.WriteFile(name, data, 0o644)
}

// seasonal is S(t), the deterministic part of the temperature.
func seasonal(d calendar.Date) float64 {
	t := d.ModelTime()
	return level + slope*t + amp1*math.Cos(omega*(t-peak1)) + amp2*math.Cos(2*omega*(t-peak2))
}

// sigma is σ(t), the innovation sd of the fast component.
func sigma(d calendar.Date) float64 {
	return sigmaMid + sigmaHalfRange*math.Cos(omega*(d.ModelTime()-sigmaPeak))
}

// station holds the simulated record from firstDay to lastDay.
type station struct {
	truth   []float64 // T before rounding and blanking
	anomaly []float64 // X = F + Y
	shock   []float64 // ε, the unit-variance innovations of Y
	tavg    []float64 // published value: T rounded to 0.1 °C, NaN if missing
	present []bool    // false for the absent row
}

func (s *station) index(d calendar.Date) int { return int(d - firstDay) }

// simulateTemperature draws a station record from the generator with the
// given PCG seed (stream 1).
func simulateTemperature(seed uint64) *station {
	r := rand.New(rand.NewPCG(seed, 1))
	n := int(lastDay-firstDay) + 1
	s := &station{
		truth:   make([]float64, n),
		anomaly: make([]float64, n),
		shock:   make([]float64, n),
		tavg:    make([]float64, n),
		present: make([]bool, n),
	}
	sk := newSkewT(nu, xi)
	slowSD := sdSlow * math.Sqrt(1-phiSlow*phiSlow)
	var f, y float64
	for d := burnStart; d <= lastDay; d++ {
		e := sk.draw(r)
		y = phiFast*y + sigma(d)*e
		f = phiSlow*f + slowSD*r.NormFloat64()
		if d < firstDay {
			continue
		}
		i := s.index(d)
		s.shock[i] = e
		s.anomaly[i] = f + y
		s.truth[i] = seasonal(d) + f + y
		s.tavg[i] = round1(s.truth[i])
		s.present[i] = true
	}
	for _, d := range missingDays() {
		s.tavg[s.index(d)] = math.NaN()
	}
	s.present[s.index(absent)] = false
	return s
}

// hddYear and hddYears set the generator's own annual-HDD check.
const (
	hddYear  = 2026
	hddYears = 20000
)

// generatorHDD simulates n calendar years `year` from the generator (PCG
// stream 3, so the published files do not change) and returns the mean and
// sd of their HDD at base 18 °C, computed from T before rounding.
func generatorHDD(year, n int) (mean, sd float64) {
	r := rand.New(rand.NewPCG(seed, 3))
	sk := newSkewT(nu, xi)
	slowSD := sdSlow * math.Sqrt(1-phiSlow*phiSlow)
	first := calendar.FromYMD(year, time.January, 1)
	last := calendar.FromYMD(year, time.December, 31)
	var sum, sum2 float64
	for range n {
		f := sdSlow * r.NormFloat64()
		y := 0.0
		hdd := 0.0
		for d := first - 200; d <= last; d++ {
			y = phiFast*y + sigma(d)*sk.draw(r)
			f = phiSlow*f + slowSD*r.NormFloat64()
			if d >= first {
				hdd += math.Max(18-(seasonal(d)+f+y), 0)
			}
		}
		sum += hdd
		sum2 += hdd * hdd
	}
	mean = sum / float64(n)
	return mean, math.Sqrt((sum2 - float64(n)*mean*mean) / float64(n-1))
}

// missingDays lists every day without a value, absent row included, in order.
func missingDays() []calendar.Date {
	days := slices.Clone(scattered)
	for k := range runLen {
		days = append(days, runStart+calendar.Date(k))
	}
	days = append(days, absent)
	slices.Sort(days)
	return days
}

func round1(v float64) float64 {
	v = math.Round(v*10) / 10
	if v == 0 {
		return 0 // no negative zero
	}
	return v
}

func (s *station) stationCSV() []byte {
	var b strings.Builder
	b.WriteString("date,tavg\n")
	for i, v := range s.tavg {
		if !s.present[i] {
			continue
		}
		b.WriteString((firstDay + calendar.Date(i)).String())
		b.WriteByte(',')
		if !math.IsNaN(v) {
			b.WriteString(strconv.FormatFloat(v, 'f', 1, 64))
		}
		b.WriteByte('\n')
	}
	return []byte(b.String())
}

// holidaysText is the holiday list for simulate --holidays: Kestrel Bay's
// fixed-date holidays as rules, one a line, so that simulated years get the
// days the send-out record marks.
func holidaysText() []byte {
	var b strings.Builder
	b.WriteString("# Kestrel Bay's invented public holidays (fixed dates; see TRUTH.md)\n")
	for _, h := range holidays {
		fmt.Fprintf(&b, "fixed %02d-%02d\n", int(h.month), h.day)
	}
	return []byte(b.String())
}

func isHoliday(d calendar.Date) bool {
	_, m, day := d.YMD()
	for _, h := range holidays {
		if h.month == m && h.day == day {
			return true
		}
	}
	return false
}

// demandTemp is the temperature the demand model sees: the published tavg,
// or S(t) where the station has no value.
func (s *station) demandTemp(d calendar.Date) float64 {
	v := s.tavg[s.index(d)]
	if math.IsNaN(v) || !s.present[s.index(d)] {
		return seasonal(d)
	}
	return v
}

// demandMean is the noise-free load of day d at temperature T.
func demandMean(d calendar.Date, T float64) float64 {
	load := base + heatSlope*math.Max(heatBase-T, 0) + coolSlope*math.Max(T-coolBase, 0)
	switch d.Weekday() {
	case time.Saturday:
		load *= saturday
	case time.Sunday:
		load *= sunday
	}
	if isHoliday(d) {
		load *= holidayFactor
	}
	return load
}

func (s *station) demandCSV() []byte {
	r := rand.New(rand.NewPCG(seed, 2))
	var b strings.Builder
	b.WriteString("date,load,holiday\n")
	u := demandSigma / math.Sqrt(1-demandPhi*demandPhi) * r.NormFloat64() // stationary start
	for d := demandFirst; d <= demandLast; d++ {
		if d > demandFirst {
			u = demandPhi*u + demandSigma*r.NormFloat64()
		}
		load := math.Round(demandMean(d, s.demandTemp(d)) + u)
		hol := 0
		if isHoliday(d) {
			hol = 1
		}
		fmt.Fprintf(&b, "%s,%d,%d\n", d, int64(load), hol)
	}
	return []byte(b.String())
}

// skewT draws the unit-variance two-piece (Fernández–Steel) skewed Student-t.
type skewT struct {
	nu, xi   float64
	mean, sd float64 // of the unstandardized two-piece variable
}

// absMoment returns E|Z|^r for Z standard Student-t with ν > r degrees of freedom.
func absMoment(r, nu float64) float64 {
	lg := func(x float64) float64 { v, _ := math.Lgamma(x); return v }
	return math.Exp(r/2*math.Log(nu) + lg((r+1)/2) + lg((nu-r)/2) - 0.5*math.Log(math.Pi) - lg(nu/2))
}

// rawMoment returns E[W^r] of the two-piece variable W built from a standard t.
func rawMoment(r int, nu, xi float64) float64 {
	sign := 1.0
	if r%2 == 1 {
		sign = -1
	}
	k := float64(r + 1)
	return absMoment(float64(r), nu) * (math.Pow(xi, k) + sign*math.Pow(xi, -k)) / (xi + 1/xi)
}

func newSkewT(nu, xi float64) skewT {
	m1 := rawMoment(1, nu, xi)
	m2 := rawMoment(2, nu, xi)
	return skewT{nu: nu, xi: xi, mean: m1, sd: math.Sqrt(m2 - m1*m1)}
}

// standardMoments returns the skewness and excess kurtosis of the standardized variable.
func (s skewT) standardMoments() (skew, exkurt float64) {
	m1, m2, m3, m4 := rawMoment(1, s.nu, s.xi), rawMoment(2, s.nu, s.xi), rawMoment(3, s.nu, s.xi), rawMoment(4, s.nu, s.xi)
	c3 := m3 - 3*m1*m2 + 2*m1*m1*m1
	c4 := m4 - 4*m1*m3 + 6*m1*m1*m2 - 3*m1*m1*m1*m1
	v := m2 - m1*m1
	return c3 / math.Pow(v, 1.5), c4/(v*v) - 3
}

// draw: |Z| from a standard t goes to the right, scaled by ξ, with
// probability ξ²/(1 + ξ²), else to the left scaled by 1/ξ; then standardize.
func (s skewT) draw(r *rand.Rand) float64 {
	z := math.Abs(studentT(r, s.nu))
	var w float64
	if r.Float64() < s.xi*s.xi/(1+s.xi*s.xi) {
		w = s.xi * z
	} else {
		w = -z / s.xi
	}
	return (w - s.mean) / s.sd
}

// studentT draws a standard Student-t: N / √(χ²_ν / ν).
func studentT(r *rand.Rand, nu float64) float64 {
	chi2 := 2 * gamma(r, nu/2)
	return r.NormFloat64() / math.Sqrt(chi2/nu)
}

// gamma draws Gamma(shape a ≥ 1, scale 1) by Marsaglia and Tsang's method.
func gamma(r *rand.Rand, a float64) float64 {
	d := a - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := r.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := r.Float64()
		if u < 1-0.0331*x*x*x*x || math.Log(u) < 0.5*x*x+d*(1-v+math.Log(v)) {
			return d * v
		}
	}
}

// ---- TRUTH.md ----

// monthlySigma returns the root-mean-square σ(t) of each calendar month over the record.
func monthlySigma() [12]float64 {
	var sum [12]float64
	var n [12]int
	for d := firstDay; d <= lastDay; d++ {
		m := d.Month() - 1
		sum[m] += sigma(d) * sigma(d)
		n[m]++
	}
	var out [12]float64
	for m := range out {
		out[m] = math.Sqrt(sum[m] / float64(n[m]))
	}
	return out
}

// seasonalExtremes locates the warmest and coldest day of S (without the
// trend) in the year 2001, and the calendar months with the highest and lowest mean.
func seasonalExtremes() (warm, cold calendar.Date, warmMonth, coldMonth time.Month) {
	cycle := func(d calendar.Date) float64 { return seasonal(d) - level - slope*d.ModelTime() }
	var monthSum [12]float64
	var monthN [12]int
	hi, lo := math.Inf(-1), math.Inf(1)
	for d := calendar.YearStart(2001); d < calendar.YearStart(2002); d++ {
		v := cycle(d)
		if v > hi {
			hi, warm = v, d
		}
		if v < lo {
			lo, cold = v, d
		}
		monthSum[d.Month()-1] += v
		monthN[d.Month()-1]++
	}
	hiM, loM := math.Inf(-1), math.Inf(1)
	for m := range 12 {
		v := monthSum[m] / float64(monthN[m])
		if v > hiM {
			hiM, warmMonth = v, time.Month(m+1)
		}
		if v < loM {
			loM, coldMonth = v, time.Month(m+1)
		}
	}
	return
}

// realised gathers statistics of this particular draw, from the unrounded series.
type realised struct {
	acf1       float64     // lag-1 autocorrelation of X
	phiAR1     float64     // AR(1) least-squares φ on X
	sigmaAR1   [12]float64 // monthly sd of the AR(1) residuals
	shockSkew  float64     // sample skewness of ε
	shockExKur float64     // sample excess kurtosis of ε
	meanT      float64     // mean of the published tavg
	trend      float64     // °C/decade, OLS on the annual means of T − seasonal cycle
	fall, rise float64     // extreme day-to-day changes of the published tavg
	bigFalls   int         // day-to-day falls of more than 15 °C
	fallDay    calendar.Date
	riseDay    calendar.Date
}

func (s *station) realised() realised {
	var out realised
	x := s.anomaly
	n := len(x)
	mean := 0.0
	for _, v := range x {
		mean += v
	}
	mean /= float64(n)
	var c0, c1, sxy, sxx float64
	for i := range n {
		c0 += (x[i] - mean) * (x[i] - mean)
		if i > 0 {
			c1 += (x[i] - mean) * (x[i-1] - mean)
			sxy += x[i] * x[i-1]
			sxx += x[i-1] * x[i-1]
		}
	}
	out.acf1 = c1 / c0
	out.phiAR1 = sxy / sxx
	var ss [12]float64
	var cnt [12]int
	for i := 1; i < n; i++ {
		e := x[i] - out.phiAR1*x[i-1]
		m := (firstDay + calendar.Date(i)).Month() - 1
		ss[m] += e * e
		cnt[m]++
	}
	for m := range 12 {
		out.sigmaAR1[m] = math.Sqrt(ss[m] / float64(cnt[m]))
	}
	var m1, m2, m3, m4 float64
	for _, e := range s.shock {
		m1 += e
	}
	m1 /= float64(n)
	for _, e := range s.shock {
		d := e - m1
		m2 += d * d
		m3 += d * d * d
		m4 += d * d * d * d
	}
	m2, m3, m4 = m2/float64(n), m3/float64(n), m4/float64(n)
	out.shockSkew = m3 / math.Pow(m2, 1.5)
	out.shockExKur = m4/(m2*m2) - 3
	sum, k := 0.0, 0
	for i, v := range s.tavg {
		if s.present[i] && !math.IsNaN(v) {
			sum += v
			k++
		}
	}
	out.meanT = sum / float64(k)
	for i := 1; i < n; i++ {
		a, b := s.tavg[i-1], s.tavg[i]
		if math.IsNaN(a) || math.IsNaN(b) || !s.present[i-1] || !s.present[i] {
			continue
		}
		d := firstDay + calendar.Date(i)
		if b-a < -15 {
			out.bigFalls++
		}
		if b-a < out.fall {
			out.fall, out.fallDay = b-a, d
		}
		if b-a > out.rise {
			out.rise, out.riseDay = b-a, d
		}
	}
	out.trend = s.annualTrend()
	return out
}

// annualTrend fits a straight line, by ordinary least squares, to the annual
// means of the unrounded T with the seasonal cycle (not the trend) removed.
func (s *station) annualTrend() float64 {
	var years, means []float64
	for y := firstDay.Year(); y <= lastDay.Year(); y++ {
		sum, n := 0.0, 0
		for d := calendar.YearStart(y); d < calendar.YearStart(y+1); d++ {
			sum += s.truth[s.index(d)] - (seasonal(d) - level - slope*d.ModelTime())
			n++
		}
		years = append(years, float64(y))
		means = append(means, sum/float64(n))
	}
	var mx, my float64
	for i := range years {
		mx += years[i]
		my += means[i]
	}
	mx /= float64(len(years))
	my /= float64(len(years))
	var sxy, sxx float64
	for i := range years {
		sxy += (years[i] - mx) * (means[i] - my)
		sxx += (years[i] - mx) * (years[i] - mx)
	}
	return 10 * sxy / sxx
}

func (s *station) truthMarkdown() []byte {
	var b strings.Builder
	p := func(format string, a ...any) { fmt.Fprintf(&b, format, a...) }

	c1, s1 := amp1*math.Cos(omega*peak1), amp1*math.Sin(omega*peak1)
	c2, s2 := amp2*math.Cos(2*omega*peak2), amp2*math.Sin(2*omega*peak2)
	warm, cold, warmM, coldM := seasonalExtremes()
	sk := newSkewT(nu, xi)
	skew, exk := sk.standardMoments()
	ms := monthlySigma()
	re := s.realised()
	nRows, nEmpty := 0, 0
	for i := range s.tavg {
		if s.present[i] {
			nRows++
			if math.IsNaN(s.tavg[i]) {
				nEmpty++
			}
		}
	}
	varY := 0.0
	for _, v := range ms {
		varY += v * v / 12
	}
	varY /= 1 - phiFast*phiFast
	varF := sdSlow * sdSlow
	acfTheory := (phiFast*varY + phiSlow*varF) / (varY + varF)

	p("# The demo data and the truth behind them\n\n")
	p("Everything in this directory is **invented**. Kestrel Bay, its station Kestrel Bay Airfield,\n")
	p("Lanternfield Energy and Kestrel Bay's public holidays do not exist; the numbers were drawn from the\n")
	p("model below with a fixed seed and describe no real place. They exist so that the tool can be tried\n")
	p("out without downloading anything, and so that tests can check that fitting recovers known values.\n\n")
	p("Regenerate (byte-identical) from the module root with\n\n    go run ./demo/gen\n\n")
	p("This file is written by the same program; edit the constants in `demo/gen/main.go`, not this file.\n\n")

	p("## kestrel_bay_daily.csv\n\n")
	p("Columns `date,tavg`: daily mean temperature in °C, rounded to 0.1 °C, %s to %s\n", firstDay, lastDay)
	p("(%d days, %d rows). Time t counts days from the model epoch %s.\n\n", int(lastDay-firstDay)+1, nRows, calendar.Epoch)
	p("    T(t) = S(t) + F(t) + Y(t)\n")
	p("    S(t) = a + b·t + A₁ cos(ω(t − t₁)) + A₂ cos(2ω(t − t₂)),   ω = 2π / 365.25\n")
	p("    F(t) = φ_slow F(t−1) + s_F √(1 − φ_slow²) η(t),             η ~ N(0, 1)\n")
	p("    Y(t) = φ Y(t−1) + σ(t) ε(t)\n")
	p("    σ(t) = σ̄ + h cos(ω(t − t_σ))\n\n")
	p("| parameter | value |\n|---|---|\n")
	p("| seed (math/rand/v2 PCG, stream 1) | %#x |\n", seed)
	p("| a, level at %s without the seasonal cycle | %.1f °C |\n", calendar.Epoch, level)
	p("| b, trend | %.1f °C/decade (%.4f °C/year, %.4e °C/day) |\n", trendPerDecade, trendPerDecade/10, slope)
	p("| A₁, annual amplitude | %.1f °C |\n", amp1)
	p("| t₁, annual peak | day %.0f after the epoch (%s), repeating every 365.25 days |\n", peak1, calendar.Epoch+calendar.Date(peak1))
	p("| A₂, semi-annual amplitude | %.1f °C |\n", amp2)
	p("| t₂, semi-annual peak | day %.0f after the epoch (%s), and half a year either side: the cycle peaks %.1f °C above a and dips %.1f °C below |\n", peak2, calendar.Epoch+calendar.Date(peak2), amp1+amp2, amp1-amp2)
	p("| c₁, s₁ (c cos ωt + s sin ωt) | %.4f, %.4f °C |\n", c1, s1)
	p("| θ₁ = atan2(c₁, s₁) (α sin(ωt + θ)) | %.4f rad |\n", math.Atan2(c1, s1))
	p("| c₂, s₂ | %.4f, %.4f °C |\n", c2, s2)
	p("| warmest / coldest day of S (2001) | %s / %s |\n", warm.Time().Format("2 January"), cold.Time().Format("2 January"))
	p("| warmest / coldest calendar month of S | %s / %s |\n", warmM, coldM)
	p("| φ, fast persistence | %.2f |\n", phiFast)
	p("| φ_slow, slow persistence | %.3f |\n", phiSlow)
	p("| s_F, stationary sd of F | %.1f °C |\n", sdSlow)
	p("| σ̄, h, t_σ | %.2f °C, %.2f °C, day %.0f (%s) |\n", sigmaMid, sigmaHalfRange, sigmaPeak, calendar.Epoch+calendar.Date(sigmaPeak))
	p("| ε | unit-variance Fernández–Steel two-piece skewed Student-t |\n")
	p("| ν | %.0f |\n", nu)
	p("| ξ (< 1: longer cold tail) | %.2f |\n", xi)
	p("| skewness, excess kurtosis of ε | %.4f, %.4f |\n\n", skew, exk)

	p("σ(t) by calendar month (root mean square over the days of the month):\n\n")
	p("| Jan | Feb | Mar | Apr | May | Jun | Jul | Aug | Sep | Oct | Nov | Dec |\n")
	p("|---|---|---|---|---|---|---|---|---|---|---|---|\n|")
	for _, v := range ms {
		p(" %.2f |", v)
	}
	p("\n\n")
	p("The shock ε is drawn as follows: Z from a standard Student-t with ν degrees of freedom\n")
	p("(normal over the root of a chi-square/ν, the chi-square from a Marsaglia–Tsang gamma draw);\n")
	p("W = ξ|Z| with probability ξ²/(1 + ξ²), else W = −|Z|/ξ; ε = (W − E W)/sd(W), with\n")
	p("E W = %.6f and sd(W) = %.6f from the closed-form moments of the two-piece t.\n\n", sk.mean, sk.sd)
	p("F and Y start at 0 on %s and run three years before the first published day.\n", burnStart)
	p("Published values are T rounded to 0.1 °C.\n\n")

	p("### Missing days: %d\n\n", len(missingDays()))
	p("- %d empty `tavg` values scattered: ", len(scattered))
	for i, d := range scattered {
		if i > 0 {
			p(", ")
		}
		p("%s", d)
	}
	p("\n- one run of %d consecutive empty values: %s to %s\n", runLen, runStart, runStart+calendar.Date(runLen-1))
	p("- one absent row (the date does not appear): %s\n\n", absent)
	p("So the file has %d rows, %d of them with an empty value, and the longest gap is %d days.\n\n", nRows, nEmpty, runLen)

	hm, hs := generatorHDD(hddYear, hddYears)
	p("### The generator's own degree-day spread\n\n")
	p("%d synthetic years %d drawn from the generator itself (math/rand/v2 PCG, stream 3; F from its\n", hddYears, hddYear)
	p("stationary law, Y after a 200-day burn-in, T before rounding) give annual HDD (base 18 °C)\n")
	p("with mean %.1f and standard deviation %.1f °C·day. The tool's tests compare the fitted model's\n", hm, hs)
	p("simulated spread with this value.\n\n")
	p("| generator annual HDD %d | value |\n|---|---|\n| mean | %.1f °C·day |\n| sd | %.1f °C·day |\n\n", hddYear, hm, hs)
	p("### What a fit should find\n\n")
	p("The tool's model has the same structure (fast AR plus slow AR(1)); a fit without the slow part\n")
	p("(`--slow none`) sees the blend of both in a single AR(1):\n")
	p("theoretical lag-1 autocorrelation of X = F + Y is %.3f (stationary var(Y) with the\n", acfTheory)
	p("month-averaged σ², var(F) = s_F²). What F leaks into the AR(1) residuals is about 0.2 °C of\n")
	p("near-normal noise, small beside σ of 1.7–3 °C, so the monthly σ come out only slightly above\n")
	p("the table and the fitted ν and ξ close to the generating ones; the sample moments of ε below\n")
	p("show how far this one draw is from the theoretical skewness and kurtosis.\n\n")
	p("Realised in this draw; the first row and the last two use the published values, the rest the\n")
	p("values before rounding:\n\n")
	p("| statistic | value |\n|---|---|\n")
	p("| mean of the published tavg | %.3f °C |\n", re.meanT)
	p("| OLS trend of the %d annual means | %.3f °C/decade (standard error about 0.03) |\n", lastDay.Year()-firstDay.Year()+1, re.trend)
	p("| lag-1 autocorrelation of X | %.4f |\n", re.acf1)
	p("| AR(1) least-squares φ on X | %.4f |\n", re.phiAR1)
	p("| sample skewness of ε | %.4f |\n", re.shockSkew)
	p("| sample excess kurtosis of ε | %.4f |\n", re.shockExKur)
	p("| largest one-day fall of the published tavg | %.1f °C, %s to %s |\n", re.fall, re.fallDay-1, re.fallDay)
	p("| largest one-day rise of the published tavg | %.1f °C, %s to %s |\n\n", re.rise, re.riseDay-1, re.riseDay)
	p("With ν = %.0f the shocks have a heavy cold tail: %d days in the record are more than 15 °C\n", nu, re.bigFalls)
	p("colder than the day before. They are part of the draw, not errors.\n\n")
	p("Monthly sd of the AR(1) residuals of X:\n\n")
	p("| Jan | Feb | Mar | Apr | May | Jun | Jul | Aug | Sep | Oct | Nov | Dec |\n")
	p("|---|---|---|---|---|---|---|---|---|---|---|---|\n|")
	for _, v := range re.sigmaAR1 {
		p(" %.2f |", v)
	}
	p("\n\n")

	p("## lanternfield_demand.csv\n\n")
	p("Columns `date,load,holiday`, %s to %s: Lanternfield Energy's daily gas send-out in GJ/day\n", demandFirst, demandLast)
	p("(rounded to a whole GJ/day), and holiday = 1 on a Kestrel Bay public holiday, else 0.\n")
	p("A five-parameter change-point model of the published station tavg T:\n\n")
	p("    D(t) = [β₀ + β_H·max(T_H − T, 0) + β_C·max(T − T_C, 0)] · w(weekday) · h(holiday) + u(t)\n")
	p("    u(t) = φ_u u(t−1) + σ_u z(t),   z ~ N(0, 1)\n\n")
	p("| parameter | value |\n|---|---|\n")
	p("| seed (math/rand/v2 PCG, stream 2) | %#x |\n", seed)
	p("| β₀, base load | %.0f GJ/day |\n", base)
	p("| β_H, heating slope | %.0f GJ/day per °C |\n", heatSlope)
	p("| T_H, heating balance point | %.1f °C |\n", heatBase)
	p("| β_C, cooling slope | %.0f GJ/day per °C |\n", coolSlope)
	p("| T_C, cooling balance point | %.1f °C |\n", coolBase)
	p("| w: Saturday, Sunday, other days | %.2f, %.2f, 1.00 |\n", saturday, sunday)
	p("| h: holiday, other days | %.2f, 1.00 |\n", holidayFactor)
	p("| φ_u | %.1f |\n", demandPhi)
	p("| σ_u, innovation sd | %.0f GJ/day (stationary sd %.0f GJ/day) |\n", demandSigma, demandSigma/math.Sqrt(1-demandPhi*demandPhi))
	p("| u at %s | a draw from the stationary distribution |\n\n", demandFirst)
	p("The factors multiply the whole temperature-driven load, so in an additive fit the weekend and\n")
	p("holiday effects scale with demand: a Sunday is %.0f GJ/day below a weekday at 0 °C, but only\n", (1-sunday)*(base+heatSlope*heatBase))
	p("%.0f GJ/day below between %.1f and %.1f °C.\n", (1-sunday)*base, heatBase, coolBase)
	p("T is the station's published (rounded) tavg; on a day without one (an empty value or the absent\n")
	p("row) the demand used S(t) from the table above instead.\n\n")
	p("Holidays (fixed dates, no substitute days; a weekend holiday takes both factors):\n\n")
	for _, h := range holidays {
		p("- %d %s: %s\n", h.day, h.month, h.name)
	}
	return []byte(b.String())
}
