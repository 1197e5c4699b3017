// Package calendar holds the civil-date arithmetic the rest of wxstress shares:
// a Date is a whole day of the proleptic Gregorian calendar, counted from
// 1970-01-01, with no time of day and no time zone.
//
// The model's time axis (the t of the trend and the seasonal cycle) counts days
// from Epoch, 2000-01-01; ModelTime converts.
//
// # Holiday rules
//
// A HolidayRule names one day of every year: a fixed month and day (25
// December), the n-th weekday of a month for n = 1..4 (fourth Thursday of
// November), the last weekday of a month (last Monday of May), or Easter Sunday
// plus a number of days (Good Friday is Easter − 2 days, Easter Monday + 1,
// Ascension + 39, Whit Monday + 50). ParseHolidayRule reads the compact form
//
//	fixed 12-25      25 December
//	4 Thu Nov        fourth Thursday of November (n = 1..4; 1st..4th and first..fourth too)
//	last Mon May     last Monday of May
//	easter           Easter Sunday
//	easter -2        Easter − 2 days (offsets −80..+250)
//
// and also the natural form that HolidayRule.String writes, so that a rule
// written out reads back unchanged. A fifth weekday is not in every month and
// is refused (use last).
//
// HolidaysIn turns a list of holiday dates and a set of rules into the
// holidays of a span of years, as the simulator needs them for the years it
// simulates.
//
// Easter Sunday is the Gregorian one, by the "anonymous Gregorian algorithm"
// (Anonymous, Nature 1876; J. Meeus, Astronomical Algorithms, 2nd ed. 1998,
// ch. 8, after Jones and Butcher). With integer division ÷ and remainder mod,
// for the year Y:
//
//	a = Y mod 19          b = Y ÷ 100          c = Y mod 100
//	d = b ÷ 4             e = b mod 4          f = (b + 8) ÷ 25
//	g = (b − f + 1) ÷ 3   h = (19a + b − d − g + 15) mod 30
//	i = c ÷ 4             k = c mod 4          l = (32 + 2e + 2i − h − k) mod 7
//	m = (a + 11h + 22l) ÷ 451
//	month = (h + l − 7m + 114) ÷ 31    day = (h + l − 7m + 114) mod 31 + 1
//
// The Gregorian rules took effect in 1582; for earlier years the result is the
// proleptic Gregorian date, not the Julian Easter then kept.
//
// All functions are safe for concurrent use; Date and HolidayRule are values.
package calendar
