package model

// DemandForm is a change-point form of the demand model (the inverse models
// of ASHRAE Guideline 14-2014, section 5.3.3.4 and annex D; from memory),
// named for the sides on which demand responds to temperature. The value is
// the name model files store.
type DemandForm string

// Change-point forms of the demand model. The constants are untyped so that
// they compare with the string fields of the model file (Demand.Form,
// FormScore.Form) as well as with a DemandForm.
const (
	FormHeatingOnly        = "heating-only"             // β0 + βH·max(TbH − T, 0)
	FormCoolingOnly        = "cooling-only"             // β0 + βC·max(T − TbC, 0)
	FormHeatingCooling     = "heating-and-cooling"      // β0 + βH·max(Tb − T, 0) + βC·max(T − Tb, 0)
	FormHeatingCoolingBand = "heating-and-cooling-band" // β0 + βH·max(TbH − T, 0) + βC·max(T − TbC, 0), TbH ≤ TbC
)

// demandFormInfo is what a form is.
type demandFormInfo struct {
	form             DemandForm
	heating, cooling bool
	balancePoints    int
	formula, words   string
}

// demandForms holds every form, in the order reports show them.
var demandForms = [...]demandFormInfo{
	{FormHeatingOnly, true, false, 1, "β0 + βH·max(TbH − T, 0)",
		"demand rises below one balance point (heating only)"},
	{FormCoolingOnly, false, true, 1, "β0 + βC·max(T − TbC, 0)",
		"demand rises above one balance point (cooling only)"},
	{FormHeatingCooling, true, true, 1, "β0 + βH·max(Tb − T, 0) + βC·max(T − Tb, 0)",
		"demand rises on either side of one balance point"},
	{FormHeatingCoolingBand, true, true, 2, "β0 + βH·max(TbH − T, 0) + βC·max(T − TbC, 0), TbH ≤ TbC",
		"demand rises below a heating and above a cooling balance point, flat between them"},
}

// AllDemandForms returns the change-point forms in the order reports show
// them.
func AllDemandForms() []DemandForm {
	out := make([]DemandForm, len(demandForms))
	for i, f := range demandForms {
		out[i] = f.form
	}
	return out
}

// DemandFormNames returns the names of AllDemandForms.
func DemandFormNames() []string {
	out := make([]string, len(demandForms))
	for i, f := range demandForms {
		out[i] = string(f.form)
	}
	return out
}

// index returns f's position in demandForms, or −1.
func (f DemandForm) index() int {
	for i, d := range demandForms {
		if d.form == f {
			return i
		}
	}
	return -1
}

// info returns f's entry and panics for an unknown form.
func (f DemandForm) info() demandFormInfo {
	i := f.index()
	if i < 0 {
		panic("model: unknown demand form " + string(f))
	}
	return demandForms[i]
}

// Valid reports whether f is one of AllDemandForms.
func (f DemandForm) Valid() bool { return f.index() >= 0 }

// HasHeating reports whether the form has a heating slope. It panics for an
// unknown form, as do the other methods but Valid.
func (f DemandForm) HasHeating() bool { return f.info().heating }

// HasCooling reports whether the form has a cooling slope.
func (f DemandForm) HasCooling() bool { return f.info().cooling }

// Slopes returns the number of temperature slopes, βH and/or βC: 1 or 2.
func (f DemandForm) Slopes() int {
	n := 0
	if f.HasHeating() {
		n++
	}
	if f.HasCooling() {
		n++
	}
	return n
}

// BalancePoints returns the number of balance points: 2 for the
// heating-and-cooling-band form (TbH and TbC), else 1 (the
// heating-and-cooling form's two sides share one).
func (f DemandForm) BalancePoints() int { return f.info().balancePoints }

// Params returns the number of parameters the form adds to the constant
// model β0 + w(weekday) + βhol·holiday: its slopes and balance points.
func (f DemandForm) Params() int { return f.Slopes() + f.BalancePoints() }

// Formula returns the temperature part of the form, e.g.
// "β0 + βH·max(TbH − T, 0)".
func (f DemandForm) Formula() string { return f.info().formula }

// Description says in words how demand depends on temperature in the form.
func (f DemandForm) Description() string { return f.info().words }
