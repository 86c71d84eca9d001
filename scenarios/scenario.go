package scenarios

import (
	"fmt"
	"math"
	"slices"

	"holdfast/sample"
)

// Scenario is a validated scenario: the rate law dx/dt = f(x; θ) as text,
// the state it acts on, and a fixed value or a distribution for every
// parameter. Positions point into Source, so that later stages (the
// rate-law compiler) can report their own errors as file:line:col.
type Scenario struct {
	File   string // the path as given to Load, or "demo:NAME" for an embedded demo
	Source []byte // the exact bytes read

	Version int    // format version (1)
	Title   string // one line
	Summary string // free text, may be empty

	State State

	Rate      string // the right-hand side f of dx/dt, not yet compiled
	RatePos   Pos    // position of the rate's first byte in Source
	RateStyle Style  // how the rate is written in the file (see RateOffsetPos)

	Defines      []Define      // named sub-expressions, in file order
	Params       []Param       // parameters, in file order
	Correlations []Correlation // rank correlations between uncertain parameters

	// Attached holds the exact bytes of every CSV file the scenario read,
	// by its name relative to the scenario's folder (nil when none), so
	// that the scenario can be parsed again from Source without the folder
	// (fstest.MapFS or any fs.FS over these files).
	Attached map[string][]byte
}

// State describes the state variable x.
type State struct {
	Symbol     string     // the state's name in the rate law
	SymbolPos  Pos        // position of the symbol's value
	Unit       string     // free text, may be empty
	Domain     [2]float64 // the interval searched for equilibria, finite, Domain[0] < Domain[1]
	DomainPos  Pos        // position of the domain list
	Current    float64    // the present state, inside Domain (when HasCurrent)
	HasCurrent bool       // whether the file gives a current state
	CurrentPos Pos        // position of the current value
}

// Define is a named sub-expression that the rate law (and later defines)
// may use.
type Define struct {
	Name      string
	Pos       Pos    // position of the name
	Expr      string // the expression, not yet compiled
	ExprPos   Pos    // position of the expression's first byte
	ExprStyle Style  // how the expression is written (see DefineOffsetPos)
}

// Param is one parameter θ_k of the rate law: fixed at Value, or uncertain
// with distribution Dist.
type Param struct {
	Name  string
	Pos   Pos    // position of the name
	Kind  string // "fixed", or the distribution kind: "normal", "lognormal", "uniform", ...
	Fixed bool
	Value float64 // the fixed value (Fixed only)

	// Dist is the distribution of an uncertain parameter, including any
	// truncation; nil when Fixed.
	Dist sample.Distribution
	// Args holds the numeric fields as the file gives them, in file order,
	// for display: "value" for a fixed parameter; "mean", "sd", "min", ...
	// for a distribution. List fields (values, weights, samples) are left
	// out; Dist.String() describes them.
	Args []Arg

	// Nominal is the value used for the nominal (central) case: the fixed
	// value, the "nominal" field when given, or else the median of Dist.
	Nominal      float64
	NominalGiven bool // the file gives nominal explicitly

	Unit string // free text, may be empty
	Note string // free text, may be empty

	// DataFile and DataColumn name the CSV file and column of an empirical
	// distribution read from a file (empty otherwise).
	DataFile, DataColumn string

	// Overridden is set when Set fixed the parameter (a --set override).
	Overridden bool
}

// Arg is one numeric field of a parameter.
type Arg struct {
	Name  string
	Value float64
	Pos   Pos
}

// Correlation asks for Spearman rank correlation Rho, −1 < Rho < 1,
// between the uncertain parameters A and B. Parse has checked that the
// correlations of a scenario are consistent with one another (package
// sample can build a joint distribution with them).
type Correlation struct {
	A, B string
	Rho  float64
	Pos  Pos // position of the list [A, B, rho]
}

// ParamIndex returns the index in s.Params of the parameter with the given
// name, or -1.
func (s *Scenario) ParamIndex(name string) int {
	return slices.IndexFunc(s.Params, func(p Param) bool { return p.Name == name })
}

// Nominals returns the nominal value of every parameter, in the order of
// s.Params.
func (s *Scenario) Nominals() []float64 {
	v := make([]float64, len(s.Params))
	for i, p := range s.Params {
		v[i] = p.Nominal
	}
	return v
}

// Set fixes the named parameter at value, as a --set override does: the
// parameter becomes fixed, its nominal becomes value, and any correlation
// that names it is dropped (a fixed parameter has no ranks to correlate).
// Unit and Note are kept. It returns an error, with a suggestion, for an
// unknown name, and for a value that is not finite.
func (s *Scenario) Set(name string, value float64) error {
	i := s.ParamIndex(name)
	if i < 0 {
		names := make([]string, len(s.Params))
		for k, p := range s.Params {
			names[k] = p.Name
		}
		msg := fmt.Sprintf("unknown parameter %q", name)
		switch {
		case name == s.State.Symbol:
			msg += " (it is the state symbol)"
		case slices.ContainsFunc(s.Defines, func(d Define) bool { return d.Name == name }):
			msg += " (it is a define, not a parameter)"
		default:
			if near := nearest(name, names); near != "" {
				msg += fmt.Sprintf("; did you mean %q?", near)
			}
		}
		return fmt.Errorf("%s", msg)
	}
	if math.IsNaN(value) || math.IsInf(value, 0) {
		return fmt.Errorf("parameter %s: value must be a finite number, got %v", name, value)
	}
	p := &s.Params[i]
	p.Kind, p.Fixed, p.Value, p.Dist = "fixed", true, value, nil
	p.Args = []Arg{{Name: "value", Value: value}}
	p.Nominal, p.NominalGiven = value, false
	p.DataFile, p.DataColumn = "", ""
	p.Overridden = true
	s.Correlations = slices.DeleteFunc(s.Correlations, func(c Correlation) bool {
		return c.A == name || c.B == name
	})
	return nil
}

// RateOffsetPos returns the file position of byte off of s.Rate, for
// reporting an error that the rate-law compiler finds at that offset. It
// accounts for quotes, escape sequences and block scalars; off ≥ len(Rate)
// gives the position just after the expression.
func (s *Scenario) RateOffsetPos(off int) Pos {
	return s.offsetPos(s.RatePos, s.RateStyle, s.Rate, off)
}

// DefineOffsetPos is RateOffsetPos for the expression of s.Defines[i].
func (s *Scenario) DefineOffsetPos(i, off int) Pos {
	if i < 0 || i >= len(s.Defines) {
		return Pos{}
	}
	d := s.Defines[i]
	return s.offsetPos(d.ExprPos, d.ExprStyle, d.Expr, off)
}

func (s *Scenario) offsetPos(start Pos, style Style, text string, off int) Pos {
	if len(s.Source) == 0 || !start.IsValid() {
		// No file to look at: assume a one-line expression.
		return Pos{Line: start.Line, Col: start.Col + min(max(off, 0), len(text))}
	}
	return newSrcIndex(s.Source).exprPos(start, style, text, off)
}
