package report

import (
	"math"

	"holdfast/assess"
	"holdfast/assess/summary"
)

// FiguresJSON holds the compact summaries that the plots of a report are
// drawn from, computed during the run (package assess/summary), so that a
// saved result renders again without running the model.
type FiguresJSON struct {
	// Band is the rate curve's spread over the draws on a fixed grid.
	Band BandJSON `json:"rate_band"`
	// Nominal is the rate curve at nominal values.
	Nominal CurveJSON `json:"nominal_curve"`
	// Slopes holds one histogram of f'(x*) per tracked equilibrium.
	Slopes []HistogramJSON `json:"slope_histograms"`
	// Running holds the counts behind every probability at checkpoints of
	// 16·2^k draws and at the end.
	Running []CheckpointJSON `json:"running"`
}

// BandJSON is f(x) over the band's draws at each grid point X: the 5, 25,
// 50, 75 and 95% quantiles (null where f is undefined in every draw), the
// number N of draws where f is finite and the number where it is not.
type BandJSON struct {
	Draws     int64      `json:"draws"`
	X         []float64  `json:"x"`
	N         []int64    `json:"n"`
	Undefined []int64    `json:"undefined"`
	Q5        []*float64 `json:"q5"`
	Q25       []*float64 `json:"q25"`
	Q50       []*float64 `json:"q50"`
	Q75       []*float64 `json:"q75"`
	Q95       []*float64 `json:"q95"`
}

// CurveJSON is a curve y = f(x), null where f is undefined.
type CurveJSON struct {
	X []float64  `json:"x"`
	F []*float64 `json:"f"`
}

// HistogramJSON counts values in bins [Edges[i], Edges[i+1]) (the last one
// closed), with those below and above the bins and the total N.
type HistogramJSON struct {
	Label  string    `json:"label"`
	Edges  []float64 `json:"edges"`
	Counts []int64   `json:"counts"`
	Below  int64     `json:"below"`
	Above  int64     `json:"above"`
	N      int64     `json:"n"`
}

// CheckpointJSON holds the running counts after the first Draws draws:
// per tracked equilibrium, the draws where it exists, attracts, is
// semistable, and where the state ends there from the current state
// (null without a current state), all out of Succeeded.
type CheckpointJSON struct {
	Draws      int64   `json:"draws"`
	Succeeded  int64   `json:"succeeded"`
	Exists     []int64 `json:"exists"`
	Attracting []int64 `json:"attracting"`
	Semistable []int64 `json:"semistable"`
	Current    []int64 `json:"current"`
}

// NewFiguresJSON converts collected summaries for a result file (nil for
// nil).
func NewFiguresJSON(s *summary.Summary) *FiguresJSON {
	if s == nil {
		return nil
	}
	f := &FiguresJSON{
		Band: BandJSON{
			Draws: s.BandDraws, X: nonNil(s.Grid), N: []int64{}, Undefined: []int64{},
			Q5: []*float64{}, Q25: []*float64{}, Q50: []*float64{}, Q75: []*float64{}, Q95: []*float64{},
		},
		Nominal: CurveJSON{X: nonNil(s.NominalX), F: []*float64{}},
		Slopes:  []HistogramJSON{},
		Running: []CheckpointJSON{},
	}
	for _, b := range s.Band {
		f.Band.N = append(f.Band.N, b.N)
		f.Band.Undefined = append(f.Band.Undefined, b.Undefined)
		f.Band.Q5 = append(f.Band.Q5, num(b.Q[0]))
		f.Band.Q25 = append(f.Band.Q25, num(b.Q[1]))
		f.Band.Q50 = append(f.Band.Q50, num(b.Q[2]))
		f.Band.Q75 = append(f.Band.Q75, num(b.Q[3]))
		f.Band.Q95 = append(f.Band.Q95, num(b.Q[4]))
	}
	for _, v := range s.NominalF {
		f.Nominal.F = append(f.Nominal.F, num(v))
	}
	for _, h := range s.Slopes {
		f.Slopes = append(f.Slopes, HistogramJSON{Label: h.Label, Edges: nonNil(h.Edges), Counts: nonNilInts(h.Counts), Below: h.Below, Above: h.Above, N: h.N})
	}
	for _, c := range s.Running {
		f.Running = append(f.Running, CheckpointJSON{
			Draws: c.Draws, Succeeded: c.Succeeded,
			Exists: nonNilInts(c.Exists), Attracting: nonNilInts(c.Attracting), Semistable: nonNilInts(c.Semistable),
			Current: c.Current,
		})
	}
	return f
}

func nonNil(v []float64) []float64 {
	if v == nil {
		return []float64{}
	}
	return v
}

func nonNilInts(v []int64) []int64 {
	if v == nil {
		return []int64{}
	}
	return v
}

// NominalJSON is the analysis at nominal values inside an assess result.
type NominalJSON struct {
	Parameters []ParamValueJSON  `json:"parameters"`
	Equilibria []EquilibriumJSON `json:"equilibria"`
	Current    *CurrentJSON      `json:"current,omitempty"`
	Faults     []string          `json:"faults"`
	Warnings   []string          `json:"warnings"`
}

func newNominalJSON(s *assess.Snapshot) *NominalJSON {
	if s == nil {
		return nil
	}
	e := NewEquilibriaJSON("", "", s)
	n := &NominalJSON{Parameters: e.Parameters, Equilibria: e.Equilibria, Current: e.Current,
		Faults: append([]string{}, e.Faults...), Warnings: e.Warnings}
	if n.Parameters == nil {
		n.Parameters = []ParamValueJSON{}
	}
	for i := range n.Equilibria {
		// Basins reach the domain ends; keep them finite for JSON.
		for j := range n.Equilibria[i].Basin {
			if math.IsInf(n.Equilibria[i].Basin[j], 0) || math.IsNaN(n.Equilibria[i].Basin[j]) {
				n.Equilibria[i].Basin[j] = s.Domain[j]
			}
		}
	}
	return n
}
