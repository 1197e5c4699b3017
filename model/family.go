package model

import (
	"fmt"

	"wxstress/shocks"
)

// Shock families, by the name model files and the command line use.
const (
	FamilyNormal    = "normal"
	FamilyStudentT  = "t"
	FamilySkewT     = "skew-t"
	FamilyBootstrap = "bootstrap"
)

// Family is a shock family: everything the program knows about it, in one
// place. Validate, the JSON encoding of Shocks, the fit (package calibrate),
// the simulator's sampler (package sim) and the reports all read it, so a new
// family is a new entry of the registry (see Families) and its distribution
// in package shocks.
type Family struct {
	Name  string // in model files and on the command line, e.g. "skew-t"
	Label string // in reports, e.g. "skewed Student-t"
	// Description names the distribution in a sentence, e.g. "unit-variance
	// skewed Student-t"; Note, if any, says how to read its parameters.
	Description, Note string
	// UsesDF and UsesSkew say which of Shocks.DF (ν) and Shocks.Skew (ξ) the
	// family has; Params() counts them.
	UsesDF, UsesSkew bool
	// New returns the unit-variance distribution with the parameters of s;
	// nil for the bootstrap, which resamples the standardized innovations
	// instead (Shocks.ByMonth).
	New func(s Shocks) shocks.Dist
	// Fit fits the family to standardized innovations z by maximum
	// likelihood, returning the fit and its parameters as a model stores
	// them; nil for the bootstrap.
	Fit func(z []float64) (shocks.Fit, Shocks, error)
}

// families is the registry, in the order reports show the families.
var families = [...]Family{
	{
		Name: FamilyNormal, Label: "normal", Description: "standard normal",
		New: func(Shocks) shocks.Dist { return shocks.Normal{} },
		Fit: func(z []float64) (shocks.Fit, Shocks, error) {
			return shocks.FitNormal(z), Shocks{Family: FamilyNormal}, nil
		},
	},
	{
		Name: FamilyStudentT, Label: "Student-t", Description: "unit-variance Student-t", UsesDF: true,
		New: func(s Shocks) shocks.Dist { return shocks.StudentT{Nu: s.DF} },
		Fit: func(z []float64) (shocks.Fit, Shocks, error) {
			fit, err := shocks.FitStudentT(z)
			if err != nil {
				return fit, Shocks{}, err
			}
			return fit, Shocks{Family: FamilyStudentT, DF: fit.Dist.(shocks.StudentT).Nu}, nil
		},
	},
	{
		Name: FamilySkewT, Label: "skewed Student-t", Description: "unit-variance skewed Student-t",
		Note: "ξ < 1: longer cold tail", UsesDF: true, UsesSkew: true,
		New: func(s Shocks) shocks.Dist { return shocks.SkewT{Nu: s.DF, Xi: s.Skew} },
		Fit: func(z []float64) (shocks.Fit, Shocks, error) {
			fit, err := shocks.FitSkewT(z)
			if err != nil {
				return fit, Shocks{}, err
			}
			d := fit.Dist.(shocks.SkewT)
			return fit, Shocks{Family: FamilySkewT, DF: d.Nu, Skew: d.Xi}, nil
		},
	},
	{
		Name: FamilyBootstrap, Label: "seasonal bootstrap",
		Description: "seasonal bootstrap of the standardized innovations (same calendar month)",
	},
}

// Families returns the shock families in the order reports show them (a
// copy: changing it changes nothing).
func Families() []Family { return append([]Family(nil), families[:]...) }

// FamilyNames returns the families' names, in the order of Families.
func FamilyNames() []string {
	out := make([]string, len(families))
	for i, f := range families {
		out[i] = f.Name
	}
	return out
}

// LookupFamily returns the family called name.
func LookupFamily(name string) (Family, bool) {
	for _, f := range families {
		if f.Name == name {
			return f, true
		}
	}
	return Family{}, false
}

// Parametric reports whether the family is a distribution with parameters
// (every family but the bootstrap).
func (f Family) Parametric() bool { return f.New != nil }

// Params returns the number of shape parameters: 0, 1 (ν) or 2 (ν, ξ).
func (f Family) Params() int {
	n := 0
	if f.UsesDF {
		n++
	}
	if f.UsesSkew {
		n++
	}
	return n
}

// FamilyLabel returns the report label of the family called name ("skewed
// Student-t" for "skew-t"), or name itself for an unknown family.
func FamilyLabel(name string) string {
	if f, ok := LookupFamily(name); ok {
		return f.Label
	}
	return name
}

// Dist returns the unit-variance distribution of the shocks; nil for the
// bootstrap or an unknown family. The distribution's methods panic if the
// parameters are outside its domain (ν ≤ 2, ξ ≤ 0), which Validate refuses.
func (s Shocks) Dist() shocks.Dist {
	if f, ok := LookupFamily(s.Family); ok && f.Parametric() {
		return f.New(s)
	}
	return nil
}

// ShapeText returns the shape parameters the family uses, as reports show
// them: "ν = 7.12" for the Student-t, "ν = 7.12, ξ = 0.913" for the skewed
// t, "" for the others.
func (s Shocks) ShapeText() string {
	f, _ := LookupFamily(s.Family)
	switch {
	case f.UsesDF && f.UsesSkew:
		return fmt.Sprintf("ν = %.2f, ξ = %.3f", s.DF, s.Skew)
	case f.UsesDF:
		return fmt.Sprintf("ν = %.2f", s.DF)
	case f.UsesSkew:
		return fmt.Sprintf("ξ = %.3f", s.Skew)
	}
	return ""
}

// Text describes the shocks in a sentence: the family's description, its
// shape parameters and the note on reading them, e.g. "unit-variance skewed
// Student-t, ν = 7.12, ξ = 0.913 (ξ < 1: longer cold tail)". An unknown
// family gives its name.
func (s Shocks) Text() string {
	f, ok := LookupFamily(s.Family)
	if !ok {
		return s.Family
	}
	out := f.Description
	if sh := s.ShapeText(); sh != "" {
		out += ", " + sh
	}
	if f.Note != "" {
		out += " (" + f.Note + ")"
	}
	return out
}

// Shocks returns the row's family and shape parameters as Shocks (without
// the bootstrap's innovations).
func (s FamilyScore) Shocks() Shocks { return Shocks{Family: s.Family, DF: s.DF, Skew: s.Skew} }

// ShapeText is s.Shocks().ShapeText().
func (s FamilyScore) ShapeText() string { return s.Shocks().ShapeText() }
