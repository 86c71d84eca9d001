package expr

import (
	"fmt"
	"math"
)

// Define is a named sub-expression. It may use the state, the parameters
// and earlier defines; it is evaluated once per call and shared by every use.
type Define struct{ Name, Src string }

// Env declares the names a rate law may use.
type Env struct {
	State   string   // the state symbol, e.g. "P"
	Params  []string // parameter names; index = slot in theta
	Defines []Define // named sub-expressions in order; each may use the state, params and earlier defines
}

// Program is a compiled rate law f(x; θ). It is immutable and safe for
// concurrent use; each goroutine evaluates it through its own Machine.
type Program struct {
	state  string
	params []string
	exprs  []source // the defines in order, then the rate (last)

	code   []instr
	pcode  []instr // the instructions of code that do not depend on the state, in order
	xcode  []instr // those that do, in order (pcode then xcode computes what code does)
	nreg   int
	consts []constInit
	out    int32  // register holding f
	xdep   []bool // per register: depends on the state
	pdep   []bool // per register: depends on some parameter
	uses   []bool // per parameter slot: f depends on it
}

// source is one parsed expression.
type source struct {
	name, src string
	root      node
}

// constInit is a register holding a constant, with a bound on the distance
// between the stored float64 and the exact real constant it stands for.
type constInit struct {
	reg      int32
	val, err float64
}

// Register layout: register 0 holds the state x, registers 1..len(Params)
// the parameters, the rest constants and instruction results.
const regState = 0

func paramReg(j int) int32 { return int32(1 + j) }

// Compile parses the rate law and the defines of env, resolves every name,
// and lowers the syntax trees to a flat instruction list shared by the
// evaluation back ends (Eval, Taylor, ParamGrad; Diagnose walks the trees).
// The error, if any, is an *Error; it also reports names in env that are
// invalid, reserved (see Reserved) or declared twice. Defines are checked in
// order before the rate; the first error is returned.
func Compile(rate string, env Env) (*Program, error) {
	if e := checkEnv(env); e != nil {
		return nil, e
	}
	sc := &scope{
		state:   env.State,
		params:  make(map[string]int, len(env.Params)),
		defines: make(map[string]int, len(env.Defines)),
	}
	for i, name := range env.Params {
		sc.params[name] = i
	}
	for i, d := range env.Defines {
		sc.defines[d.Name] = i
		sc.order = append(sc.order, d.Name)
	}
	p := &Program{state: env.State, params: append([]string(nil), env.Params...)}
	for i, d := range env.Defines {
		sc.cur = i
		root, e := parse(d.Src, d.Name, sc, env.Params)
		if e != nil {
			return nil, e
		}
		p.exprs = append(p.exprs, source{name: d.Name, src: d.Src, root: root})
	}
	sc.cur = len(env.Defines)
	root, e := parse(rate, "rate", sc, env.Params)
	if e != nil {
		return nil, e
	}
	p.exprs = append(p.exprs, source{name: "rate", src: rate, root: root})
	lower(p)
	return p, nil
}

// checkEnv validates the declared names.
func checkEnv(env Env) *Error {
	fail := func(format string, args ...any) *Error {
		return &Error{Offset: -1, Where: "env", Msg: fmt.Sprintf(format, args...)}
	}
	seen := make(map[string]string)
	check := func(what, name string) *Error {
		switch {
		case !validName(name):
			return fail("%s %q is not a valid name (letters, digits and _, not starting with a digit)", what, name)
		case Reserved(name):
			return fail("%s %q is reserved (a built-in function or constant)", what, name)
		case seen[name] != "":
			if seen[name] == what {
				return fail("%s %q is declared twice", what, name)
			}
			return fail("%s %q has the same name as the %s", what, name, seen[name])
		}
		seen[name] = what
		return nil
	}
	if e := check("state symbol", env.State); e != nil {
		return e
	}
	for _, name := range env.Params {
		if e := check("parameter", name); e != nil {
			return e
		}
	}
	for _, d := range env.Defines {
		if e := check("define", d.Name); e != nil {
			return e
		}
	}
	return nil
}

// NumParams returns the number of parameter slots, len(env.Params).
func (p *Program) NumParams() int { return len(p.params) }

// Uses reports whether f depends on parameter slot param, directly or
// through defines. The dependence is structural: in K - K the parameter K
// is used.
func (p *Program) Uses(param int) bool {
	return param >= 0 && param < len(p.uses) && p.uses[param]
}

// Rate returns the source of the rate law.
func (p *Program) Rate() string { return p.exprs[len(p.exprs)-1].src }

// opcode is an instruction of the lowered program. Binary instructions read
// registers a and b; unary ones read a (and carry b = a).
type opcode uint8

const (
	opAdd opcode = iota
	opSub
	opMul
	opDiv
	opNeg
	opPow // a^b by math.Pow; integer constant exponents are lowered to opMul/opDiv
	opExp
	opLog
	opLog10
	opSqrt
	opAbs
	opMin
	opMax
	opSin
	opCos
	opTan
	opAtan
	opSinh
	opCosh
	opTanh
)

func (op opcode) binary() bool {
	switch op {
	case opAdd, opSub, opMul, opDiv, opPow, opMin, opMax:
		return true
	}
	return false
}

func (op opcode) commutative() bool {
	switch op {
	case opAdd, opMul, opMin, opMax:
		return true
	}
	return false
}

// instr computes register dst from registers a and b. Registers are
// assigned once (static single assignment), so dst never aliases a or b.
type instr struct {
	op    opcode
	xdep  bool // dst depends on the state
	axdep bool // operand a depends on the state
	bxdep bool // operand b depends on the state (selects the Taylor rule for opPow)
	a, b  int32
	dst   int32
}

// maxIntPow is the largest |n| for which x^n with a constant integer n is
// lowered to multiplications (binary powering: at most 2·log2 n products).
const maxIntPow = 64

// lowerer turns syntax trees into instructions, folding constants and
// sharing common subexpressions (hash-consing).
type lowerer struct {
	p      *Program
	cse    map[[3]int32]int32
	consts map[[2]uint64]int32
	isK    []bool    // per register: holds a constant
	kval   []float64 // constant value
	kerr   []float64 // bound on its error
	defReg []int32   // register of each define, -1 until lowered
	fold   folder
}

func lower(p *Program) {
	l := &lowerer{
		p:      p,
		cse:    make(map[[3]int32]int32),
		consts: make(map[[2]uint64]int32),
		defReg: make([]int32, len(p.exprs)-1),
	}
	for i := range l.defReg {
		l.defReg[i] = -1
	}
	l.newReg() // state
	p.xdep[regState] = true
	for range p.params {
		r := l.newReg()
		p.pdep[r] = true
	}
	p.out = l.node(p.exprs[len(p.exprs)-1].root)

	// Parameter use: registers reachable backwards from the output.
	live := make([]bool, p.nreg)
	live[p.out] = true
	for i := len(p.code) - 1; i >= 0; i-- {
		in := p.code[i]
		if live[in.dst] {
			live[in.a], live[in.b] = true, true
		}
	}
	p.uses = make([]bool, len(p.params))
	for j := range p.params {
		p.uses[j] = live[paramReg(j)]
	}

	// An instruction that does not depend on x reads only registers that do
	// not, all written earlier by such instructions; so running those first
	// and then the rest, each in program order, respects every dependence.
	for _, in := range p.code {
		if in.xdep {
			p.xcode = append(p.xcode, in)
		} else {
			p.pcode = append(p.pcode, in)
		}
	}
}

func (l *lowerer) newReg() int32 {
	p := l.p
	r := int32(p.nreg)
	p.nreg++
	p.xdep = append(p.xdep, false)
	p.pdep = append(p.pdep, false)
	l.isK = append(l.isK, false)
	l.kval = append(l.kval, 0)
	l.kerr = append(l.kerr, 0)
	return r
}

// constant returns a register holding val, whose distance from the exact
// value it stands for is at most err.
func (l *lowerer) constant(val, err float64) int32 {
	key := [2]uint64{math.Float64bits(val), math.Float64bits(err)}
	if r, ok := l.consts[key]; ok {
		return r
	}
	r := l.newReg()
	l.isK[r], l.kval[r], l.kerr[r] = true, val, err
	l.consts[key] = r
	l.p.consts = append(l.p.consts, constInit{reg: r, val: val, err: err})
	return r
}

// emit returns a register holding op(a, b): a folded constant, an earlier
// identical instruction, or a new instruction.
func (l *lowerer) emit(op opcode, a, b int32) int32 {
	if !op.binary() {
		b = a
	}
	if op.commutative() && a > b {
		a, b = b, a
	}
	if l.isK[a] && l.isK[b] {
		v, e := l.fold.eval(op, l.kval[a], l.kerr[a], l.kval[b], l.kerr[b])
		return l.constant(v, e)
	}
	key := [3]int32{int32(op), a, b}
	if r, ok := l.cse[key]; ok {
		return r
	}
	p := l.p
	r := l.newReg()
	p.xdep[r] = p.xdep[a] || p.xdep[b]
	p.pdep[r] = p.pdep[a] || p.pdep[b]
	p.code = append(p.code, instr{op: op, xdep: p.xdep[r], axdep: p.xdep[a], bxdep: p.xdep[b], a: a, b: b, dst: r})
	l.cse[key] = r
	return r
}

// node lowers a syntax tree and returns the register of its value.
func (l *lowerer) node(n node) int32 {
	switch n := n.(type) {
	case *numLit:
		return l.constant(n.val, n.err)
	case *constRef:
		return l.constant(n.val, n.err)
	case *varRef:
		switch n.kind {
		case symState:
			return regState
		case symParam:
			return paramReg(n.index)
		}
		if l.defReg[n.index] < 0 {
			l.defReg[n.index] = l.node(l.p.exprs[n.index].root)
		}
		return l.defReg[n.index]
	case *unaryExpr:
		return l.emit(opNeg, l.node(n.x), 0)
	case *binaryExpr:
		a, b := l.node(n.x), l.node(n.y)
		switch n.op {
		case '+':
			return l.emit(opAdd, a, b)
		case '-':
			return l.emit(opSub, a, b)
		case '*':
			return l.emit(opMul, a, b)
		case '/':
			return l.emit(opDiv, a, b)
		}
		return l.power(a, b, &n.pw)
	case *callExpr:
		if n.fn == fnPow {
			return l.power(l.node(n.args[0]), l.node(n.args[1]), &n.pw)
		}
		op := funcTable(n.fn).op
		a := l.node(n.args[0])
		b := a
		if len(n.args) == 2 {
			b = l.node(n.args[1])
		}
		return l.emit(op, a, b)
	}
	panic(fmt.Sprintf("expr: unexpected node %T", n)) // unreachable: the parser builds only the nodes above
}

// power lowers a^b. An exactly integer constant exponent n with |n| ≤
// maxIntPow becomes multiplications (and one division when n < 0), recorded
// in pw so that Diagnose repeats them.
func (l *lowerer) power(a, b int32, pw *intPow) int32 {
	if l.isK[b] && l.kerr[b] == 0 {
		if v := l.kval[b]; v == math.Trunc(v) && math.Abs(v) <= maxIntPow {
			n := int(v)
			*pw = intPow{ok: true, n: n}
			return l.intPower(a, n)
		}
	}
	return l.emit(opPow, a, b)
}

// intPower emits x^n by binary powering (Knuth, TAOCP vol. 2, 4.6.3,
// right-to-left binary method); ipow below performs the same products.
func (l *lowerer) intPower(x int32, n int) int32 {
	if n == 0 {
		return l.constant(1, 0)
	}
	m := n
	if m < 0 {
		m = -m
	}
	res, base := int32(-1), x
	for m > 0 {
		if m&1 == 1 {
			if res < 0 {
				res = base
			} else {
				res = l.emit(opMul, res, base)
			}
		}
		m >>= 1
		if m > 0 {
			base = l.emit(opMul, base, base)
		}
	}
	if n < 0 {
		res = l.emit(opDiv, l.constant(1, 0), res)
	}
	return res
}

// ipow computes x^n with the same products, in the same order, as the
// instructions intPower emits, so results agree bit for bit.
func ipow(x float64, n int) float64 {
	if n == 0 {
		return 1
	}
	m := n
	if m < 0 {
		m = -m
	}
	res, have, base := 0.0, false, x
	for m > 0 {
		if m&1 == 1 {
			if !have {
				res, have = base, true
			} else {
				res = res * base
			}
		}
		m >>= 1
		if m > 0 {
			base = base * base
		}
	}
	if n < 0 {
		res = 1 / res
	}
	return res
}

// folder evaluates one instruction on constant operands at compile time with
// the same code the back ends run, so a folded constant equals what the
// instruction would have produced, and carries the Taylor back end's
// rounding-error bound.
type folder struct {
	regs [3]float64
	ts   taylorRegs
}

func (f *folder) eval(op opcode, a, ea, b, eb float64) (float64, float64) {
	if f.ts.r == nil {
		f.ts.r = make([]series, 3)
	}
	in := instr{op: op, a: 0, b: 1, dst: 2}
	f.regs = [3]float64{a, b, 0}
	run([]instr{in}, f.regs[:])
	f.ts.r[0] = series{}
	f.ts.r[1] = series{}
	f.ts.r[0].v[0], f.ts.r[0].e[0] = a, ea
	f.ts.r[1].v[0], f.ts.r[1].e[0] = b, eb
	f.ts.exec(&in, 0)
	return f.regs[2], f.ts.r[2].e[0]
}
