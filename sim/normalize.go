package sim

import (
	"context"
	"fmt"

	"wxstress/calendar"
	"wxstress/model"
)

// HistoryDay is one observed day of demand history.
type HistoryDay struct {
	Date    calendar.Date
	Temp    float64 // observed daily mean, in the model's units
	Load    float64
	Holiday bool
}

// YearNormal compares one historical year's demand with what the same
// calendar would have used under normal weather.
type YearNormal struct {
	Year int
	Days int // days of the year in the history
	// Actual is the observed demand over those days; AtActualWeather the
	// demand model's expected value at the observed temperatures; and
	// AtNormalWeather its mean over the climatological simulation of that
	// year (the trend at that year, the same calendar and holidays).
	Actual, AtActualWeather, AtNormalWeather float64
	// Normalized is the weather-normalized actual demand:
	// Actual − AtActualWeather + AtNormalWeather.
	Normalized float64
}

// WeatherNormalize computes YearNormal for each calendar year of history,
// simulating paths climatological years of each (a Fan run) for the normal
// weather. cfg supplies the seed and the bases; its periods, year, start
// and demand are set here.
func WeatherNormalize(ctx context.Context, m *model.File, d *model.Demand, cfg Config, history []HistoryDay, paths int) ([]YearNormal, error) {
	if len(history) == 0 {
		return nil, fmt.Errorf("sim: no demand history to normalize")
	}
	var holidays []calendar.Date
	for _, h := range history {
		if h.Holiday {
			holidays = append(holidays, h.Date)
		}
	}
	var out []YearNormal
	for lo := 0; lo < len(history); {
		year := history[lo].Date.Year()
		hi := lo
		for hi < len(history) && history[hi].Date.Year() == year {
			hi++
		}
		c := cfg
		c.Year, c.Start, c.Demand, c.Holidays, c.Capacity = year, StartClimate, d, holidays, 0
		fan, err := RunFan(ctx, m, c, paths)
		if err != nil {
			return nil, err
		}
		y := YearNormal{Year: year, Days: hi - lo}
		start := calendar.YearStart(year)
		for _, h := range history[lo:hi] {
			y.Actual += h.Load
			y.AtActualWeather += d.Expected(h.Temp, h.Date.Weekday(), h.Holiday)
			y.AtNormalWeather += fan.DemandMean[h.Date-start]
		}
		y.Normalized = y.Actual - y.AtActualWeather + y.AtNormalWeather
		out = append(out, y)
		lo = hi
	}
	return out, nil
}
