package calibrate

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"math"
	"strings"
	"testing"
	"time"

	"wxstress/calendar"
)

// FuzzReadDemand reads arbitrary input. When splice is zero the input is
// data itself; otherwise data replaces line (splice-1) mod 401 of a good
// 400-day file (0 being the header), so that small mutations also reach the
// success path and its invariants get checked.
func FuzzReadDemand(f *testing.F) {
	f.Add([]byte("date,load,holiday\n2021-01-01,5,1\n2021-01-02,-1,maybe\n"), uint16(0))
	f.Add([]byte("Date,Demand\n\"2021-01-01\",\"7\"\n"), uint16(0))
	f.Add([]byte(""), uint16(0))
	f.Add([]byte("2021-01-05,NA,0"), uint16(6))
	f.Add([]byte(""), uint16(200))
	f.Add([]byte("2021-01-02,1,0\n2021-01-02,1,0"), uint16(3))
	f.Add([]byte("day,value,is_holiday"), uint16(1))
	f.Add([]byte("2021-01-01,-9999,yes"), uint16(2))

	start := calendar.FromYMD(2021, time.January, 1)
	base := strings.Split(demandCSV(start, 400, nil), "\n")
	base = base[:len(base)-1]
	f.Fuzz(func(t *testing.T, data []byte, splice uint16) {
		if splice != 0 {
			lines := append([]string{}, base...)
			lines[int(splice-1)%len(lines)] = string(data)
			data = []byte(strings.Join(lines, "\n") + "\n")
		}
		const name = "fuzz.csv"
		d, err := ReadDemand(bytes.NewReader(data), name, DemandReadOptions{Holidays: &Holidays{Dates: []calendar.Date{start + 3}}})
		if err != nil {
			var list ErrorList
			if !errors.As(err, &list) || !errors.Is(err, ErrBadInput) {
				t.Fatalf("error of type %T: %v", err, err)
			}
			if !strings.HasPrefix(err.Error(), name) || d != nil {
				t.Fatalf("error %q, series %v", err, d != nil)
			}
			return
		}
		n := len(d.Dates)
		if len(d.Load) != n || len(d.Holiday) != n || len(d.Line) != n || len(d.Column) != n {
			t.Fatal("slices of different lengths")
		}
		missing, holidays := 0, 0
		for i := range n {
			if i > 0 && d.Dates[i] <= d.Dates[i-1] {
				t.Fatalf("dates not increasing at %d", i)
			}
			if math.IsNaN(d.Load[i]) {
				missing++
			} else if d.Load[i] < 0 || math.IsInf(d.Load[i], 0) {
				t.Fatalf("load %v accepted", d.Load[i])
			}
			if d.Holiday[i] {
				holidays++
			}
			if d.Line[i] < 2 || d.Column[i] < 1 {
				t.Fatalf("row %d at %d:%d", i, d.Line[i], d.Column[i])
			}
		}
		if missing != d.Missing || d.DaysWithLoad() < MinDemandDays || holidays != d.Holidays {
			t.Fatalf("missing %d (counted %d), with load %d, holidays %d (counted %d)", missing, d.Missing, d.DaysWithLoad(), holidays, d.Holidays)
		}
		if d.Absent != int(d.Dates[n-1]-d.Dates[0])+1-n {
			t.Fatalf("absent %d", d.Absent)
		}
		if sum := sha256.Sum256(data); d.SHA256 != hex.EncodeToString(sum[:]) {
			t.Fatalf("SHA256 %s, want %x", d.SHA256, sum)
		}
	})
}
