package expr

import (
	"fmt"
	"math"
)

// Machine holds the scratch space for evaluating one Program. A Machine is
// not safe for concurrent use; give each goroutine its own (NewMachine).
// After NewMachine, no method allocates except Diagnose when it reports a
// fault.
type Machine struct {
	p    *Program
	regs []float64 // Eval registers

	// Eval keeps the registers of the θ-only instructions (pcode) for the
	// θ it last saw; evalTheta holds that θ and evalReady says it is valid.
	evalTheta []float64
	evalReady bool

	ts taylorRegs // Taylor series registers

	gv, gd  []float64 // ParamGrad: values and their x-derivatives
	gb, gbd []float64 // ParamGrad: adjoints and their x-derivatives
	dg      diagState // Diagnose memo for defines
	iv      ivState   // Interval, IntervalSlope registers
}

// NewMachine returns scratch space for evaluating p.
func (p *Program) NewMachine() *Machine {
	n := p.nreg
	m := &Machine{
		p:         p,
		regs:      make([]float64, n),
		evalTheta: make([]float64, len(p.params)),
		ts:        taylorRegs{r: make([]series, n), theta: make([]float64, len(p.params))},
		gv:        make([]float64, n),
		gd:        make([]float64, n),
		gb:        make([]float64, n),
		gbd:       make([]float64, n),
		dg:        newDiagState(len(p.exprs)),
	}
	for _, c := range p.consts {
		m.regs[c.reg] = c.val
		m.ts.r[c.reg].v[0] = c.val
		m.ts.r[c.reg].e[0] = c.err
		m.gv[c.reg] = c.val
	}
	m.ts.r[regState].v[1] = 1 // x = x0 + t
	m.ivInit()
	return m
}

// load copies x and θ into the registers r.
func (m *Machine) load(r []float64, x float64, theta []float64) {
	np := len(m.p.params)
	if len(theta) < np {
		panic(fmt.Sprintf("expr: len(theta) = %d, want %d parameters", len(theta), np))
	}
	r[regState] = x
	r = r[1 : 1+np]
	for j, v := range theta[:np] {
		r[j] = v
	}
}

// Eval returns f(x; θ). theta must hold NumParams() values. NaN and ±Inf
// propagate by the IEEE 754 rules; Diagnose explains a non-finite result.
// Eval does not allocate.
//
// The instructions that do not depend on x (m^q in a Hill term, say) run
// once per θ: while later calls pass the same θ bit for bit, only the
// x-dependent instructions run. Each instruction computes exactly what it
// would in one pass over the whole program, so the value does not depend
// on earlier calls.
func (m *Machine) Eval(x float64, theta []float64) float64 {
	p := m.p
	np := len(p.params)
	if len(theta) < np {
		panic(fmt.Sprintf("expr: len(theta) = %d, want %d parameters", len(theta), np))
	}
	th := theta[:np]
	if !m.evalReady || !sameBits(m.evalTheta, th) {
		m.evalReady = false
		m.load(m.regs, x, theta)
		run(p.pcode, m.regs)
		copy(m.evalTheta, th)
		m.evalReady = true
	}
	m.regs[regState] = x
	run(p.xcode, m.regs)
	return m.regs[p.out]
}

// run executes code on the register file r. It is the single definition of
// the float semantics of every instruction: Eval runs it, and so does
// constant folding.
func run(code []instr, r []float64) {
	for i := range code {
		in := &code[i]
		a, b := r[in.a], r[in.b]
		var v float64
		switch in.op {
		case opAdd:
			v = a + b
		case opSub:
			v = a - b
		case opMul:
			v = a * b
		case opDiv:
			v = a / b
		case opNeg:
			v = -a
		case opPow:
			v = math.Pow(a, b)
		case opExp:
			v = math.Exp(a)
		case opLog:
			v = math.Log(a)
		case opLog10:
			v = math.Log10(a)
		case opSqrt:
			v = math.Sqrt(a)
		case opAbs:
			v = math.Abs(a)
		case opMin:
			v = math.Min(a, b)
		case opMax:
			v = math.Max(a, b)
		case opSin:
			v = math.Sin(a)
		case opCos:
			v = math.Cos(a)
		case opTan:
			v = math.Tan(a)
		case opAtan:
			v = math.Atan(a)
		case opSinh:
			v = math.Sinh(a)
		case opCosh:
			v = math.Cosh(a)
		case opTanh:
			v = math.Tanh(a)
		}
		r[in.dst] = v
	}
}
