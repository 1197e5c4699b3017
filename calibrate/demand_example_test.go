package calibrate_test

import (
	"bytes"
	"fmt"
	"time"

	"wxstress/calibrate"
	"wxstress/demo"
)

// Fit the invented Lanternfield Energy send-out to the Kestrel Bay station's
// temperatures, then evaluate the fitted demand on a cold Monday.
func ExampleFitDemand() {
	temps, err := calibrate.ReadCSV(bytes.NewReader(demo.Station()), demo.StationFile,
		calibrate.ReadOptions{Units: calibrate.Celsius})
	if err != nil {
		panic(err)
	}
	loads, err := calibrate.ReadDemand(bytes.NewReader(demo.Demand()), demo.DemandFile, calibrate.DemandReadOptions{})
	if err != nil {
		panic(err)
	}
	days, err := calibrate.JoinDemand(loads, temps)
	if err != nil {
		panic(err)
	}
	res, err := calibrate.FitDemand(days, &calibrate.DemandSettings{Unit: demo.DemandUnit})
	if err != nil {
		panic(err)
	}
	m := res.Model
	fmt.Printf("form %s, heating below %.1f °C, cooling above %.1f °C\n", m.Form, m.Heating.BalancePoint, m.Cooling.BalancePoint)
	fmt.Printf("CV(RMSE) %.1f %%, %d days left out for lack of a temperature\n", m.Fit.CVRMSE, m.Data.MissingTemperature)
	fmt.Printf("a Monday at -5 °C: %.0f %s\n", m.Expected(-5, time.Monday, false), m.Unit)
	// Output:
	// form heating-and-cooling-band, heating below 15.6 °C, cooling above 23.0 °C
	// CV(RMSE) 3.2 %, 2 days left out for lack of a temperature
	// a Monday at -5 °C: 100285 GJ/day
}
