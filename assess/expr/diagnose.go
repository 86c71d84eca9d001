package expr

import (
	"fmt"
	"math"
)

// FaultKind classifies why f is not finite.
type FaultKind uint8

const (
	FaultNone       FaultKind = iota
	FaultLogDomain            // log or log10 of a non-positive number
	FaultSqrtDomain           // sqrt of a negative number
	FaultDivZero              // division by zero, or 0 to a negative power
	FaultPowDomain            // negative base to a non-integer power
	FaultOverflow             // a finite computation exceeded the float64 range
	FaultNaNOperand           // the state or a parameter is NaN
	FaultInfOperand           // the state or a parameter is ±Inf
	FaultUndefined            // a non-finite result with no other explanation (not expected)
	NumFaultKinds             // number of kinds, for tables indexed by kind
)

func (k FaultKind) String() string {
	switch k {
	case FaultNone:
		return "no fault"
	case FaultLogDomain:
		return "log of non-positive"
	case FaultSqrtDomain:
		return "sqrt of negative"
	case FaultDivZero:
		return "division by zero"
	case FaultPowDomain:
		return "pow of negative base to non-integer power"
	case FaultOverflow:
		return "overflow"
	case FaultNaNOperand:
		return "NaN operand"
	case FaultInfOperand:
		return "infinite operand"
	case FaultUndefined:
		return "undefined result"
	}
	return fmt.Sprintf("FaultKind(%d)", uint8(k))
}

// Fault locates the operation where a non-finite value of f arose.
type Fault struct {
	Kind   FaultKind
	Op     string // the operator or function ("/", "^", "log", ...), or the input's name for operand faults
	Where  string // "rate" or the define's name
	Offset int    // byte offset of the operator, function name or input name in that expression
}

func (f *Fault) String() string {
	return fmt.Sprintf("%s at %q (%s, byte %d)", f.Kind, f.Op, f.Where, f.Offset)
}

// diagState memoizes define values during one Diagnose call.
type diagState struct {
	done  []bool
	val   []float64
	fault []Fault
}

func newDiagState(n int) diagState {
	return diagState{done: make([]bool, n), val: make([]float64, n), fault: make([]Fault, n)}
}

// Diagnose explains a non-finite f(x; θ). It returns nil when Eval gives a
// finite value. Otherwise it re-evaluates the syntax trees in a checked
// mode, with the same float operations as Eval, and follows the non-finite
// value back to where it arose: an operation with finite operands and a
// non-finite result (log of a non-positive number, sqrt of a negative one,
// division by zero, a negative base to a non-integer power, overflow), or a
// NaN or infinite state or parameter value. Non-finite intermediate values
// that are absorbed (exp(−1/0) = 0) are not reported; when both operands of
// an operation are non-finite, the left one is followed.
func (m *Machine) Diagnose(x float64, theta []float64) *Fault {
	if v := m.Eval(x, theta); !math.IsNaN(v) && !math.IsInf(v, 0) {
		return nil
	}
	ds := &m.dg
	for i := range ds.done {
		ds.done[i] = false
	}
	rate := len(m.p.exprs) - 1
	_, f := m.diag(rate, m.p.exprs[rate].root, x, theta)
	if f.Kind == FaultNone {
		f = Fault{Kind: FaultUndefined, Op: "", Where: "rate", Offset: 0}
	}
	return &f
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// diag evaluates n, part of expression ex, returning its value and, when
// the value is not finite, the fault it comes from.
func (m *Machine) diag(ex int, n node, x float64, theta []float64) (float64, Fault) {
	where := m.p.exprs[ex].name
	at := func(k FaultKind, op string, off int) Fault {
		return Fault{Kind: k, Op: op, Where: where, Offset: off}
	}
	switch n := n.(type) {
	case *numLit:
		return n.val, Fault{}
	case *constRef:
		return n.val, Fault{}
	case *varRef:
		var v float64
		switch n.kind {
		case symState:
			v = x
		case symParam:
			v = theta[n.index]
		case symDefine:
			ds := &m.dg
			if !ds.done[n.index] {
				ds.val[n.index], ds.fault[n.index] = m.diag(n.index, m.p.exprs[n.index].root, x, theta)
				ds.done[n.index] = true
			}
			return ds.val[n.index], ds.fault[n.index]
		}
		switch {
		case math.IsNaN(v):
			return v, at(FaultNaNOperand, n.name, n.off)
		case math.IsInf(v, 0):
			return v, at(FaultInfOperand, n.name, n.off)
		}
		return v, Fault{}
	case *unaryExpr:
		v, f := m.diag(ex, n.x, x, theta) // negation neither creates nor absorbs non-finite values
		return -v, f
	case *binaryExpr:
		a, fa := m.diag(ex, n.x, x, theta)
		b, fb := m.diag(ex, n.y, x, theta)
		var v float64
		switch n.op {
		case '+':
			v = a + b
		case '-':
			v = a - b
		case '*':
			v = a * b
		case '/':
			v = a / b
		case '^':
			v = powValue(a, b, n.pw)
		}
		return v, blame(v, fa, fb, func() Fault {
			return at(classify(opOf(n.op), a, b), string(n.op), n.off)
		})
	case *callExpr:
		info := funcTable(n.fn)
		a, fa := m.diag(ex, n.args[0], x, theta)
		b, fb := a, Fault{}
		if len(n.args) == 2 {
			b, fb = m.diag(ex, n.args[1], x, theta)
		}
		var v float64
		if n.fn == fnPow {
			v = powValue(a, b, n.pw)
		} else {
			v = apply(info.op, a, b)
		}
		return v, blame(v, fa, fb, func() Fault {
			return at(classify(info.op, a, b), info.name, n.off)
		})
	}
	return math.NaN(), Fault{Kind: FaultUndefined}
}

// blame returns the fault behind a non-finite v: the first operand's fault
// if it has one, else the second's, else a fault made here.
func blame(v float64, fa, fb Fault, here func() Fault) Fault {
	switch {
	case finite(v):
		return Fault{}
	case fa.Kind != FaultNone:
		return fa
	case fb.Kind != FaultNone:
		return fb
	}
	return here()
}

// classify names the fault of op on finite operands a, b giving a
// non-finite result.
func classify(op opcode, a, b float64) FaultKind {
	switch op {
	case opDiv:
		if b == 0 {
			return FaultDivZero
		}
	case opPow:
		switch {
		case a < 0 && b != math.Trunc(b):
			return FaultPowDomain
		case a == 0 && b < 0:
			return FaultDivZero
		}
	case opLog, opLog10:
		if a <= 0 {
			return FaultLogDomain
		}
	case opSqrt:
		if a < 0 {
			return FaultSqrtDomain
		}
	}
	if math.IsInf(apply(op, a, b), 0) {
		return FaultOverflow
	}
	return FaultUndefined
}

func opOf(c byte) opcode {
	switch c {
	case '+':
		return opAdd
	case '-':
		return opSub
	case '*':
		return opMul
	case '/':
		return opDiv
	}
	return opPow
}

// powValue is a^b as the lowered program computes it.
func powValue(a, b float64, pw intPow) float64 {
	if pw.ok {
		return ipow(a, pw.n)
	}
	return math.Pow(a, b)
}

// apply evaluates one instruction through run, the shared definition of
// the float semantics.
func apply(op opcode, a, b float64) float64 {
	r := [3]float64{a, b, 0}
	code := [1]instr{{op: op, a: 0, b: 1, dst: 2}}
	run(code[:], r[:])
	return r[2]
}
