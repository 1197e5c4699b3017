package stress

import (
	"fmt"
	"math"

	"wxstress/calendar"
	"wxstress/calibrate"
	"wxstress/model"
)

// recordSDs is how many of the model's daily anomaly sds a record given
// beside a model (a history or a season under way) may sit from the
// model's expected temperatures on average before it is refused: a file in
// the other unit scale sits 4 to 10 away, another station of a similar
// climate under 2 (common practice for a plausibility screen; the
// threshold is ours).
const recordSDs = 4

// checkRecord refuses a record that cannot be the model's station in the
// model's units: the mean of its days' departures from the model's
// expected temperature (trend and seasonal cycle) is more than recordSDs
// of the model's daily anomaly sd.
func checkRecord(m *model.File, s *calibrate.Series) error {
	sum, n := 0.0, 0
	for i, v := range s.Temps {
		if math.IsNaN(v) {
			continue
		}
		sum += v - m.Mean((s.Start + calendar.Date(i)).ModelTime())
		n++
	}
	if n == 0 {
		return nil
	}
	mean, sd := sum/float64(n), anomalySD(m)
	if !(sd > 0) || math.Abs(mean) <= recordSDs*sd {
		return nil
	}
	u := model.Units(m.Data.Units)
	hint := "another station's"
	if other := otherUnits(u); math.Abs(averageIn(m, s, other)) < math.Abs(mean)/2 {
		hint = fmt.Sprintf("in °%s", other)
	}
	return fmt.Errorf("%s: its days average %+.1f °%s from the model's expected temperatures, %.0f times the model's "+
		"daily anomaly sd (%.1f °%s): it reads like a record %s, not the model's station in °%s",
		s.Name, mean, u, math.Abs(mean)/sd, sd, u, hint, u)
}

// anomalySD approximates the sd of the model's daily anomaly: the fast
// part's with its monthly σ averaged (as an AR(1) of the sum of the AR
// coefficients) and the slow part's.
func anomalySD(m *model.File) float64 {
	v := 0.0
	for _, s := range m.Volatility.Monthly {
		v += s * s / 12
	}
	phi := 0.0
	for _, p := range m.AR.Phi {
		phi += p
	}
	phi = min(math.Abs(phi), 0.95)
	v /= 1 - phi*phi
	if m.Slow != nil {
		v += m.Slow.SD * m.Slow.SD
	}
	return math.Sqrt(v)
}

// otherUnits is the other temperature scale.
func otherUnits(u model.Units) model.Units {
	if u == model.Fahrenheit {
		return model.Celsius
	}
	return model.Fahrenheit
}

// averageIn is the mean departure of s's days, read as values in units u,
// from m's expected temperatures.
func averageIn(m *model.File, s *calibrate.Series, u model.Units) float64 {
	mu := model.Units(m.Data.Units)
	sum, n := 0.0, 0
	for i, v := range s.Temps {
		if !math.IsNaN(v) {
			sum += u.Convert(v, mu) - m.Mean((s.Start + calendar.Date(i)).ModelTime())
			n++
		}
	}
	return sum / float64(n)
}
