package tomlpos

import (
	"strings"
	"testing"

	"github.com/BurntSushi/toml"
)

// The expected lines are counted by hand in the documents below.
const doc = `name = "x"            # 1
# strike = 1          # 2: a comment is not a key
[shift]               # 3
uniform = 1           # 4
[[contract]]          # 5
name = "a"            # 6
strike = 10           # 7
[[contract]]          # 8
"name" = "b"          # 9
[[contract]]          # 10
name = "c"            # 11
  strike   = 30       # 12
[ other . table ]     # 13
deep.key = 2          # 14
`

func TestLine(t *testing.T) {
	t.Parallel()
	cases := []struct {
		key  string
		elem int
		want int
	}{
		{"name", -1, 1},
		{"shift", -1, 3},
		{"shift.uniform", -1, 4},
		{"contract.name", -1, 6},
		{"contract.name", 1, 9},
		{"contract.name", 2, 11},
		{"contract.strike", -1, 7},
		{"contract.strike", 1, 0}, // the second contract has no strike
		{"contract.strike", 2, 12},
		{"contract", 0, 5},
		{"contract", 2, 10},
		{"contract", 3, 0},
		{"other.table", -1, 13},
		{"other.table.deep.key", -1, 14},
		{"missing", -1, 0},
		{"shift.missing", -1, 0},
	}
	for _, c := range cases {
		if got := Line([]byte(doc), toml.Key(strings.Split(c.key, ".")), c.elem); got != c.want {
			t.Errorf("Line(%s, %d) = %d, want %d", c.key, c.elem, got, c.want)
		}
	}
}

func TestSplit(t *testing.T) {
	t.Parallel()
	var v struct {
		A []struct {
			B float64 `toml:"b"`
		} `toml:"a"`
	}
	_, err := toml.Decode("[[a]]\nb = 1\n[[a]]\nb = \"two\"\n", &v)
	line, key, msg, ok := Split(err)
	// The decoder names the key of the last element; Line finds the element.
	if !ok || line != 4 || key != "a.b" || msg != "wrong kind of value: want a number, found a string" {
		t.Errorf("type error split into %d %q %q %v (from %v)", line, key, msg, ok, err)
	}
	_, err = toml.Decode("x = 1\n[a\n", &v)
	line, key, msg, ok = Split(err)
	if !ok || line < 2 || key != "" || !strings.HasPrefix(msg, "TOML syntax: ") {
		t.Errorf("syntax error split into %d %q %q %v (from %v)", line, key, msg, ok, err)
	}
}

// TestPlainTypes: the decoder's type names are reworded for people.
func TestPlainTypes(t *testing.T) {
	for in, want := range map[string]string{
		"type mismatch for scenarios.Shift: expected table but found int64":             "wrong kind of value: want a table ([name] or {…}), found an integer",
		"incompatible types: TOML value has type string; destination has type float":    "wrong kind of value: want a number, found a string",
		"incompatible types: TOML value has type float64; destination has type integer": "wrong kind of value: want an integer, found a number",
		"value out of range": "value out of range",
	} {
		if got := plainTypes(in); got != want {
			t.Errorf("%q: %q, want %q", in, got, want)
		}
	}
}
