// Package calibrate reads daily records and fits the models the simulator
// runs: the daily temperature model (Fit, giving a model.File) and the daily
// demand model (FitDemand, giving a model.Demand).
//
// # Reading
//
// ReadCSV reads a daily temperature record (date and a mean or a max/min
// pair) into a Series on a complete daily grid; ReadDemand reads a daily
// demand history (date, load, optional holiday flag) into a DemandSeries;
// ReadHolidays reads a holiday list of dates and yearly rules. The three
// share one row scanner (scan.go): a UTF-8 byte order mark is skipped, blank
// lines are passed over, columns are found by name, every byte is hashed for
// the manifest, and bad data comes back as an ErrorList of *PosError, each
// "file:line:column: message" (naming the field where there is one), the
// first MaxErrors of them and then a count of the further bad rows.
//
// # The temperature model
//
//	T(t) = S(t) + X(t)
//	S(t) = a + b·t + Σₖ₌₁..K [cₖ cos(kωt) + sₖ sin(kωt)],  ω = 2π/365.25
//	X(t) = Y(t) + F(t)
//	Y(t) = Σᵢ₌₁..ₚ φᵢ Y(t−i) + σ(m(t))·ε(t)                 fast
//	F(t) = φ_s F(t−1) + s_F √(1 − φ_s²)·η(t),  η ~ N(0, 1)   slow
//
// with t in days since 2000-01-01 (calendar.Epoch), K ≤ 4 harmonics, σ(m)
// one value per calendar month m(t), and ε the unit-variance shocks: normal,
// Student-t or skewed t (package shocks), or resampled by calendar month
// ("bootstrap"). S is fitted by ordinary least squares (QR), K by BIC; with
// Trend "auto" the linear trend b is kept on a record of at least
// MinTrendYears years unless the slope of the annual means is within its
// standard error. Y and the optional slow part F are fitted by exact
// Gaussian likelihood through the Kalman filter (package statespace), the
// order p ≤ 5 by BIC; with Slow "auto" F is kept when a likelihood-ratio test
// or the spread of 151- and 365-day means asks for it. Method "cls" fits Y
// alone by conditional least squares. The shock family is fitted by maximum
// likelihood to the standardized one-step innovations and chosen by AIC.
// Unless fixed by Settings, every choice is made as described.
//
// # The demand model
//
//	D(t) = β0 + w(weekday) + βhol·holiday + βH·max(TbH − T, 0) + βC·max(T − TbC, 0) + u(t)
//	u(t) = φ·u(t−1) + σ·z(t)
//
// with T the day's mean temperature, w(Monday) = 0, holiday 0 or 1, and the
// change-point forms of ASHRAE Guideline 14 (from memory): heating-only (no
// cooling term), cooling-only (no heating term), heating-and-cooling (TbH = TbC) and heating-and-cooling-band
// (TbH ≤ TbC). JoinDemand pairs each day's load with its temperature;
// FitDemand searches the balance points on a grid of BalanceStep between the
// 5th and 95th percentiles of T, fits the other coefficients by least squares
// at every grid point (a 2×2 solve after partialling out the weekday and
// holiday terms: the Frisch–Waugh–Lovell theorem, Frisch & Waugh 1933,
// Econometrica; Lovell 1963, J. Amer. Statist. Assoc. — from memory), picks
// the form by BIC, fits u's AR(1) by conditional least squares on
// consecutive days, and reports the guideline's CV(RMSE) and NMBE checks
// (daily, on calendar-month sums, and on a held-out final year when the
// record allows).
//
// # Units
//
// Temperatures stay in the data's units (°C or °F, Series.Units) end to end:
// S, σ, s_F, balance points and BalanceStep are in those degrees; the trend
// is reported per year and per decade. Loads are in the unit the user states
// (DemandSettings.Unit, e.g. GJ/day), the slopes βH and βC in that unit per
// degree. Dates are calendar.Date days; φ, ε, η, z are dimensionless.
//
// # Errors
//
// Bad input wraps ErrBadInput (as an ErrorList of *PosError); a failure of
// the underlying reader is returned wrapped, without ErrBadInput. Data that
// cannot support the model (too short, too many gaps, degenerate values)
// give an error wrapping ErrFit and, where there is one, the underlying
// cause, so errors.Is reaches both. Invalid settings and options give an
// error prefixed "calibrate:" naming the valid choices; programmer misuse
// (mismatched lengths in CVRMSE or NMBE) panics. Messages are lowercase;
// those about a file or a record start with its name.
//
// # Concurrency
//
// The readers, Fit and FitDemand are safe for concurrent use on distinct
// inputs: they keep no state between calls and do not modify their
// arguments (Fit runs its order profiles in parallel internally). Nothing
// in the package prints.
package calibrate
