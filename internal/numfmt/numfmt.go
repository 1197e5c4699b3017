package numfmt

import (
	"math"
	"strconv"
	"strings"

	"golang.org/x/text/language"
	"golang.org/x/text/message"
)

// MaxDecimals is the display resolution: no digit below 10⁻⁷ is ever shown.
const MaxDecimals = 7

// relativeNoise is the ratio se/|x| below which a standard error is taken as
// rounding noise of double arithmetic rather than Monte Carlo error.
const relativeNoise = 1e-10

// Exact is the marker ValueSE puts after a value whose standard error is 0.
const Exact = "(exact)"

// printer holds no mutable state (each call takes its own buffer), so one
// is shared by all goroutines.
var printer = message.NewPrinter(language.English)

// Number formats x, which has no error estimate: four significant digits,
// but never fewer than all the integer digits, trailing zeros dropped.
// Values that round to zero at MaxDecimals print as "0".
//
//	20844556.1 → "20,844,556"   2450.37 → "2,450"   6.3 → "6.3"
//	0.012345 → "0.01235"         8.2e-5 → "0.000082"  6.3e-14 → "0"
func Number(x float64) string {
	if s, ok := special(x); ok {
		return s
	}
	if x == 0 {
		return "0"
	}
	return trimZeros(format(x, min(max(3-decade(x), 0), MaxDecimals)))
}

// Value formats x to the precision its standard error se supports: the last
// digit shown is at the decade of the first significant digit of se (as SE
// rounds it), so 2450.37 with se 6.3 gives "2,450", with se 0.63 "2,450.4",
// with se 63 "2,450" (to tens), with se 280 "2,500" (to hundreds). A value
// that rounds to zero is zero within its error and prints "0", without
// decimals or sign: −0.0 or 0.000004 with se 1.6e-5 give "0". An se that is 0, NaN, infinite or
// negligible (below ½·10⁻⁷, or below 10⁻¹⁰·|x|, rounding noise) carries no
// precision and gives Number(x). It panics if se < 0.
func Value(x, se float64) string {
	if s, ok := special(x); ok {
		return s
	}
	if se < 0 {
		panic("numfmt: negative standard error")
	}
	if se == 0 || math.IsNaN(se) || math.IsInf(se, 1) || negligible(x, se) {
		return Number(x)
	}
	d := decade(round2(se))
	decimals := min(-d, MaxDecimals)
	if d > 0 {
		unit := math.Pow(10, float64(d))
		x, decimals = math.Round(x/unit)*unit, 0
	}
	if roundsToZero(x, decimals) {
		return "0" // zero within its error
	}
	return format(x, decimals)
}

// SE formats a standard error to two significant digits after "± ":
// 6.3 → "± 6.3", 283 → "± 280", 0.00163 → "± 0.0016", 23456 → "± 23,000",
// 1 → "± 1.0". Below the display resolution it prints "± 0"; NaN prints
// "± n/a" and +∞ "± ∞". It panics if se < 0.
func SE(se float64) string {
	switch {
	case se < 0:
		panic("numfmt: negative standard error")
	case math.IsNaN(se):
		return "± n/a"
	case math.IsInf(se, 1):
		return "± ∞"
	case se < 0.5e-7:
		return "± 0"
	}
	r := round2(se)
	d := decade(r) - 1 // decade of the second significant digit
	if d >= 0 {
		unit := math.Pow(10, float64(d))
		return "± " + format(math.Round(r/unit)*unit, 0)
	}
	return "± " + format(r, min(-d, MaxDecimals))
}

// ValueSE formats "value ± se" as Value and SE do: "2,450 ± 6.3". A zero se
// marks a deterministic value: "2,450.37 (exact)" (call Value for the
// number without the marker). A negligible se (see Value) gives
// "Number(x) ± 0"; NaN and +∞ give "± n/a" and "± ∞" after Number(x). It
// panics if se < 0.
func ValueSE(x, se float64) string {
	switch {
	case se < 0:
		panic("numfmt: negative standard error")
	case se == 0:
		return Number(x) + " " + Exact
	case math.IsNaN(se) || math.IsInf(se, 1):
		return Number(x) + " " + SE(se)
	case negligible(x, se):
		return Number(x) + " ± 0"
	}
	return Value(x, se) + " " + SE(se)
}

// Fixed formats x with exactly decimals digits after the point (none for 0)
// and thousands separators: Fixed(20844556.1, 2) = "20,844,556.10". A value
// that rounds to zero has no sign: Fixed(-0.001, 2) = "0.00". It panics if
// decimals is negative or above 20.
func Fixed(x float64, decimals int) string {
	if decimals < 0 || decimals > 20 {
		panic("numfmt: decimals outside [0, 20]")
	}
	if s, ok := special(x); ok {
		return s
	}
	return format(x, decimals)
}

// Percent formats the fraction p as a percentage: one decimal from 1 %
// ("12.3%", "100.0%", "-4.0%"), two significant digits below ("0.52%",
// "0.0031%"), down to 0.0001 %; smaller nonzero magnitudes print
// "< 0.0001%" (or "> -0.0001%"), and 0 prints "0.0%".
func Percent(p float64) string {
	if s, ok := special(p); ok {
		return s
	}
	v := 100 * p
	const floor = 1e-4 // percent
	switch a := math.Abs(v); {
	case v == 0:
		return "0.0%"
	case a < 0.5*floor && v > 0:
		return "< 0.0001%"
	case a < 0.5*floor:
		return "> -0.0001%"
	case round1(a) >= 1:
		return format(v, 1) + "%"
	default:
		return format(v, min(1-decade(round2(a)), 4)) + "%"
	}
}

// Prob formats a probability without an exponent, to two significant
// digits of p, or of 1 − p above ½ so that values near 1 stay distinct, with
// trailing zeros dropped: 0.35 → "0.35", 0.05 → "0.05", 0.0123 → "0.012",
// 1e-5 → "0.00001", 3.2e-6 → "0.0000032", 0.9 → "0.9", 0.99997 → "0.99997".
// 0 and 1 print "0" and "1"; other values beyond the display resolution
// print "< 0.0000001" and "> 0.9999999"; NaN prints "n/a". It panics if p is
// outside [0, 1].
func Prob(p float64) string {
	switch {
	case math.IsNaN(p):
		return "n/a"
	case p < 0 || p > 1:
		panic("numfmt: probability outside [0, 1]")
	case p == 0:
		return "0"
	case p == 1:
		return "1"
	case p < 0.5e-7:
		return "< 0.0000001"
	case 1-p < 0.5e-7:
		return "> 0.9999999"
	}
	small := min(p, 1-p)
	decimals := min(1-decade(round2(small)), MaxDecimals)
	return trimZeros(format(p, decimals))
}

// format rounds x to decimals (≥ 0) digits after the point and adds the
// thousands separators of English. Rounding is of the exact binary value,
// ties to even (strconv). A result that is zero is printed without a sign.
func format(x float64, decimals int) string {
	s := strconv.FormatFloat(x, 'f', decimals, 64)
	v, _ := strconv.ParseFloat(s, 64) // exact to the digits shown
	if v == 0 {
		v = 0 // drops the sign of −0
	}
	return printer.Sprintf("%.*f", decimals, v)
}

// roundsToZero reports whether x rounded to decimals (≥ 0) digits is zero.
func roundsToZero(x float64, decimals int) bool {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'f', decimals, 64), 64)
	return v == 0
}

// special formats NaN and infinities.
func special(x float64) (string, bool) {
	switch {
	case math.IsNaN(x):
		return "n/a", true
	case math.IsInf(x, 1):
		return "∞", true
	case math.IsInf(x, -1):
		return "-∞", true
	}
	return "", false
}

// decade returns ⌊log₁₀|x|⌋ for x ≠ 0, exact at powers of ten.
func decade(x float64) int {
	e := strconv.FormatFloat(math.Abs(x), 'e', -1, 64)
	n, _ := strconv.Atoi(e[strings.IndexByte(e, 'e')+1:])
	return n
}

// round2 rounds x to two significant digits.
func round2(x float64) float64 {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'e', 1, 64), 64)
	return v
}

// round1 rounds x to one decimal.
func round1(x float64) float64 {
	v, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'f', 1, 64), 64)
	return v
}

// negligible reports whether se is below the display resolution or is
// rounding noise relative to x.
func negligible(x, se float64) bool {
	return se < 0.5e-7 || se < relativeNoise*math.Abs(x)
}

// trimZeros drops trailing zeros after a decimal point, and the point.
func trimZeros(s string) string {
	if !strings.Contains(s, ".") {
		return s
	}
	return strings.TrimRight(strings.TrimRight(s, "0"), ".")
}

// RoundUp rounds a count up to two significant digits and formats it with
// thousands separators, for counts that are estimates (paths needed):
// RoundUp(63419) = "64,000", RoundUp(87) = "87". It panics if n < 0.
func RoundUp(n int) string {
	if n < 0 {
		panic("numfmt: negative count")
	}
	step := 1
	for n/step >= 100 {
		step *= 10
	}
	return Fixed(float64((n+step-1)/step*step), 0)
}
