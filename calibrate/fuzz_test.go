package calibrate

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"math"
	"strings"
	"testing"
)

// fuzzUnits maps the fuzzer's byte to a units option.
var fuzzUnits = [...]Units{"", Celsius, Fahrenheit}

// FuzzReadCSV reads arbitrary input. When splice is zero the input is data
// itself; otherwise data replaces one line of a good Kestrel Bay file (line
// (splice-1) mod 801, 0 being the header), so that small mutations also reach
// the success path and the grid invariants get checked on full-length files.
func FuzzReadCSV(f *testing.F) {
	for _, c := range errorCases {
		for u, units := range fuzzUnits {
			if c.opt.Units == units {
				f.Add([]byte(c.text), uint8(u), c.opt.MeanColumn, uint16(0))
			}
		}
	}
	days := kestrelBay(kestrelStart, kestrelDays, 0, 1)
	// Splices into the good file (whole files of 730+ rows make slow seeds:
	// the fuzzer spends its time minimising them): a gap, a dropped row,
	// padded fields, a repeated date, a different header, missing ends.
	f.Add([]byte("2019-03-05,NA,"), uint8(0), "", uint16(6))
	f.Add([]byte(""), uint8(0), "", uint16(400))
	f.Add([]byte(" 2019-03-01 , 5.5 , -1.25 "), uint8(0), "", uint16(2))
	f.Add([]byte("2019-03-02,1,0\n2019-03-02,1,0"), uint8(1), "", uint16(3))
	f.Add([]byte("Date,TX,TN"), uint8(0), "tn", uint16(1))
	f.Add([]byte("2019-03-01,-9999,1"), uint8(0), "", uint16(2))
	f.Add([]byte("2021-05-09,,"), uint8(0), "", uint16(801))

	base := strings.Split(csvText("date,tmax,tmin", pairRows(days), "\n"), "\n")
	base = base[:len(base)-1] // the text ends with a line end
	f.Fuzz(func(t *testing.T, data []byte, unitsByte uint8, meanColumn string, splice uint16) {
		opt := ReadOptions{Units: fuzzUnits[int(unitsByte)%len(fuzzUnits)], MeanColumn: meanColumn}
		if splice != 0 {
			lines := append([]string{}, base...)
			lines[int(splice-1)%len(lines)] = string(data)
			data = []byte(strings.Join(lines, "\n") + "\n")
		}
		const name = "fuzz.csv"
		s, err := ReadCSV(bytes.NewReader(data), name, opt)
		if err != nil {
			var list ErrorList
			var pe *PosError
			if !errors.As(err, &list) && !errors.As(err, &pe) {
				t.Fatalf("error of type %T: %v", err, err)
			}
			if !strings.HasPrefix(err.Error(), name) {
				t.Fatalf("error does not start with the name: %q", err)
			}
			if s != nil {
				t.Fatal("a series returned with an error")
			}
			return
		}

		celsius := func(v float64) float64 {
			if s.Units == Fahrenheit {
				return (v - 32) * 5 / 9
			}
			return v
		}
		if len(s.Temps) < minDaysWithValues {
			t.Fatalf("%d days, fewer than %d", len(s.Temps), minDaysWithValues)
		}
		if math.IsNaN(s.Temps[0]) || math.IsNaN(s.Temps[len(s.Temps)-1]) {
			t.Fatal("the series starts or ends with a gap")
		}
		values := 0
		for i, v := range s.Temps {
			if math.IsNaN(v) {
				continue
			}
			values++
			if math.IsInf(v, 0) || math.Abs(celsius(v)) > plausibleC {
				t.Fatalf("Temps[%d] = %v %s, beyond ±60 °C", i, v, s.Units)
			}
		}
		if values < minDaysWithValues {
			t.Fatalf("%d days with values, fewer than %d", values, minDaysWithValues)
		}
		if s.Name != name || s.MeanFrom == "" || (opt.Units != "" && s.Units != opt.Units) {
			t.Fatalf("Name %q, MeanFrom %q, Units %q", s.Name, s.MeanFrom, s.Units)
		}
		if sum := sha256.Sum256(data); s.SHA256 != hex.EncodeToString(sum[:]) {
			t.Fatalf("SHA256 %s, want %x", s.SHA256, sum)
		}
	})
}
