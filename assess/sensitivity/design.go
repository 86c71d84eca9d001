package sensitivity

import (
	"fmt"

	"holdfast/sample"
)

// Run roles within a base row of a Design.
const (
	RoleA = 0 // the row of base matrix A
	RoleB = 1 // the row of base matrix B
	// Role 2+l is the row of A_B^(l): A with column l taken from B.
)

// MaxBase is the largest number of base rows a Design accepts.
const MaxBase = 1 << 20

// maxStackDim bounds the scratch kept on the stack by Design.Point; larger
// designs allocate.
const maxStackDim = 2 * 64

// Design is the sampling design of Saltelli et al. (2010, Computer Physics
// Communications 181:259, §3) for first-order and total Sobol' indices of k
// inputs from N base rows: two independent N×k matrices A and B of points
// in the unit cube, and for each input l the matrix A_B^(l), equal to A
// except that column l is taken from B; N·(k+2) model runs in all.
//
// The base points are quasi-random: row j of A holds the first k and row j
// of B the last k coordinates of point j of one 2k-dimensional scrambled
// Sobol' sequence (sample.QMC: Joe–Kuo direction numbers, Owen
// scrambling), the choice Saltelli (2002) and Saltelli et al. (2010)
// recommend. When 2k exceeds the dimensions the Sobol' generator supports
// (sample.MaxQMCDim), a Latin hypercube of dimension 2k is used instead.
// N is best a power of two, where the Sobol' points are balanced.
//
// Runs are numbered row by row so that a row's runs arrive together: run i
// belongs to base row j = i/(k+2) and has role c = i mod (k+2), RoleA,
// RoleB, or 2+l for A_B^(l). A Design is immutable and safe for concurrent
// use.
type Design struct {
	n, k int
	plan *sample.Plan
}

// NewDesign returns the design of n base rows for k inputs. It needs
// 2 ≤ n ≤ MaxBase and k ≥ 1.
func NewDesign(n, k int, seed uint64) (*Design, error) {
	if n < 2 || n > MaxBase {
		return nil, fmt.Errorf("sensitivity design: base rows must be between 2 and %d, got %d", MaxBase, n)
	}
	if k < 1 {
		return nil, fmt.Errorf("sensitivity design: needs at least one input, got %d", k)
	}
	kind := sample.QMC
	if 2*k > sample.MaxQMCDim {
		kind = sample.LHS
	}
	plan, err := sample.NewPlan(kind, n, 2*k, seed)
	if err != nil {
		return nil, fmt.Errorf("sensitivity design: %w", err)
	}
	return &Design{n: n, k: k, plan: plan}, nil
}

// Base returns the number of base rows N.
func (d *Design) Base() int { return d.n }

// Inputs returns the number of inputs k.
func (d *Design) Inputs() int { return d.k }

// Runs returns the number of model runs N·(k+2).
func (d *Design) Runs() int { return d.n * (d.k + 2) }

// Plan returns the kind of the base plan (sample.QMC, or sample.LHS for
// very many inputs).
func (d *Design) Plan() sample.PlanKind { return d.plan.Kind() }

// Role returns the base row and the role of run i.
func (d *Design) Role(i int) (row, role int) { return i / (d.k + 2), i % (d.k + 2) }

// Point fills u[:k] with the unit-cube point of run i. It is safe for
// concurrent use and, for k ≤ 64, does not allocate.
func (d *Design) Point(i int, u []float64) {
	row, role := d.Role(i)
	k := d.k
	var buf [maxStackDim]float64
	var p []float64
	if 2*k <= maxStackDim {
		p = buf[:2*k]
	} else {
		p = make([]float64, 2*k)
	}
	d.plan.Point(row, p)
	switch role {
	case RoleA:
		copy(u[:k], p[:k])
	case RoleB:
		copy(u[:k], p[k:])
	default:
		l := role - 2
		copy(u[:k], p[:k])
		u[l] = p[k+l]
	}
}
