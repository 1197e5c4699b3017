package model

// Diagnostics is what a reviewer reads to judge the fit. It is stored in the
// model file beside the parameters; the simulator ignores it.
type Diagnostics struct {
	Observations int `json:"observations"` // days with a value used in the mean model
	ARPairs      int `json:"ar_rows"`      // days with all p lags present, used in the AR fit

	HarmonicsTable []OrderScore `json:"harmonics_bic"` // K = 1..4
	ARTable        []OrderScore `json:"ar_bic"`        // p = 1..5, on a common sample
	// ARAdvice is non-empty when BIC prefers a higher AR order than the
	// one fitted by a clear margin.
	ARAdvice string `json:"ar_advice,omitempty"`

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
	Order  int     `json:"order"`
	BIC    float64 `json:"bic"`
	Chosen bool    `json:"chosen"`
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

// Test is a test statistic with its degrees of freedom and p-value.
type Test struct {
	Stat float64 `json:"stat"`
	DF   float64 `json:"df"`
	P    float64 `json:"p"`
}

// WindowSpread is the standard deviation of L-day mean anomalies.
type WindowSpread struct {
	Days     int     `json:"days"`
	Windows  int     `json:"windows"`
	Observed float64 `json:"observed_sd"`
	Model    float64 `json:"model_sd"`
}
