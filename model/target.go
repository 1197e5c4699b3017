package model

// TargetYear returns year, or when it is 0 the default target year of a
// simulation from f: the calendar year after the data end. This is the one
// place the default is decided.
func (f *File) TargetYear(year int) int {
	if year != 0 {
		return year
	}
	return f.Data.LastDate.Year() + 1
}
