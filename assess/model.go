package assess

import (
	"errors"
	"fmt"
	"strings"

	"holdfast/assess/expr"
	"holdfast/assess/steady"
	"holdfast/sample"
	"holdfast/scenarios"
)

// Model is a scenario compiled for evaluation: the rate law as an
// expr.Program whose parameter slots follow the scenario's parameter order.
// A Model is safe for concurrent use; each goroutine evaluates through its
// own Func (see Model.Func).
type Model struct {
	Scenario *scenarios.Scenario
	Program  *expr.Program
	// Names are the parameter names in slot order (the scenario's order).
	Names []string
	// Nominal holds the nominal value of every parameter.
	Nominal []float64
	// Domain is the interval searched for equilibria.
	Domain [2]float64
	// Unused names the parameters the rate law does not depend on.
	Unused []string
}

// Compile lowers the scenario's rate law and defines. A compile error is
// returned as a scenarios.ErrorList whose entry names the file, the line
// and column inside the expression, and the field ("rate" or
// "define.NAME"), followed by the expression with a caret under the fault.
func Compile(s *scenarios.Scenario) (*Model, error) {
	names := make([]string, len(s.Params))
	for i, p := range s.Params {
		names[i] = p.Name
	}
	env := expr.Env{State: s.State.Symbol, Params: names}
	for _, d := range s.Defines {
		env.Defines = append(env.Defines, expr.Define{Name: d.Name, Src: d.Expr})
	}
	prog, err := expr.Compile(s.Rate, env)
	if err != nil {
		return nil, positioned(s, err)
	}
	m := &Model{
		Scenario: s,
		Program:  prog,
		Names:    names,
		Nominal:  s.Nominals(),
		Domain:   s.State.Domain,
	}
	for i, n := range names {
		if !prog.Uses(i) {
			m.Unused = append(m.Unused, n)
		}
	}
	return m, nil
}

// positioned turns an expr.Error into a scenario error at the file
// position of the offending byte.
func positioned(s *scenarios.Scenario, err error) error {
	var ee *expr.Error
	if !errors.As(err, &ee) {
		return fmt.Errorf("%s: %w", s.File, err)
	}
	e := &scenarios.Error{File: s.File, Msg: ee.Msg}
	switch {
	case ee.Where == "rate":
		e.Field = "rate"
		e.Pos = s.RateOffsetPos(max(ee.Offset, 0))
	default:
		for i, d := range s.Defines {
			if d.Name == ee.Where {
				e.Field = "define." + d.Name
				e.Pos = s.DefineOffsetPos(i, max(ee.Offset, 0))
			}
		}
	}
	// Keep the compiler's picture of the expression with its caret.
	if full := ee.Error(); strings.Contains(full, "\n") {
		e.Msg += full[strings.IndexByte(full, '\n'):]
	}
	return scenarios.ErrorList{e}
}

// Design returns the sampling design of the scenario's parameters.
func (m *Model) Design(kind sample.PlanKind, n int, seed uint64) (*sample.Design, error) {
	s := m.Scenario
	params := make([]sample.Param, len(s.Params))
	for i, p := range s.Params {
		params[i] = sample.Param{Name: p.Name, Dist: p.Dist, Value: p.Value}
	}
	corr := make([]sample.Correlation, len(s.Correlations))
	for i, c := range s.Correlations {
		corr[i] = sample.Correlation{A: c.A, B: c.B, Rho: c.Rho}
	}
	d, err := sample.NewDesign(params, corr, kind, n, seed)
	if err != nil {
		var ce *sample.CorrelationError
		if errors.As(err, &ce) {
			return nil, scenarios.ErrorList{{File: s.File, Field: "correlations", Msg: ce.Error()}}
		}
		return nil, fmt.Errorf("%s: %w", s.File, err)
	}
	return d, nil
}

// Func is the rate law with a parameter vector bound, for one goroutine.
// It satisfies steady.Func.
type Func struct {
	m     *expr.Machine
	Theta []float64
}

// Func returns an evaluator bound to theta (which it keeps, not copies).
func (m *Model) Func(theta []float64) *Func {
	return &Func{m: m.Program.NewMachine(), Theta: theta}
}

// Eval returns f(x; θ).
func (f *Func) Eval(x float64) float64 { return f.m.Eval(x, f.Theta) }

// Taylor fills the normalised Taylor coefficients of f at x and their
// rounding-error bounds.
func (f *Func) Taylor(x float64, c, e []float64) { f.m.Taylor(x, f.Theta, c, e) }

// Slope returns f(x; θ) and ∂f/∂x by dual numbers (no error bounds).
func (f *Func) Slope(x float64) (float64, float64) { return f.m.Slope(x, f.Theta) }

// Diagnose names the first numeric fault of f at x, or nil.
func (f *Func) Diagnose(x float64) *expr.Fault { return f.m.Diagnose(x, f.Theta) }

var _ steady.Func = (*Func)(nil)
