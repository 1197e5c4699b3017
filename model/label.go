package model

import (
	"strings"
	"unicode"
	"unicode/utf8"
)

// LabelProblem says what is wrong with a name a user gives a scenario or a
// hedge contract, "" when nothing. Such names head tables and the CSV's
// first column, so a name is one line of at most 60 characters, without
// control characters, commas or quotes, without leading or trailing
// spaces, and does not start with a character a spreadsheet reads as a
// formula (=, +, -, @; common practice against formula injection).
func LabelProblem(name string) string {
	switch {
	case name == "":
		return "want a name"
	case utf8.RuneCountInString(name) > 60:
		return "want at most 60 characters"
	case strings.ContainsAny(name, ",\"") || strings.ContainsFunc(name, unicode.IsControl):
		return "want one line without commas, quotes or control characters"
	case strings.ContainsAny(name[:1], "=+-@"):
		return "want a name that does not start with =, +, - or @ (a spreadsheet would read it as a formula)"
	case strings.TrimSpace(name) != name:
		return "want no leading or trailing spaces"
	}
	return ""
}
