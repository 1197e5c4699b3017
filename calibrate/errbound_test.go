package calibrate

import (
	"errors"
	"fmt"
	"io"
	"strings"
	"testing"
)

// repeatReader yields header, then row n times, without holding the whole
// text in memory.
type repeatReader struct {
	pending string
	row     string
	n       int
}

func (r *repeatReader) Read(p []byte) (int, error) {
	if r.pending == "" {
		if r.n == 0 {
			return 0, io.EOF
		}
		r.pending, r.n = r.row, r.n-1
	}
	k := copy(p, r.pending)
	r.pending = r.pending[k:]
	return k, nil
}

// TestErrorListIsBounded reads 10⁵ bad rows: the list keeps MaxErrors
// errors and ends with the count of the bad rows not listed.
func TestErrorListIsBounded(t *testing.T) {
	t.Parallel()
	const rows = 100_000
	cases := []struct {
		name       string
		read       func(io.Reader) error
		header     string
		row        string
		errsPerRow int
	}{
		{"temperature, one error a row", func(r io.Reader) error { _, err := ReadCSV(r, "k.csv", ReadOptions{}); return err },
			"date,tavg\n", "2020-01-01x,5\n", 1},
		{"temperature, three errors a row", func(r io.Reader) error { _, err := ReadCSV(r, "k.csv", ReadOptions{}); return err },
			"date,tmax,tmin\n", "bad,x,y\n", 3},
		{"demand", func(r io.Reader) error { _, err := ReadDemand(r, "k.csv", DemandReadOptions{}); return err },
			"date,load\n", "2021-02-30,-1\n", 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			err := c.read(&repeatReader{pending: c.header, row: c.row, n: rows})
			var list ErrorList
			if !errors.As(err, &list) || !errors.Is(err, ErrBadInput) {
				t.Fatalf("error %v, want an ErrorList", err)
			}
			if len(list) != MaxErrors+1 {
				t.Fatalf("%d entries, want %d errors and the count", len(list), MaxErrors+1)
			}
			// Rows are listed whole until the list is full; the row that fills
			// it counts among the rows not listed when some of its errors are cut.
			listedRows := MaxErrors / c.errsPerRow
			wantMore := rows - listedRows
			last := list[MaxErrors]
			if last.MoreRows != wantMore || last.Msg != fmt.Sprintf("… and %d more bad rows", wantMore) {
				t.Errorf("last entry %+v, want %d more bad rows", last, wantMore)
			}
			if list[MaxErrors-1].MoreRows != 0 || list[MaxErrors-1].Line != 1+(MaxErrors-1)/c.errsPerRow+1 {
				t.Errorf("entry %d: %+v", MaxErrors-1, list[MaxErrors-1])
			}
			msg := strings.Split(err.Error(), "\n")
			want := fmt.Sprintf("(and %d more errors, then %d more bad rows, in k.csv)", MaxErrors-MaxShown, wantMore)
			if len(msg) != MaxShown+1 || msg[MaxShown] != want {
				t.Errorf("message ends %q, want %q", msg[MaxShown:], want)
			}
		})
	}
}

func TestHolidayErrorsAreBounded(t *testing.T) {
	t.Parallel()
	_, err := ReadHolidays(&repeatReader{row: "2021-13-01\n", n: 1000}, "h.txt")
	var list ErrorList
	if !errors.As(err, &list) || len(list) != MaxErrors+1 || list[MaxErrors].MoreRows != 1000-MaxErrors {
		t.Fatalf("error list of %d, want %d and the count %d", len(list), MaxErrors+1, 1000-MaxErrors)
	}
}
