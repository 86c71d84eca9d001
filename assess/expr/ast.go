package expr

// The syntax tree. Every node records the byte offset of the token that
// names its operation (the operator, the function name, the literal), which
// is where errors and faults point. Names are resolved while parsing, so a
// tree that the parser returns without error is well formed: every name is
// bound and every call has the right number of arguments.

// node is a syntax-tree node.
type node interface {
	pos() int
}

// numLit is a decimal literal.
type numLit struct {
	off int
	lit string
	val float64 // nearest float64 to lit
	err float64 // bound on |val - lit|, 0 when lit is a float64
}

// constRef is a use of a built-in constant (pi, e).
type constRef struct {
	off  int
	name string
	val  float64
	err  float64 // bound on |val - exact constant|
}

// symKind says what a name refers to.
type symKind uint8

const (
	symState symKind = iota
	symParam
	symDefine
)

// varRef is a use of the state, a parameter or a define.
type varRef struct {
	off   int
	name  string
	kind  symKind
	index int // parameter slot or define index
}

// unaryExpr is -x. (Unary plus is dropped by the parser.)
type unaryExpr struct {
	off int
	x   node
}

// binaryExpr is x op y with op one of + - * / ^.
type binaryExpr struct {
	off  int
	op   byte
	x, y node
	pw   intPow // for ^: set when lowered to multiplications
}

// callExpr is f(args...).
type callExpr struct {
	off  int
	fn   funcID
	args []node
	pw   intPow // for pow: set when lowered to multiplications
}

// intPow records that the lowering turned a power with a constant integer
// exponent n into multiplications, so that the checked evaluator in
// Diagnose repeats the same operations.
type intPow struct {
	ok bool
	n  int
}

func (n *numLit) pos() int     { return n.off }
func (n *constRef) pos() int   { return n.off }
func (n *varRef) pos() int     { return n.off }
func (n *unaryExpr) pos() int  { return n.off }
func (n *binaryExpr) pos() int { return n.off }
func (n *callExpr) pos() int   { return n.off }

// walk calls visit for n and then, if visit returns true, for each child of
// n in evaluation order (left to right), like go/ast.Inspect.
func walk(n node, visit func(node) bool) {
	if n == nil || !visit(n) {
		return
	}
	switch n := n.(type) {
	case *unaryExpr:
		walk(n.x, visit)
	case *binaryExpr:
		walk(n.x, visit)
		walk(n.y, visit)
	case *callExpr:
		for _, a := range n.args {
			walk(a, visit)
		}
	}
}

// powOperands returns base and exponent of a power node (x^y or pow(x, y)),
// and false for any other node.
func powOperands(n node) (base, exp node, ok bool) {
	switch n := n.(type) {
	case *binaryExpr:
		if n.op == '^' {
			return n.x, n.y, true
		}
	case *callExpr:
		if n.fn == fnPow {
			return n.args[0], n.args[1], true
		}
	}
	return nil, nil, false
}
