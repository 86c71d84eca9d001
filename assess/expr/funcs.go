package expr

// funcID identifies a built-in function.
type funcID uint8

const (
	fnNone funcID = iota
	fnExp
	fnLog
	fnLog10
	fnSqrt
	fnAbs
	fnPow
	fnMin
	fnMax
	fnSin
	fnCos
	fnTan
	fnAtan
	fnSinh
	fnCosh
	fnTanh
	numFuncs
)

// funcInfo describes a built-in function: its name, number of arguments and
// the instruction it lowers to.
type funcInfo struct {
	name  string
	arity int
	op    opcode
}

// funcTable returns the description of f.
func funcTable(f funcID) funcInfo {
	switch f {
	case fnExp:
		return funcInfo{"exp", 1, opExp}
	case fnLog:
		return funcInfo{"log", 1, opLog}
	case fnLog10:
		return funcInfo{"log10", 1, opLog10}
	case fnSqrt:
		return funcInfo{"sqrt", 1, opSqrt}
	case fnAbs:
		return funcInfo{"abs", 1, opAbs}
	case fnPow:
		return funcInfo{"pow", 2, opPow}
	case fnMin:
		return funcInfo{"min", 2, opMin}
	case fnMax:
		return funcInfo{"max", 2, opMax}
	case fnSin:
		return funcInfo{"sin", 1, opSin}
	case fnCos:
		return funcInfo{"cos", 1, opCos}
	case fnTan:
		return funcInfo{"tan", 1, opTan}
	case fnAtan:
		return funcInfo{"atan", 1, opAtan}
	case fnSinh:
		return funcInfo{"sinh", 1, opSinh}
	case fnCosh:
		return funcInfo{"cosh", 1, opCosh}
	case fnTanh:
		return funcInfo{"tanh", 1, opTanh}
	}
	return funcInfo{}
}

// lookupFunc returns the built-in function called name, or fnNone.
func lookupFunc(name string) funcID {
	for f := fnNone + 1; f < numFuncs; f++ {
		if funcTable(f).name == name {
			return f
		}
	}
	return fnNone
}

// funcNames returns the names of all built-in functions in table order.
func funcNames() []string {
	names := make([]string, 0, numFuncs-1)
	for f := fnNone + 1; f < numFuncs; f++ {
		names = append(names, funcTable(f).name)
	}
	return names
}

// Constants of the language. Their values are the float64 nearest to π and e.
const (
	constPi = "pi"
	constE  = "e"
)

// Reserved reports whether name is a built-in function (exp, log, log10,
// sqrt, abs, pow, min, max, sin, cos, tan, atan, sinh, cosh, tanh) or a
// built-in constant (pi, e) of the rate-law language. The state symbol,
// parameters and defines may not use these names.
func Reserved(name string) bool {
	return name == constPi || name == constE || lookupFunc(name) != fnNone
}

// validName reports whether name has the form [A-Za-z_][A-Za-z0-9_]*, the
// identifiers the scanner accepts.
func validName(name string) bool {
	if name == "" || !isLetter(name[0]) {
		return false
	}
	for i := 1; i < len(name); i++ {
		if !isLetter(name[i]) && !isDigit(name[i]) {
			return false
		}
	}
	return true
}
