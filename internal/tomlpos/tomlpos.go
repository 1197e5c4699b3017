// Package tomlpos finds where a key is set in a TOML document, so that
// errors found after decoding (range checks, unknown keys) can name a line,
// and splits the decoder's errors into line, key and message.
//
// BurntSushi/toml reports positions for syntax errors but not for keys
// checked after decoding, and for a key inside an array of tables
// ([[table]]) its type errors carry the line of the key in the last
// element, not in the element that failed; Line looks the key up in the
// text of a given element instead.
//
// The lookup reads the document line by line: it understands table headers
// ([t], [[t]], [a.b]) and bare, quoted and dotted keys at the start of a
// line, which is how configuration files are written; a key set inside an
// inline table or a multi-line string is not found (Line returns 0).
//
// Functions here are safe for concurrent use.
package tomlpos

import (
	"errors"
	"regexp"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
)

var (
	header = regexp.MustCompile(`^\s*(\[\[?)\s*([A-Za-z0-9_." -]+?)\s*\]\]?`)
	assign = regexp.MustCompile(`^\s*([A-Za-z0-9_."-]+?)\s*=`)
)

// splitKey splits a dotted key, dropping the quotes and spaces around parts
// (enough for the keys configuration files use: no dots inside quotes).
func splitKey(s string) []string {
	parts := strings.Split(s, ".")
	for i, p := range parts {
		parts[i] = strings.Trim(strings.TrimSpace(p), `"`)
	}
	return parts
}

// Line returns the 1-based line that sets key, or the header line of the
// table key names (for a table that is an array of tables, the header of
// its elem-th element); 0 when it finds none.
//
// elem selects an element of an array of tables: with elem ≥ 0 the key is
// looked up only in the elem-th (0-based) [[parent]] table, parent being the
// key without its last part; with elem < 0 the first line that sets the key
// in any element is returned.
func Line(src []byte, key toml.Key, elem int) int {
	if len(key) == 0 {
		return 0
	}
	want := strings.Join(key, ".")
	parent := strings.Join(key[:len(key)-1], ".")
	table := "" // the current table's name
	count := -1 // elements of [[parent]] (or of [[key]]) seen so far, minus one
	seen := 0   // elements of [[key]] seen so far
	for i, line := range strings.Split(string(src), "\n") {
		if m := header.FindStringSubmatch(line); m != nil {
			table = strings.Join(splitKey(m[2]), ".")
			array := m[1] == "[["
			if table == want {
				if !array || elem < 0 || seen == elem {
					return i + 1
				}
				seen++
			}
			if array && table == parent {
				count++
			}
			continue
		}
		m := assign.FindStringSubmatch(line)
		if m == nil {
			continue
		}
		full := strings.Join(splitKey(m[1]), ".")
		if table != "" {
			full = table + "." + full
		}
		if full == want && (elem < 0 || count == elem) {
			return i + 1
		}
	}
	return 0
}

// typeErr matches the decoder's errors for values of the wrong type or range:
// `toml: line 2 (last key "shift.uniform"): incompatible types: ...`.
var typeErr = regexp.MustCompile(`^toml: (?:line (\d+) )?\(last key "([^"]+)"\): (.*)$`)

// Split takes an error of toml.Decode or MetaData.PrimitiveDecode apart. A
// syntax error (toml.ParseError) gives its line, no key and its message
// prefixed with "TOML syntax: "; a type or range error gives the line the
// decoder reports (which, in an array of tables, may be another element's:
// use Line for the element), the dotted key and the message. ok is false for
// other errors.
func Split(err error) (line int, key, msg string, ok bool) {
	var pe toml.ParseError
	if errors.As(err, &pe) {
		return pe.Position.Line, "", "TOML syntax: " + pe.Message, true
	}
	if m := typeErr.FindStringSubmatch(err.Error()); m != nil {
		line, _ = strconv.Atoi(m[1])
		return line, m[2], plainTypes(m[3]), true
	}
	return 0, "", "", false
}

// mismatch matches the decoder's words for a value of the wrong kind:
// "type mismatch for scenarios.Shift: expected table but found int64", "incompatible types: TOML value has type string; destination has type
// float".
var mismatch = regexp.MustCompile(`^(?:type mismatch for [^:]+: expected (\w+) but found (\w+)|` +
	`incompatible types: TOML value has type (\w+); destination has type (\w+))$`)

// kinds names the decoder's types for people.
var kinds = map[string]string{"table": "a table ([name] or {…})", "int64": "an integer", "float64": "a number",
	"string": "a string", "bool": "true or false", "slice": "a list", "array": "a list", "map": "a table",
	"struct": "a table", "int": "an integer", "integer": "an integer", "float": "a number"}

// plainTypes rewords a type mismatch without the program's type names.
func plainTypes(msg string) string {
	m := mismatch.FindStringSubmatch(msg)
	if m == nil {
		return msg
	}
	word := func(k string) string {
		if w, ok := kinds[k]; ok {
			return w
		}
		return k
	}
	want, found := m[1], m[2]
	if want == "" {
		want, found = m[4], m[3]
	}
	return "wrong kind of value: want " + word(want) + ", found " + word(found)
}
