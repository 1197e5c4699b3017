package hedge

import (
	"errors"
	"fmt"
	"math"
	"os"
	"strings"

	"github.com/BurntSushi/toml"

	"wxstress/internal/tomlpos"
	"wxstress/model"
	"wxstress/sim"
)

// ErrFile is wrapped by every error about a hedge file's content.
var ErrFile = errors.New("bad hedge file")

// Kind is the kind of a contract.
type Kind string

// The contract kinds.
const (
	Swap   Kind = "swap"
	Call   Kind = "call"
	Put    Kind = "put"
	Collar Kind = "collar"
)

// Indices returns the index keys a contract or an exposure may name (a new
// slice each time); energy and peak need a run with a demand model.
func Indices() []string { return []string{"hdd", "cdd", "energy", "peak-demand"} }

// Key names a per-path value the simulator produces: an index (one of
// Indices(), a sim.Index key) over a period (a sim.ParsePeriod name, lower
// case).
type Key struct {
	Index, Period string
}

func (k Key) String() string { return k.Index + "/" + k.Period }

// NeedsDemand reports whether the index is a demand index.
func (k Key) NeedsDemand() bool { return k.Index == "energy" || k.Index == "peak-demand" }

// File is a hedge file: the retailer's exposure and its contracts.
type File struct {
	Name string // the file, for messages
	// Units are the degrees the file's degree-day strikes and plans are in
	// ("C" or "F"); empty when the file does not say, and then taken to be
	// the model's.
	Units     string
	Currency  string    // a label only
	Exposure  *Exposure // nil when the file has none
	Contracts []Contract
}

// Exposure is what the retailer loses when a season is adverse: with V the
// index value of a path, its cost is
//
//	C = PriceAbove·max(V − Plan, 0) + PriceBelow·max(Plan − V, 0)
//
// in currency; Plan is in the index's unit, the prices in currency per unit.
type Exposure struct {
	Index, Period string
	Plan          float64
	PriceAbove    float64 // cost of a unit above plan (bought at stress prices)
	PriceBelow    float64 // loss on a unit below plan (sold back)
}

// Key returns the value the exposure reads.
func (e Exposure) Key() Key { return Key{e.Index, e.Period} }

// Cost returns the exposure's cost for index value v.
func (e Exposure) Cost(v float64) float64 {
	return e.PriceAbove*max(v-e.Plan, 0) + e.PriceBelow*max(e.Plan-v, 0)
}

// Contract is a degree-day or volume contract on an index over a period.
// Strike is used by swaps, calls and puts, StrikeLow and StrikeHigh by
// collars. Tick is the currency paid per index unit, Limit the largest
// payout in absolute value (+Inf for none). Quantity is the number of
// contracts held (negative when sold) and Premium the price paid for one.
type Contract struct {
	Name                          string
	Index, Period                 string
	Kind                          Kind
	Strike, StrikeLow, StrikeHigh float64
	Tick                          float64
	Limit                         float64
	Quantity                      float64
	Premium                       float64
}

// Key returns the value the contract reads.
func (c Contract) Key() Key { return Key{c.Index, c.Period} }

// Payoff returns the payout of one contract, bought, for index value i
// (before its premium):
//
//	swap   Tick·(i − Strike)
//	call   Tick·max(i − Strike, 0)
//	put    Tick·max(Strike − i, 0)
//	collar Tick·(max(i − StrikeHigh, 0) − max(StrikeLow − i, 0))
//
// clamped to [−Limit, Limit]. A collar is a call at StrikeHigh bought and a
// put at StrikeLow sold; since at most one of its legs pays at any i,
// capping its net payout is the same as capping each leg.
func (c Contract) Payoff(i float64) float64 {
	var x float64
	switch c.Kind {
	case Swap:
		x = i - c.Strike
	case Call:
		x = max(i-c.Strike, 0)
	case Put:
		x = max(c.Strike-i, 0)
	case Collar:
		x = max(i-c.StrikeHigh, 0) - max(c.StrikeLow-i, 0)
	default:
		panic(fmt.Sprintf("hedge: contract %q has unknown kind %q", c.Name, c.Kind))
	}
	return min(max(c.Tick*x, -c.Limit), c.Limit)
}

// Needs returns the values Evaluate needs, each once: the exposure's first,
// then the contracts' in file order.
func (f *File) Needs() []Key {
	var keys []Key
	add := func(k Key) {
		for _, have := range keys {
			if have == k {
				return
			}
		}
		keys = append(keys, k)
	}
	if f.Exposure != nil {
		add(f.Exposure.Key())
	}
	for _, c := range f.Contracts {
		add(c.Key())
	}
	return keys
}

// KeyError is a problem with one key of a hedge file.
type KeyError struct {
	File     string // "" for a File built in code
	Line     int    // 1-based; 0 when unknown
	Key      string // dotted, e.g. "contract.strike"; "" for the file as a whole
	Contract string // the contract's name, when the key is in a contract that has one
	Msg      string
	elem     int // the contract's index, or −1
}

func (e *KeyError) Error() string {
	var b strings.Builder
	switch {
	case e.File == "":
		b.WriteString("hedge")
	case e.Line > 0:
		fmt.Fprintf(&b, "%s:%d", e.File, e.Line)
	default:
		b.WriteString(e.File)
	}
	if e.Key != "" {
		fmt.Fprintf(&b, ": key %s", e.Key)
	}
	if e.Contract != "" {
		fmt.Fprintf(&b, " (contract %q)", e.Contract)
	}
	b.WriteString(": " + e.Msg)
	return b.String()
}

func (e *KeyError) Unwrap() error { return ErrFile }

// Load reads a hedge file.
func Load(path string) (*File, error) {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return Parse(b, path)
}

// The file as decoded; pointers tell a missing key from a zero.
type rawFile struct {
	Currency  string           `toml:"currency"`
	Units     string           `toml:"units"`
	Exposure  *rawExposure     `toml:"exposure"`
	Contracts []toml.Primitive `toml:"contract"` // decoded one by one, to know the element of an error
}

type rawExposure struct {
	Index      string   `toml:"index"`
	Period     string   `toml:"period"`
	Plan       *float64 `toml:"plan"`
	PriceAbove *float64 `toml:"price_above"`
	PriceBelow *float64 `toml:"price_below"`
}

type rawContract struct {
	Name       string   `toml:"name"`
	Index      string   `toml:"index"`
	Period     string   `toml:"period"`
	Kind       string   `toml:"kind"`
	Strike     *float64 `toml:"strike"`
	StrikeLow  *float64 `toml:"strike_low"`
	StrikeHigh *float64 `toml:"strike_high"`
	Tick       *float64 `toml:"tick"`
	Limit      *float64 `toml:"limit"`
	Quantity   *float64 `toml:"quantity"`
	Premium    *float64 `toml:"premium"`
}

// valid lists the keys of each table, for messages.
var valid = map[string]string{
	"":         "currency, units, [exposure], [[contract]]",
	"exposure": "index, period, plan, price_above, price_below",
	"contract": "name, index, period, kind, strike, strike_low, strike_high, tick, limit, quantity, premium",
}

// Parse decodes a hedge file from TOML, strictly: unknown keys, wrong types,
// missing keys and out-of-range values are errors (*KeyError, wrapping
// ErrFile) naming the file, the line and the key. Period names are checked
// with sim.ParsePeriod and stored in its lower-case form.
func Parse(src []byte, file string) (*File, error) {
	var raw rawFile
	md, err := toml.Decode(string(src), &raw)
	if err != nil {
		return nil, decodeError(err, src, file, -1)
	}
	rcs := make([]rawContract, len(raw.Contracts))
	for i, p := range raw.Contracts {
		if err := md.PrimitiveDecode(p, &rcs[i]); err != nil {
			return nil, decodeError(err, src, file, i)
		}
	}
	if und := md.Undecoded(); len(und) > 0 {
		k := und[0]
		keys := valid[""]
		if v, ok := valid[k[0]]; ok && len(k) > 1 {
			keys = v
		}
		return nil, &KeyError{File: file, Line: tomlpos.Line(src, k, -1), Key: k.String(),
			Msg: "unknown key; valid keys are " + keys, elem: -1}
	}
	f, err := build(&raw, rcs)
	if err == nil {
		err = f.check()
	}
	if err != nil {
		ke := err.(*KeyError)
		ke.File = file
		if ke.Key != "" {
			key := toml.Key(strings.Split(ke.Key, "."))
			if ke.Line = tomlpos.Line(src, key, ke.elem); ke.Line == 0 {
				ke.Line = tomlpos.Line(src, key[:len(key)-1], ke.elem) // a missing key: its table's header
			}
		}
		return nil, ke
	}
	f.Name = file
	return f, nil
}

// decodeError turns a decoder error into a KeyError; elem ≥ 0 when it came
// from decoding that contract, whose element then gives the line.
func decodeError(err error, src []byte, file string, elem int) error {
	line, key, msg, ok := tomlpos.Split(err)
	if !ok {
		return fmt.Errorf("%s: %w: %w", file, ErrFile, err)
	}
	if elem >= 0 && key != "" {
		if !strings.HasPrefix(key, "contract.") {
			key = "contract." + key
		}
		// The decoder gives the line of the key in the last element.
		if l := tomlpos.Line(src, toml.Key(strings.Split(key, ".")), elem); l > 0 {
			line = l
		}
	}
	return &KeyError{File: file, Line: line, Key: key, Msg: msg, elem: -1}
}

// build checks which keys are present and fills a File.
func build(raw *rawFile, rcs []rawContract) (*File, error) {
	f := &File{Currency: raw.Currency, Units: raw.Units}
	if raw.Units != "" && raw.Units != "C" && raw.Units != "F" {
		return nil, &KeyError{Key: "units", Msg: fmt.Sprintf("%q: want \"C\" or \"F\" (the degrees of degree-day strikes and plans)", raw.Units), elem: -1}
	}
	if raw.Exposure == nil && len(rcs) == 0 {
		return nil, &KeyError{Msg: "no [exposure] and no [[contract]]: give at least one", elem: -1}
	}
	// The currency heads every money column: a label, "currency" when the
	// file gives none (a column headed "mean payout ()" reads as a slip).
	if f.Currency == "" {
		f.Currency = "currency"
	} else if msg := model.LabelProblem(f.Currency); msg != "" {
		return nil, &KeyError{Key: "currency", Msg: fmt.Sprintf("%q: %s", f.Currency, msg), elem: -1}
	}
	if e := raw.Exposure; e != nil {
		missing := func(key string) error {
			return &KeyError{Key: "exposure." + key, Msg: "missing", elem: -1}
		}
		switch {
		case e.Index == "":
			return nil, missing("index")
		case e.Period == "":
			return nil, missing("period")
		case e.Plan == nil:
			return nil, missing("plan")
		case e.PriceAbove == nil:
			return nil, missing("price_above")
		case e.PriceBelow == nil:
			return nil, missing("price_below")
		}
		f.Exposure = &Exposure{e.Index, periodName(e.Period), *e.Plan, *e.PriceAbove, *e.PriceBelow}
	}
	for i, r := range rcs {
		bad := func(key, format string, a ...any) error {
			return &KeyError{Key: "contract." + key, Contract: r.Name, Msg: fmt.Sprintf(format, a...), elem: i}
		}
		switch {
		case r.Name == "":
			return nil, bad("name", "missing")
		case r.Index == "":
			return nil, bad("index", "missing")
		case r.Period == "":
			return nil, bad("period", "missing")
		case r.Kind == "":
			return nil, bad("kind", "missing; want swap, call, put or collar")
		case r.Tick == nil:
			return nil, bad("tick", "missing; give the currency paid per index unit")
		}
		c := Contract{Name: r.Name, Index: r.Index, Period: periodName(r.Period), Kind: Kind(r.Kind),
			Tick: *r.Tick, Limit: math.Inf(1), Quantity: 1}
		switch c.Kind {
		case Swap, Call, Put:
			if r.Strike == nil {
				return nil, bad("strike", "missing; a %s needs a strike", r.Kind)
			}
			if r.StrikeLow != nil {
				return nil, bad("strike_low", "only a collar has strike_low; a %s has strike", r.Kind)
			}
			if r.StrikeHigh != nil {
				return nil, bad("strike_high", "only a collar has strike_high; a %s has strike", r.Kind)
			}
			c.Strike = *r.Strike
		case Collar:
			if r.Strike != nil {
				return nil, bad("strike", "a collar has strike_low and strike_high, not strike")
			}
			if r.StrikeLow == nil {
				return nil, bad("strike_low", "missing; a collar needs strike_low and strike_high")
			}
			if r.StrikeHigh == nil {
				return nil, bad("strike_high", "missing; a collar needs strike_low and strike_high")
			}
			c.StrikeLow, c.StrikeHigh = *r.StrikeLow, *r.StrikeHigh
		default:
			return nil, bad("kind", "%q: want swap, call, put or collar", r.Kind)
		}
		if r.Limit != nil {
			if !finite(*r.Limit) {
				return nil, bad("limit", "%v: want a finite amount > 0 (leave it out for no limit)", *r.Limit)
			}
			c.Limit = *r.Limit
		}
		if r.Quantity != nil {
			c.Quantity = *r.Quantity
		}
		if r.Premium != nil {
			c.Premium = *r.Premium
		}
		f.Contracts = append(f.Contracts, c)
	}
	return f, nil
}

// periodName is the name sim.ParsePeriod gives a period: trimmed, lower
// case.
func periodName(s string) string { return strings.ToLower(strings.TrimSpace(s)) }

// Validate checks the values of a File built in code, as Parse does. It
// does not modify f; Parse also stores period names in lower case, as
// sim.ParsePeriod names them, which Validate leaves to the caller.
func (f *File) Validate() error {
	return f.check()
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Bounds of a hedge file's amounts: far beyond any real book, and small
// enough that payouts, their squares and their sums over a million paths
// stay finite (a tick of 10³⁰⁰ made the variance NaN).
const (
	maxLevel    = 1e12 // a plan or strike, in the index's unit
	maxPrice    = 1e9  // a tick or exposure price, currency per index unit
	maxAmount   = 1e15 // a limit or premium, currency
	maxQuantity = 1e6  // contracts held or sold
)

// check validates values; its KeyErrors carry the key
// and the contract's index, Parse adds the file and line.
func (f *File) check() error {
	index := func(v string) string {
		for _, x := range Indices() {
			if v == x {
				return ""
			}
		}
		return fmt.Sprintf("%q: want one of %s", v, strings.Join(Indices(), ", "))
	}
	period := func(v string) string {
		// In a leap year and in another: 02-29:02-29 has a day only in
		// the first.
		for _, y := range []int{2000, 2001} {
			if _, err := sim.ParsePeriod(v, y); err != nil {
				return strings.TrimPrefix(err.Error(), "sim: ")
			}
		}
		return ""
	}
	if e := f.Exposure; e != nil {
		bad := func(key, format string, a ...any) error {
			return &KeyError{Key: "exposure." + key, Msg: fmt.Sprintf(format, a...), elem: -1}
		}
		if msg := index(e.Index); msg != "" {
			return bad("index", "%s", msg)
		}
		if msg := period(e.Period); msg != "" {
			return bad("period", "%s", msg)
		}
		if !(e.Plan >= 0 && e.Plan <= maxLevel) {
			return bad("plan", "%v: want a volume from 0 to 10¹²", e.Plan)
		}
		if !(e.PriceAbove >= 0 && e.PriceAbove <= maxPrice) {
			return bad("price_above", "%v: want a price from 0 to 10⁹ per unit", e.PriceAbove)
		}
		if !(e.PriceBelow >= 0 && e.PriceBelow <= maxPrice) {
			return bad("price_below", "%v: want a price from 0 to 10⁹ per unit", e.PriceBelow)
		}
	} else if len(f.Contracts) == 0 {
		return &KeyError{Msg: "no exposure and no contract: give at least one", elem: -1}
	}
	names := map[string]bool{}
	for i := range f.Contracts {
		c := &f.Contracts[i]
		bad := func(key, format string, a ...any) error {
			return &KeyError{Key: "contract." + key, Contract: c.Name, Msg: fmt.Sprintf(format, a...), elem: i}
		}
		if c.Name == "" {
			return bad("name", "missing")
		}
		if msg := model.LabelProblem(c.Name); msg != "" {
			return bad("name", "%q: %s", c.Name, msg)
		}
		if names[c.Name] {
			return bad("name", "%q is the name of an earlier contract; names must be unique", c.Name)
		}
		names[c.Name] = true
		if msg := index(c.Index); msg != "" {
			return bad("index", "%s", msg)
		}
		if msg := period(c.Period); msg != "" {
			return bad("period", "%s", msg)
		}
		switch c.Kind {
		case Swap, Call, Put:
			if !(math.Abs(c.Strike) <= maxLevel) {
				return bad("strike", "%v: want a number from −10¹² to 10¹²", c.Strike)
			}
		case Collar:
			if !(math.Abs(c.StrikeLow) <= maxLevel) {
				return bad("strike_low", "%v: want a number from −10¹² to 10¹²", c.StrikeLow)
			}
			if !(math.Abs(c.StrikeHigh) <= maxLevel) {
				return bad("strike_high", "%v: want a number from −10¹² to 10¹²", c.StrikeHigh)
			}
			if !(c.StrikeLow < c.StrikeHigh) {
				return bad("strike_high", "%v: want strike_low < strike_high (strike_low is %v)", c.StrikeHigh, c.StrikeLow)
			}
		default:
			return bad("kind", "%q: want swap, call, put or collar", c.Kind)
		}
		if !(c.Tick > 0 && c.Tick <= maxPrice) {
			return bad("tick", "%v: want an amount above 0 and at most 10⁹ per index unit", c.Tick)
		}
		if !(c.Limit > 0 && (c.Limit <= maxAmount || math.IsInf(c.Limit, 1))) {
			return bad("limit", "%v: want an amount above 0 and at most 10¹⁵ (leave it out for no limit)", c.Limit)
		}
		if !(c.Quantity != 0 && math.Abs(c.Quantity) <= maxQuantity) {
			return bad("quantity", "%v: want a number of contracts from −10⁶ to 10⁶, not 0 (negative when sold)", c.Quantity)
		}
		if !(c.Premium >= 0 && c.Premium <= maxAmount) {
			return bad("premium", "%v: want a price from 0 to 10¹⁵ for one contract (quantity gives the side)", c.Premium)
		}
	}
	return nil
}
