package hedge

import (
	"errors"
	"math"
	"reflect"
	"strings"
	"testing"
)

// Two contracts, one key a line, so a case can replace line L (1-based; 15
// appends) and name the line of its error. The lines are counted by hand.
var base = []string{
	`[[contract]]`,       // 1
	`name = "a"`,         // 2
	`index = "hdd"`,      // 3
	`period = "heating"`, // 4
	`kind = "call"`,      // 5
	`strike = 2450`,      // 6
	`tick = 4000`,        // 7
	`[[contract]]`,       // 8
	`name = "b"`,         // 9
	`index = "hdd"`,      // 10
	`period = "Heating"`, // 11
	`kind = "put"`,       // 12
	`strike = 2300`,      // 13
	`tick = 4000`,        // 14
}

func withLine(l int, text string) string {
	lines := append([]string(nil), base...)
	if l > len(lines) {
		lines = append(lines, text)
	} else {
		lines[l-1] = text
	}
	return strings.Join(lines, "\n") + "\n"
}

func TestParseBase(t *testing.T) {
	t.Parallel()
	f, err := Parse([]byte(withLine(15, `quantity = -2`)), "ok.toml")
	if err != nil {
		t.Fatal(err)
	}
	want := []Contract{
		{Name: "a", Index: "hdd", Period: "heating", Kind: Call, Strike: 2450, Tick: 4000, Limit: math.Inf(1), Quantity: 1},
		{Name: "b", Index: "hdd", Period: "heating", Kind: Put, Strike: 2300, Tick: 4000, Limit: math.Inf(1), Quantity: -2},
	}
	if !reflect.DeepEqual(f.Contracts, want) || f.Exposure != nil {
		t.Errorf("parsed %+v, want %+v", f.Contracts, want)
	}
	if got := f.Needs(); !reflect.DeepEqual(got, []Key{{"hdd", "heating"}}) {
		t.Errorf("Needs() = %v", got)
	}
	if f.Currency != "currency" { // none given: the money columns read "(currency)", not "()"
		t.Errorf("currency %q", f.Currency)
	}
}

func TestBadHedgeFiles(t *testing.T) {
	t.Parallel()
	const expo = "currency = \"EUR\"\n[exposure]\nindex = \"energy\"\nperiod = \"heating\"\nplan = 100\nprice_above = 9\nprice_below = 2.5\n"
	cases := []struct {
		name, src, want string
	}{
		{"unknown key in the second contract", withLine(15, "strik = 1"),
			"bad.toml:15: key contract.strik: unknown key; valid keys are name, index, period, kind, strike,"},
		// The decoder itself would name line 14, the tick of the last contract.
		{"wrong type in the first contract", withLine(7, `tick = "4000"`),
			"bad.toml:7: key contract.tick: wrong kind of value: want a number, found a string"},
		{"missing strike", withLine(13, "# no strike"),
			`bad.toml:8: key contract.strike (contract "b"): missing; a put needs a strike`},
		{"duplicate names", withLine(9, `name = "a"`),
			`bad.toml:9: key contract.name (contract "a"): "a" is the name of an earlier contract`},
		{"bad kind", withLine(12, `kind = "cap"`),
			`bad.toml:12: key contract.kind (contract "b"): "cap": want swap, call, put or collar`},
		{"bad index", withLine(10, `index = "rain"`),
			`bad.toml:10: key contract.index (contract "b"): "rain": want one of hdd, cdd, energy, peak`},
		{"bad period", withLine(11, `period = "winter"`),
			`bad.toml:11: key contract.period (contract "b"): unknown period "winter"`},
		{"strike_low for a put", withLine(15, "strike_low = 1"),
			`bad.toml:15: key contract.strike_low (contract "b"): only a collar has strike_low`},
		{"strike for a collar", withLine(12, `kind = "collar"`),
			`bad.toml:13: key contract.strike (contract "b"): a collar has strike_low and strike_high, not strike`},
		{"tick zero", withLine(14, "tick = 0"), `bad.toml:14: key contract.tick (contract "b"): 0: want`},
		{"tick missing", withLine(14, "# no tick"), `bad.toml:8: key contract.tick (contract "b"): missing`},
		{"negative limit", withLine(15, "limit = -5"), `bad.toml:15: key contract.limit (contract "b"): -5: want`},
		{"infinite limit", withLine(15, "limit = inf"), `bad.toml:15: key contract.limit (contract "b"): +Inf: want`},
		{"non-finite strike", withLine(13, "strike = nan"), `bad.toml:13: key contract.strike (contract "b"): NaN`},
		{"zero quantity", withLine(15, "quantity = 0"), `bad.toml:15: key contract.quantity (contract "b"): 0: want`},
		{"negative premium", withLine(15, "premium = -1"), `bad.toml:15: key contract.premium (contract "b"): -1: want`},
		// Bounds that keep payouts, their squares and sums finite (a tick
		// of 1e300 made the net cost's variance NaN and the JSON fail).
		{"29 February alone", withLine(11, `period = "02-29:02-29"`), `bad.toml:11: key contract.period (contract "b"): period "02-29:02-29" has no days in 2001`},
		{"formula name", withLine(9, `name = "=cmd"`), `bad.toml:9: key contract.name (contract "=cmd"): "=cmd": want a name that does not start with =`},
		{"huge tick", withLine(14, "tick = 1e300"), `bad.toml:14: key contract.tick (contract "b"): 1e+300: want an amount above 0 and at most 10⁹`},
		{"huge quantity", withLine(15, "quantity = 1e7"), `bad.toml:15: key contract.quantity (contract "b"): 1e+07: want`},
		{"huge plan", strings.Replace(expo, "plan = 100", "plan = 1e300", 1), "bad.toml:5: key exposure.plan: 1e+300: want a volume from 0 to 10¹²"},
		{"unknown top-level key", "currency = \"EUR\"\nhedges = 1\n", "bad.toml:2: key hedges: unknown key; valid keys are currency,"},
		{"unknown key in the exposure", expo + "pln = 3\n", "bad.toml:8: key exposure.pln: unknown key; valid keys are index, period, plan,"},
		{"negative price", strings.Replace(expo, "price_above = 9", "price_above = -9", 1), "bad.toml:6: key exposure.price_above: -9: want"},
		{"missing plan", strings.Replace(expo, "plan = 100", "", 1), "bad.toml:2: key exposure.plan: missing"},
		{"wrong type in the exposure", strings.Replace(expo, "plan = 100", "plan = [100]", 1), "bad.toml:5: key exposure.plan:"},
		{"nothing to evaluate", "currency = \"EUR\"\n", "bad.toml: no [exposure] and no [[contract]]"},
		{"bad units", "units = \"K\"\n" + withLine(15, ""), `bad.toml:1: key units: "K": want "C" or "F"`},
		{"syntax", "[exposure\nindex = 1\n", "bad.toml:"},
	}
	for _, c := range cases {
		_, err := Parse([]byte(c.src), "bad.toml")
		if err == nil {
			t.Errorf("%s: accepted", c.name)
			continue
		}
		if !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s: error %q, want it to start with %q", c.name, err, c.want)
		}
		if !errors.Is(err, ErrFile) {
			t.Errorf("%s: error does not wrap ErrFile", c.name)
		}
	}
}

func TestCollarStrikes(t *testing.T) {
	t.Parallel()
	src := withLine(12, `kind = "collar"`)
	src = strings.Replace(src, "strike = 2300", "strike_low = 2300", 1) + "strike_high = 2300\n"
	_, err := Parse([]byte(src), "bad.toml")
	want := `bad.toml:15: key contract.strike_high (contract "b"): 2300: want strike_low < strike_high`
	if err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Errorf("error %v, want %q", err, want)
	}
	src = strings.Replace(src, "strike_high = 2300", "strike_high = 2500", 1)
	f, err := Parse([]byte(src), "ok.toml")
	if err != nil {
		t.Fatal(err)
	}
	if c := f.Contracts[1]; c.StrikeLow != 2300 || c.StrikeHigh != 2500 || c.Kind != Collar {
		t.Errorf("collar parsed as %+v", c)
	}
}

func TestExampleFile(t *testing.T) {
	t.Parallel()
	f, err := Load("example.toml")
	if err != nil {
		t.Fatal(err)
	}
	want := []Key{{"energy", "heating"}, {"hdd", "heating"}, {"hdd", "jan"}}
	if got := f.Needs(); !reflect.DeepEqual(got, want) {
		t.Errorf("Needs() = %v, want %v", got, want)
	}
	if f.Currency != "EUR" || len(f.Contracts) != 3 || f.Contracts[1].Quantity != 2 || f.Contracts[0].Limit != 2e6 {
		t.Errorf("example parsed as %+v", f)
	}
}

func TestValidateCodeBuiltFile(t *testing.T) {
	t.Parallel()
	f := &File{Contracts: []Contract{{Name: "x", Index: "hdd", Period: "heating", Kind: Call, Strike: 1, Tick: -1, Limit: math.Inf(1), Quantity: 1}}}
	err := f.Validate()
	if want := `hedge: key contract.tick (contract "x"): -1: want`; err == nil || !strings.HasPrefix(err.Error(), want) {
		t.Errorf("error %v, want %q", err, want)
	}
}
