package model

// Diagnostics is what a reviewer reads to judge the fit. It is stored in the
// model file beside the parameters; the simulator ignores it.
type Diagnostics struct {
	Observations int `json:"observations"` // days with a value used in the mean model
	ARPairs      int `json:"ar_rows"`      // days with all p lags present, used in the AR fit

	HarmonicsTable []OrderScore `json:"harmonics_bic"` // K = 1..4
	// HarmonicsRho is the lag-1 autocorrelation of the residuals of the
	// largest mean model, which prewhitens the harmonics table's BIC.
	HarmonicsRho float64 `json:"harmonics_prewhitening_rho,omitempty"`
	// ARTable scores the fast AR order p = 1..5 by BIC from the exact
	// likelihood, with the slow part in the model when it was considered.
	ARTable []OrderScore `json:"ar_bic"`
	// ARAdvice is non-empty when BIC prefers another AR order than the
	// one fitted by a clear margin.
	ARAdvice string `json:"ar_advice,omitempty"`
	// SlowAdvice is non-empty when the slow part's choice deserves a second
	// look: auto left it out although it would widen the model's annual
	// spread materially, or it was kept on a record too short to pin it
	// down.
	SlowAdvice string `json:"slow_advice,omitempty"`
	// SlowChoice records how the slow part was kept or left out.
	SlowChoice *SlowChoice `json:"slow_choice,omitempty"`

	ShockTable []FamilyScore `json:"shock_families"`

	ACF      []float64 `json:"acf"`  // of the anomaly X, lags 1..30
	PACF     []float64 `json:"pacf"` // of X, lags 1..30
	ACFBound float64   `json:"acf_bound_95"`

	// Ljung–Box tests of the standardized innovations z and of z².
	LjungBoxZ10  Test `json:"ljung_box_z_10"`
	LjungBoxZ20  Test `json:"ljung_box_z_20"`
	LjungBoxZ210 Test `json:"ljung_box_z2_10"`
	LjungBoxZ220 Test `json:"ljung_box_z2_20"`

	JarqueBera     Test    `json:"jarque_bera"`
	Skewness       float64 `json:"skewness"`
	ExcessKurtosis float64 `json:"excess_kurtosis"`
	// KS compares z with the chosen parametric family (the best by AIC
	// when the bootstrap is chosen).
	KS       Test   `json:"ks"`
	KSFamily string `json:"ks_family"`

	// Spread compares the standard deviation of non-overlapping window
	// means of X in the data with what the fitted model implies.
	Spread []WindowSpread `json:"window_spread"`

	// Climatology is the mean observed temperature of each day of the year
	// (index 0 is 1 January, 365 is 31 December of leap years) over the whole
	// record, trend included.
	Climatology []float64 `json:"climatology_by_day_of_year,omitempty"`

	// QQ holds quantile pairs of z against the chosen family, thinned for plots.
	QQTheoretical []float64 `json:"qq_theoretical,omitempty"`
	QQSample      []float64 `json:"qq_sample,omitempty"`
}

// OrderScore is one row of a model-order table.
type OrderScore struct {
	Order int     `json:"order"`
	BIC   float64 `json:"bic"`
	// BICIndependent is, in the harmonics table, the OLS BIC that takes
	// the days as independent (BIC there is the prewhitened one that
	// chooses); absent elsewhere.
	BICIndependent float64 `json:"bic_independent,omitempty"`
	Chosen         bool    `json:"chosen"`
}

// FamilyScore is one row of the shock-family table.
type FamilyScore struct {
	Family string  `json:"family"`
	LogLik float64 `json:"loglik"`
	Params int     `json:"params"` // shape parameters estimated
	AIC    float64 `json:"aic"`
	DF     float64 `json:"df,omitempty"`
	Skew   float64 `json:"skew,omitempty"`
	Chosen bool    `json:"chosen"`
}

// Test is the outcome of a hypothesis test (package diagnose computes
// them): the statistic with its degrees of freedom and p-value.
type Test struct {
	// Stat is the test statistic.
	Stat float64 `json:"stat"`
	// DF is the degrees of freedom of the reference χ² distribution, or the
	// sample size for the Kolmogorov–Smirnov test.
	DF float64 `json:"df"`
	// P is the p-value, the probability under the null hypothesis of a
	// statistic at least as large as Stat.
	P float64 `json:"p"`
}

// WindowSpread is the standard deviation of L-day mean anomalies.
type WindowSpread struct {
	Days     int     `json:"days"`
	Windows  int     `json:"windows"`
	Observed float64 `json:"observed_sd"`
	Model    float64 `json:"model_sd"` // the fitted model's expected value for these windows
	// Band is the 5–95 % range of the sd a record of this length and gaps
	// would show under the fitted model (by simulation, re-fitting the
	// mean model to each simulated record as to the data): an observed sd
	// outside it is evidence against the model's spread at this scale.
	Band [2]float64 `json:"band_90"`
	// BandFastOnly is the same band under the model without its slow part
	// (the AR fitted alone); absent when the model has no slow part.
	BandFastOnly *[2]float64 `json:"band_90_fast_only,omitempty"`
	Verdict      string      `json:"verdict"` // "inside", "too narrow" or "too wide"
}

// SlowChoice is the evidence for or against the slow part.
type SlowChoice struct {
	Setting string `json:"setting"` // auto, on or none
	Kept    bool   `json:"kept"`
	// Log-likelihoods of the model with and without the slow part (exact,
	// Gaussian), the likelihood-ratio statistic 2·(with − without), its
	// p-value against ½χ²₁ + ½χ²₂, and both BICs.
	LogLikWith    float64 `json:"loglik_with"`
	LogLikWithout float64 `json:"loglik_without"`
	LR            float64 `json:"lr"`
	P             float64 `json:"p"`
	BICWith       float64 `json:"bic_with"`
	BICWithout    float64 `json:"bic_without"`
	// SpreadTooNarrow lists the windows (days) whose observed sd lies
	// above the fast-only model's 90 % band.
	SpreadTooNarrow []int `json:"spread_too_narrow_without,omitempty"`
	// AnnualSpreadGain is how much wider the model's sd of 365-day means
	// is with the slow part than without it (0.2 is 20 %), when both were
	// fitted.
	AnnualSpreadGain float64 `json:"annual_spread_gain,omitempty"`
	Rule             string  `json:"rule"`
}
