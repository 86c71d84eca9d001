package assess

import (
	"fmt"
	"math"
	"slices"

	"holdfast/assess/steady"
)

// Equilibrium is an equilibrium of one parameter set with its label. At
// nominal values the labels E1 < E2 < … are the identities that the Monte
// Carlo engine follows into every draw.
type Equilibrium struct {
	Label string
	steady.Equilibrium
}

// Transit is where the state goes from the scenario's current state.
type Transit struct {
	From float64
	// Fate is the kind of motion (stays, approaches, exits below/above,
	// singular, outside).
	Fate steady.Fate
	// MovesTo is the label of the equilibrium reached, or "" when the state
	// leaves the domain or meets a singular point.
	MovesTo string
	// Target is the equilibrium, domain end or singular point reached.
	Target float64
	// TimeTo1Pct is the time until the remaining distance to an
	// equilibrium is 1% of the starting distance (0 when the state already
	// is an equilibrium); for an exit, the time to reach the domain end.
	TimeTo1Pct float64
}

// Snapshot is the analysis of one parameter set: every equilibrium in the
// domain, classified, with its figures, and the transit from the current
// state when the scenario gives one.
type Snapshot struct {
	Names      []string
	Theta      []float64
	Domain     [2]float64
	Equilibria []Equilibrium
	Current    *Transit
	Undefined  []steady.Interval
	Poles      []float64
	// Faults names the numeric trouble met where f is undefined, one line
	// per undefined interval or pole, e.g. "log of non-positive in rate at
	// x = -0.5".
	Faults   []string
	Warnings []string
}

// Analyze finds and classifies every equilibrium for the parameter vector
// theta (in slot order) and follows the current state.
func (m *Model) Analyze(theta []float64) (*Snapshot, error) {
	if len(theta) != len(m.Names) {
		return nil, fmt.Errorf("analyze: %d parameter values for %d parameters", len(theta), len(m.Names))
	}
	for i, v := range theta {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("analyze: parameter %s is %v", m.Names[i], v)
		}
	}
	f := m.Func(slices.Clone(theta))
	res, err := steady.Find(f, m.Domain[0], m.Domain[1], steady.DefaultOptions())
	if err != nil {
		return nil, fmt.Errorf("analyze: %w", err)
	}
	snap := &Snapshot{
		Names:     m.Names,
		Theta:     f.Theta,
		Domain:    m.Domain,
		Undefined: slices.Clone(res.Undefined),
		Poles:     slices.Clone(res.Poles),
		Warnings:  slices.Clone(res.Warnings),
	}
	for i, e := range res.Equilibria {
		snap.Equilibria = append(snap.Equilibria, Equilibrium{Label: Label(i), Equilibrium: e})
	}
	for _, iv := range res.Undefined {
		snap.Faults = append(snap.Faults, faultLine(f, iv.Lo, iv.Hi))
	}
	for _, p := range res.Poles {
		snap.Faults = append(snap.Faults, faultLine(f, p, p))
	}
	if st := m.Scenario.State; st.HasCurrent {
		t := steady.FromState(f, res, st.Current)
		tr := &Transit{From: st.Current, Fate: t.Fate, Target: t.Target, TimeTo1Pct: t.Time}
		if t.To >= 0 {
			tr.MovesTo = Label(t.To)
		}
		snap.Current = tr
	}
	return snap, nil
}

// Label is the name of the i-th equilibrium (0-based) in ascending order:
// E1, E2, ….
func Label(i int) string { return fmt.Sprintf("E%d", i+1) }

// faultLine describes why f is undefined or infinite on [lo, hi], probing
// its middle.
func faultLine(f *Func, lo, hi float64) string {
	x := lo + (hi-lo)/2
	where := fmt.Sprintf("x = %.6g", x)
	if hi > lo {
		where = fmt.Sprintf("[%.6g, %.6g]", lo, hi)
	}
	if fl := f.Diagnose(x); fl != nil {
		return fmt.Sprintf("%s at %s", fl.String(), where)
	}
	if fl := f.Diagnose(lo); fl != nil {
		return fmt.Sprintf("%s at %s", fl.String(), where)
	}
	return "rate law not finite at " + where
}
