// Package numfmt formats numbers for people reading a terminal table or an
// HTML report: thousands separators, no exponents, and no more digits than
// the Monte Carlo error supports.
//
// # Rules
//
// Separators and the decimal point are those of English, from
// golang.org/x/text/message: 20844556 → "20,844,556". Negative numbers use
// the ASCII hyphen-minus, as CSV readers expect. No function ever writes an
// exponent: values of any magnitude are written out in full, and no digit
// below 10⁻⁷ (MaxDecimals) is shown, so numbers smaller than that in their
// unit print as "0" (pick a unit in which the quantity is ordinary). A value
// that rounds to zero never carries a sign: "-0" does not appear. Rounding
// is to nearest of the exact binary value, ties to even (strconv). NaN prints
// "n/a" and infinities "∞" and "-∞".
//
//   - Number(x), for a value with no error estimate: four significant digits
//     but all the integer digits, trailing zeros dropped.
//   - SE(se): two significant digits, "± 6.3", "± 280", "± 0.0016", following
//     the advice to quote an uncertainty to at most two significant digits
//     (JCGM 100:2008, Guide to the Expression of Uncertainty in
//     Measurement, §7.2.6, from memory).
//   - Value(x, se): the last digit shown is at the decade of the first
//     significant digit of se as SE shows it: with se = 6.3 the units digit,
//     with 0.63 the first decimal, with 280 the hundreds (2450.37 → "2,450",
//     "2,450.4", "2,500"). The last digit is then uncertain by one to ten
//     units, and one more digit would be noise. A value that rounds to zero
//     is zero within its error and prints "0". An se of 0, NaN, +∞, below
//     ½·10⁻⁷ or below 10⁻¹⁰·|x| (rounding noise of double arithmetic, not
//     Monte Carlo error) sets no precision: the value prints as Number.
//   - ValueSE(x, se): "2,450 ± 6.3"; an se of exactly 0 marks a deterministic
//     value, "2,450.37 (exact)" (Value gives the number alone); a negligible
//     se prints "± 0".
//   - Fixed(x, d): exactly d decimals with separators, for aligned columns.
//   - Percent(p): the fraction p as a percentage, one decimal from 1 %
//     ("12.3%"), two significant digits below ("0.52%"), "< 0.0001%" below
//     that.
//   - Prob(p): a probability to two significant digits (of 1 − p above ½, so
//     that 0.99997 does not become 1), trailing zeros dropped: "0.05",
//     "0.00001", "0.0000032"; "< 0.0000001" and "> 0.9999999" beyond the
//     display resolution; exactly 0 and 1 print "0" and "1".
//
// # Concurrency
//
// All functions are safe for concurrent use.
package numfmt
