// Package expr compiles the right-hand side f of a one-variable rate law
// dx/dt = f(x; θ) from text and evaluates it, its Taylor coefficients in x
// with rounding-error bounds, and its parameter gradient.
//
// # Language
//
// An expression is built from decimal numbers (1, 0.5, .5, 1.5e-3), names
// (the state symbol, parameters, defines), the constants pi and e, the
// operators + - * / and ^ (power), parentheses, and the functions exp, log
// (natural), log10, sqrt, abs, sin, cos, tan, atan, sinh, cosh, tanh (one
// argument) and pow, min, max (two arguments). The grammar, in EBNF:
//
//	expr    = term { ("+" | "-") term } .
//	term    = unary { ("*" | "/") unary } .
//	unary   = ("+" | "-") unary | power .
//	power   = primary [ "^" unary ] .
//	primary = number | name | name "(" [ expr { "," expr } ] ")" | "(" expr ")" .
//
// So ^ is right-associative and binds tighter than a sign on its left:
// -x^2 is -(x^2), 2^3^2 is 2^9 = 512, 2^-1 is 2^(-1) = 0.5. Names are ASCII
// [A-Za-z_][A-Za-z0-9_]*; see Reserved for the names the language keeps.
// Each expression is at most MaxSourceLen bytes and nests at most MaxDepth
// levels (parentheses, calls, signs and exponents each count one).
//
// Compile returns an *Error for the first problem, with the byte offset and
// a rendering that puts a caret under it, in the manner of go/scanner and
// go/parser; unknown names come with a suggestion when one is close.
//
// # Compilation
//
// Each expression is parsed once to a syntax tree with names resolved to
// slots. The trees are lowered to one flat list of instructions on numbered
// registers in static single assignment form: register 0 holds x,
// registers 1..len(Params) the parameters, the others constants and
// results. The lowering folds constant subexpressions, shares identical
// subexpressions, evaluates each define once (only defines the rate uses),
// and turns a power with an exact integer constant exponent n, |n| ≤ 64,
// into multiplications by binary powering (and one division for n < 0).
//
// # Back ends
//
// All back ends run the same instruction list, so their values agree:
//
//   - Eval: float64 evaluation, IEEE 754 semantics, no allocation.
//   - Taylor: truncated Taylor arithmetic to order MaxOrder = 7 (Griewank &
//     Walther, Evaluating Derivatives, 2nd ed., SIAM 2008, ch. 13), with a
//     running error analysis (Wilkinson; Higham, Accuracy and Stability of
//     Numerical Algorithms, 2nd ed., 2002, §3.3) that bounds the rounding
//     error of each coefficient. Rounding errors of + − × ÷ are computed
//     exactly by error-free transformations; those of the library functions
//     use the accuracy of Go's math package. c[0] equals Eval bit for bit.
//     Orders 1 and 2 run unrolled rules, and the part of f that depends
//     on θ alone is kept between calls with the same θ.
//   - ParamGrad: ∂f/∂θ and ∂²f/∂x∂θ by forward-over-reverse algorithmic
//     differentiation, cost independent of the number of parameters.
//   - Diagnose: a checked re-evaluation of the syntax trees that names the
//     operation where a non-finite f arose.
//   - Interval and IntervalSlope: interval arithmetic with outward
//     rounding (Moore 1966), enclosing f, and with interval dual numbers
//     f', over a whole box of x (interval.go, intervaleval.go), with
//     monotone pieces for the functions, a monotonicity rule for
//     saturating terms k·u/(c + u) (with a closer form of their
//     derivative) and a record of whether f is continuous on the box;
//     package certify builds proofs on them.
//
// The function run is the single definition of the float semantics of each
// instruction (constant folding uses it too), and walk visits a syntax
// tree; a further back end adds one rule per opcode or one case per node,
// as the interval back end does.
//
// A Program is immutable and may be shared; each goroutine evaluates it
// through its own Machine.
package expr
