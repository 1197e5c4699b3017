package calibrate

import (
	"errors"
	"testing"

	"wxstress/calendar"
	"wxstress/model"
)

// A fit that fails on an underlying error wraps both ErrFit and the cause,
// so that errors.Is reaches either, and the message names both.
func TestFitErrorsWrapTheirCause(t *testing.T) {
	t.Parallel()
	// Residuals that are all zero leave the AR(1) regression's one column
	// zero: rank deficient.
	const days = 40
	dates := make([]calendar.Date, days)
	for i := range dates {
		dates[i] = calendar.FromYMD(2021, 1, 1) + calendar.Date(i)
	}
	err := fitNoise(&model.Demand{}, dates, make([]float64, days))
	if !errors.Is(err, ErrFit) || !errors.Is(err, errRankDeficient) {
		t.Fatalf("error %v: want it to wrap ErrFit and errRankDeficient", err)
	}
	const want = "cannot fit: residual AR(1): design matrix is rank deficient"
	if err.Error() != want {
		t.Errorf("message %q, want %q", err.Error(), want)
	}
}
