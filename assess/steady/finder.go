package steady

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// Finder finds equilibria with reusable scratch space, so that repeated
// calls (one per Monte Carlo draw) allocate little. A Finder is not safe
// for concurrent use: give each worker its own.
type Finder struct {
	opt       Options
	rule      legendreRule
	integrand func(float64) float64

	// per call
	f                    Func
	lo, hi, absTol, h0   float64
	fscale               float64
	nodes                []node
	skip                 []bool
	cands                []cand
	conts                []Interval
	items                []item
	segs                 []segment
	eqs                  []Equilibrium
	undef                []Interval
	poles                []float64
	warn                 []string
	c, e                 [MaxTaylor]float64
	nEval, nTaylor, nTrm int
	stopped              bool
	res                  Result

	// last iterate of solve, and the bound on |f‴/6| for its error estimate
	sol solution
	rho float64
}

// NewFinder validates opt and returns a Finder.
func NewFinder(opt Options) (*Finder, error) {
	if err := opt.validate(); err != nil {
		return nil, err
	}
	fz := &Finder{opt: opt}
	fz.rule.init(opt.QuadNodes)
	fz.integrand = fz.evalCounted
	return fz, nil
}

// Find returns every equilibrium of dx/dt = f(x) in [lo, hi] with Options
// opt. It is a convenience wrapper around NewFinder and (*Finder).Find.
func Find(f Func, lo, hi float64, opt Options) (*Result, error) {
	fz, err := NewFinder(opt)
	if err != nil {
		return nil, err
	}
	return fz.Find(f, lo, hi)
}

// Find returns every equilibrium of dx/dt = f(x) in [lo, hi], sorted by x,
// classified and with its figures; see the package documentation for the
// method. The returned Result is owned by fz and is overwritten by the next
// call. Find returns an error only for an invalid domain, a nil f, or a
// panic inside f; undefined points, poles and exhausted budgets are
// reported in the Result.
func (fz *Finder) Find(f Func, lo, hi float64) (res *Result, err error) {
	if f == nil {
		return nil, errors.New("steady: nil rate law")
	}
	if !(lo < hi) || math.IsInf(hi-lo, 0) {
		return nil, fmt.Errorf("%w: [%g, %g] (need finite lo < hi)", ErrDomain, lo, hi)
	}
	defer func() {
		if r := recover(); r != nil {
			res, err = nil, fmt.Errorf("steady: rate law failed at evaluation: %v", r)
		}
	}()
	fz.reset(f, lo, hi)
	fz.scan()
	fz.continua()
	n := fz.opt.Grid
	for i := 0; i < n && !fz.over(); i++ {
		if !fz.skip[i] {
			fz.cell(fz.nodes[i], fz.nodes[i+1], 0)
		}
	}
	for i := range fz.nodes {
		nd := &fz.nodes[i]
		if nd.zero() && !fz.inContinuum(nd.x) {
			fz.addNodeCand(nd)
		}
	}
	fz.assemble()
	fz.res = Result{
		Lo: lo, Hi: hi,
		Equilibria:  fz.eqs,
		Undefined:   fz.undef,
		Poles:       fz.poles,
		Warnings:    fz.warn,
		Evals:       fz.nEval,
		TaylorCalls: fz.nTaylor,
		TaylorTerms: fz.nTrm,
	}
	return &fz.res, nil
}

func (fz *Finder) reset(f Func, lo, hi float64) {
	fz.f = f
	fz.lo, fz.hi = lo, hi
	fz.absTol = fz.opt.AbsTol
	if fz.absTol == 0 {
		fz.absTol = fz.opt.RelTol * (hi - lo)
	}
	fz.h0 = (hi - lo) / float64(fz.opt.Grid)
	fz.fscale = 0
	fz.cands = fz.cands[:0]
	fz.conts = fz.conts[:0]
	fz.items = fz.items[:0]
	fz.segs = fz.segs[:0]
	fz.eqs = fz.eqs[:0]
	fz.undef = fz.undef[:0]
	fz.poles = fz.poles[:0]
	fz.warn = fz.warn[:0]
	fz.nEval, fz.nTaylor, fz.nTrm = 0, 0, 0
	fz.stopped = false
	n := fz.opt.Grid + 1
	if cap(fz.nodes) < n {
		fz.nodes = make([]node, n)
		fz.skip = make([]bool, n)
	}
	fz.nodes = fz.nodes[:n]
	fz.skip = fz.skip[:n]
	clear(fz.skip)
}

// tol is the root tolerance at x.
func (fz *Finder) tol(x float64) float64 {
	return fz.opt.RelTol*math.Abs(x) + fz.absTol
}

// over reports (and records once) that the call budget is spent.
func (fz *Finder) over() bool {
	if fz.stopped {
		return true
	}
	if fz.nEval+fz.nTaylor >= fz.opt.MaxCalls {
		fz.stopped = true
		fz.warnf("search stopped after %d calls of f (Options.MaxCalls): results may be incomplete", fz.nEval+fz.nTaylor)
	}
	return fz.stopped
}

func (fz *Finder) warnf(format string, args ...any) {
	fz.warn = append(fz.warn, fmt.Sprintf(format, args...))
}

func (fz *Finder) eval(x float64) float64 {
	fz.nEval++
	return fz.f.Eval(x)
}

func (fz *Finder) evalCounted(x float64) float64 { return fz.eval(x) }

// taylor fills fz.c[:n], fz.e[:n] at x.
func (fz *Finder) taylor(x float64, n int) {
	clear(fz.c[:n])
	clear(fz.e[:n])
	fz.f.Taylor(x, fz.c[:n], fz.e[:n])
	fz.nTaylor++
	fz.nTrm += n
}

// zeroAt reports whether f(x) is zero within its rounding-error bound.
func (fz *Finder) zeroAt(x float64) bool {
	fz.taylor(x, 1)
	return math.Abs(fz.c[0]) <= fz.e[0]
}

// nodeKind sorts scan points by what is known of f there.
type nodeKind uint8

const (
	kSmooth nodeKind = iota // c0..c2 and their bounds finite
	kRough                  // f finite, a derivative or bound not
	kUndef                  // f NaN
	kPole                   // f infinite
)

// node is a scan point with f, f', f″/2 and their error bounds.
type node struct {
	x    float64
	c, e [3]float64
	kind nodeKind
}

func (n *node) bad() bool { return n.kind >= kUndef }

func (n *node) zero() bool {
	return n.kind <= kRough && (n.c[0] == 0 || math.Abs(n.c[0]) <= n.e[0])
}

func (n *node) flat() bool {
	return n.kind == kSmooth && math.Abs(n.c[0]) <= n.e[0] &&
		math.Abs(n.c[1]) <= n.e[1] && math.Abs(n.c[2]) <= n.e[2]
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// setNode fills nd at x from fz.c, fz.e (at least 3 terms filled).
func (fz *Finder) setNode(nd *node, x float64) {
	nd.x = x
	nd.c = [3]float64{fz.c[0], fz.c[1], fz.c[2]}
	nd.e = [3]float64{fz.e[0], fz.e[1], fz.e[2]}
	nd.kind = kSmooth
	if s := nd.c[0] + nd.c[1] + nd.c[2] + nd.e[0] + nd.e[1] + nd.e[2]; s-s == 0 {
		return // all finite
	}
	if !finite(nd.e[0]) && finite(nd.c[0]) {
		nd.e[0] = 0 // an unusable bound: judge the sign of f by its value
	}
	switch {
	case math.IsNaN(nd.c[0]):
		nd.kind = kUndef
	case math.IsInf(nd.c[0], 0):
		nd.kind = kPole
	case !finite(nd.c[1]) || !finite(nd.c[2]) || !finite(nd.e[0]) || !finite(nd.e[1]) || !finite(nd.e[2]):
		nd.kind = kRough
	}
}

func (fz *Finder) evalNode(x float64) node {
	var nd node
	fz.taylor(x, 3)
	fz.setNode(&nd, x)
	return nd
}

// scan evaluates the uniform grid.
func (fz *Finder) scan() {
	n := fz.opt.Grid
	for i := 0; i <= n; i++ {
		x := fz.lo + float64(i)*fz.h0
		if i == n {
			x = fz.hi
		}
		fz.taylor(x, 3)
		fz.setNode(&fz.nodes[i], x)
		if fz.nodes[i].kind <= kRough {
			fz.fscale = fmax(fz.fscale, math.Abs(fz.nodes[i].c[0]))
		}
	}
}

// continua finds runs of grid points where f, f' and f″ all vanish and f
// vanishes between them: sub-intervals with f ≡ 0.
func (fz *Finder) continua() {
	n := fz.opt.Grid
	for i := 0; i <= n; {
		if !fz.nodes[i].flat() {
			i++
			continue
		}
		j := i
		for j < n && fz.nodes[j+1].flat() && fz.zeroAt(0.5*(fz.nodes[j].x+fz.nodes[j+1].x)) {
			j++
		}
		if j > i {
			for k := i; k < j; k++ {
				fz.skip[k] = true
			}
			s0 := fz.zeroEdge(fz.nodes[i].x, -1)
			s1 := fz.zeroEdge(fz.nodes[j].x, +1)
			fz.conts = append(fz.conts, Interval{s0, s1})
			fz.cands = append(fz.cands, cand{x: 0.5 * (s0 + s1), span: [2]float64{s0, s1}, cont: true})
		}
		i = j + 1
	}
}

func (fz *Finder) inContinuum(x float64) bool {
	for _, iv := range fz.conts {
		if x >= iv.Lo-fz.tol(x) && x <= iv.Hi+fz.tol(x) {
			return true
		}
	}
	return false
}

// zeroEdge returns the edge of the zero set of f that contains x, searched
// at most one grid cell in direction dir (±1), by bisection on "f is zero
// within its error bound".
func (fz *Finder) zeroEdge(x float64, dir int) float64 {
	out := x + float64(dir)*fz.h0
	out = fmax(fz.lo, fmin(fz.hi, out))
	if out == x {
		return x
	}
	if fz.zeroAt(out) {
		return out
	}
	in := x
	for math.Abs(out-in) > fz.tol(in) && !fz.over() {
		m := 0.5 * (in + out)
		if m == in || m == out {
			break
		}
		if fz.zeroAt(m) {
			in = m
		} else {
			out = m
		}
	}
	return in
}

// cand is a root candidate.
type cand struct {
	x     float64
	c, e  [3]float64 // Taylor data at x, valid when data
	data  bool
	dloc  float64 // location uncertainty from refinement
	span  [2]float64
	cont  bool // continuum from the scan
	touch bool // touching root found at an extremum
	rough bool // a Taylor coefficient is NaN at the root

	// classification
	cls   Class
	order int
	side  Side
	slope float64
	delta float64
}

func (fz *Finder) addNodeCand(nd *node) {
	cd := cand{x: nd.x, c: nd.c, e: nd.e, data: true}
	cd.span = [2]float64{nd.x, nd.x}
	fz.cands = append(fz.cands, cd)
}

// addSolved records the root found by solve (level 0) or a touching root at
// an extremum (level 1), from fz.sol.
func (fz *Finder) addSolved(touch bool) {
	s := &fz.sol
	cd := cand{x: s.root, data: true, dloc: s.dloc, touch: touch}
	cd.c, cd.e = s.shifted()
	cd.span = [2]float64{s.root, s.root}
	fz.cands = append(fz.cands, cd)
}

func (fz *Finder) addPole(x float64) { fz.poles = append(fz.poles, x) }

func (fz *Finder) addUndef(a, b float64) {
	if a > b {
		a, b = b, a
	}
	fz.undef = append(fz.undef, Interval{a, b})
}

// legendreRule is gonum's Gauss–Legendre rule with its nodes and weights on
// [−1, 1] computed once (quad.Legendre.FixedLocations) and mapped per call,
// so that quad.Fixed neither allocates nor recomputes them.
type legendreRule struct {
	x, w []float64
}

func (r *legendreRule) init(n int) {
	r.x = make([]float64, n)
	r.w = make([]float64, n)
	quad.Legendre{}.FixedLocations(r.x, r.w, -1, 1)
}

// integrate is the n-point Gauss–Legendre sum of f over [min, max] with
// the cached nodes: the same sum quad.Fixed forms with this rule, without
// quad.Fixed's per-call slices (it runs for every barrier of every draw).
func (r *legendreRule) integrate(f func(float64) float64, min, max float64) float64 {
	half := 0.5 * (max - min)
	s := 0.0
	for k, x := range r.x {
		s += r.w[k] * f(min+(x+1)*half)
	}
	return s * half
}

// FixedLocations implements quad.FixedLocationer.
func (r *legendreRule) FixedLocations(x, weight []float64, min, max float64) {
	for k := range x {
		x[k], weight[k] = r.FixedLocationSingle(len(x), k, min, max)
	}
}

// FixedLocationSingle implements quad.FixedLocationSingler for n equal to
// the cached size; other sizes fall back to quad.Legendre.
func (r *legendreRule) FixedLocationSingle(n, k int, min, max float64) (x, weight float64) {
	if n != len(r.x) {
		return quad.Legendre{}.FixedLocationSingle(n, k, min, max)
	}
	half := 0.5 * (max - min)
	return min + (r.x[k]+1)*half, r.w[k] * half
}
