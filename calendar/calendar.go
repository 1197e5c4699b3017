package calendar

import (
	"fmt"
	"time"
)

// Date is a civil date, counted in days since 1970-01-01.
type Date int32

// Epoch is day 0 of the model's time axis: 2000-01-01.
var Epoch = FromYMD(2000, time.January, 1)

// DaysPerYear is the mean Gregorian calendar year in days, the period of the
// seasonal cycle (the Julian year of 365.25 days is within 0.0075 days of it
// and is the convention used throughout).
const DaysPerYear = 365.25

// FromYMD returns the date of year y, month m, day d. Out-of-range days and
// months normalise as time.Date does (2023-02-30 is 2023-03-02).
func FromYMD(y int, m time.Month, d int) Date {
	t := time.Date(y, m, d, 0, 0, 0, 0, time.UTC)
	return Date(t.Unix() / 86400)
}

// Parse reads an ISO 8601 calendar date, YYYY-MM-DD, and rejects dates that do
// not exist (2023-02-30).
func Parse(s string) (Date, error) {
	t, err := time.Parse(time.DateOnly, s)
	if err != nil {
		return 0, fmt.Errorf("not a date of the form YYYY-MM-DD: %q", s)
	}
	return Date(t.Unix() / 86400), nil
}

// Time returns midnight UTC of the date.
func (d Date) Time() time.Time { return time.Unix(int64(d)*86400, 0).UTC() }

// YMD returns the year, month and day of the date.
func (d Date) YMD() (year int, month time.Month, day int) { return d.Time().Date() }

// Year returns the calendar year of the date.
func (d Date) Year() int { return d.Time().Year() }

// Month returns the calendar month of the date.
func (d Date) Month() time.Month { return d.Time().Month() }

// DayOfYear returns 1 for 1 January up to 365 or 366 for 31 December.
func (d Date) DayOfYear() int { return d.Time().YearDay() }

// Weekday returns the day of the week.
func (d Date) Weekday() time.Weekday { return d.Time().Weekday() }

// String formats the date as YYYY-MM-DD.
func (d Date) String() string { return d.Time().Format(time.DateOnly) }

// ModelTime is the date on the model's time axis: days since Epoch.
func (d Date) ModelTime() float64 { return float64(d - Epoch) }

// YearStart returns 1 January of year y.
func YearStart(y int) Date { return FromYMD(y, time.January, 1) }

// DaysIn returns the number of days in year y (365 or 366).
func DaysIn(y int) int { return int(YearStart(y+1) - YearStart(y)) }

// MarshalText implements encoding.TextMarshaler (YYYY-MM-DD).
func (d Date) MarshalText() ([]byte, error) { return []byte(d.String()), nil }

// UnmarshalText implements encoding.TextUnmarshaler (YYYY-MM-DD).
func (d *Date) UnmarshalText(b []byte) error {
	v, err := Parse(string(b))
	if err != nil {
		return err
	}
	*d = v
	return nil
}
