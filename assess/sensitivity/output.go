package sensitivity

import (
	"fmt"
	"math"
	"strings"

	"holdfast/assess"
	"holdfast/assess/steady"
)

// Output names the per-draw figure of a tracked equilibrium that is
// analysed.
type Output int

const (
	// Attracting is 1 when the equilibrium exists in the draw and attracts
	// from both sides (class stable), else 0.
	Attracting Output = iota
	// Position is the equilibrium's position x* (undefined where it is
	// lost).
	Position
	// Slope is f'(x*) (undefined where the equilibrium is lost).
	Slope
	// Current is 1 when the state, started at the scenario's current
	// state, ends at the equilibrium, else 0.
	Current
	numOutputs
)

var outputNames = [numOutputs]string{"attracting", "position", "slope", "current"}

// String returns "attracting", "position", "slope" or "current".
func (o Output) String() string {
	if o >= 0 && o < numOutputs {
		return outputNames[o]
	}
	return fmt.Sprintf("Output(%d)", int(o))
}

// Indicator reports whether the output is a yes/no verdict (0 or 1).
func (o Output) Indicator() bool { return o == Attracting || o == Current }

// ParseOutput converts "attracting", "position", "slope" or "current".
func ParseOutput(s string) (Output, error) {
	for o, name := range outputNames {
		if s == name {
			return Output(o), nil
		}
	}
	return 0, fmt.Errorf("unknown output %q (want one of %s)", s, strings.Join(outputNames[:], ", "))
}

// value returns the output of tracked equilibrium t in the draw record,
// NaN where it is undefined (a failed draw; a lost equilibrium for
// Position and Slope).
func (o Output) value(rec *assess.Draw, t int, label string) float64 {
	if rec.Failed != "" || t >= len(rec.Tracked) {
		return math.NaN()
	}
	td := &rec.Tracked[t]
	switch o {
	case Attracting:
		return indicator(td.Exists && td.Class == steady.Stable)
	case Position:
		if !td.Exists {
			return math.NaN()
		}
		return td.X
	case Slope:
		if !td.Exists {
			return math.NaN()
		}
		return td.Slope
	case Current:
		if rec.Outcome == "" {
			return math.NaN()
		}
		return indicator(rec.Outcome == label)
	}
	return math.NaN()
}

func indicator(b bool) float64 {
	if b {
		return 1
	}
	return 0
}
