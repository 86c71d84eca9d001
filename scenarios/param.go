package scenarios

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"go.yaml.in/yaml/v3"

	"holdfast/sample"
)

// kindSpec describes the fields of one distribution kind.
type kindSpec struct {
	fields []string // the kind's own fields, in the order messages list them
	// truncates is set when min and max truncate the distribution; for the
	// kinds with bounded support they are its own bounds instead.
	truncates bool
	needs     string // how a message says what the kind needs
}

// kinds lists the distribution kinds a parameter may have.
var kinds = map[string]kindSpec{
	"normal":     {fields: []string{"mean", "sd", "min", "max"}, truncates: true, needs: "mean and sd"},
	"lognormal":  {fields: []string{"median", "gsd", "mean", "sd", "min", "max"}, truncates: true, needs: "median and gsd, or mean and sd"},
	"uniform":    {fields: []string{"min", "max"}, needs: "min and max"},
	"loguniform": {fields: []string{"min", "max"}, needs: "min and max"},
	"triangular": {fields: []string{"min", "mode", "max"}, needs: "min, mode and max"},
	"pert":       {fields: []string{"min", "mode", "max"}, needs: "min, mode and max"},
	"beta":       {fields: []string{"alpha", "beta", "min", "max"}, needs: "alpha and beta (and optionally min and max)"},
	"gamma":      {fields: []string{"shape", "scale", "rate", "min", "max"}, truncates: true, needs: "shape, and scale or rate"},
	"discrete":   {fields: []string{"values", "weights", "min", "max"}, truncates: true, needs: "values and weights"},
	"empirical":  {fields: []string{"samples", "file", "column", "min", "max"}, truncates: true, needs: "samples, or file and column"},
}

// kindNames lists the kinds in the order messages give them.
var kindNames = []string{"normal", "lognormal", "uniform", "loguniform", "triangular", "pert", "beta", "gamma", "discrete", "empirical"}

// Kinds returns the names of the distribution kinds a scenario may use.
func Kinds() []string { return append([]string(nil), kindNames...) }

var (
	fixedFields = []string{"value", "unit", "note", "nominal"}
	commonDist  = []string{"dist", "unit", "note", "nominal"}
	listFields  = []string{"values", "weights", "samples"}
	textFields  = []string{"dist", "unit", "note", "file", "column"}
	// allParamFields is every field any parameter may have.
	allParamFields = []string{"value", "dist", "unit", "note", "nominal",
		"mean", "sd", "median", "gsd", "min", "max", "mode", "alpha", "beta",
		"shape", "scale", "rate", "values", "weights", "samples", "file", "column"}
)

// spec holds the fields of one parameter while it is decoded.
type spec struct {
	p     *parser
	path  string
	node  *yaml.Node    // the spec mapping
	have  map[string]kv // fields present
	nums  map[string]float64
	lists map[string][]float64
	kind  string
}

func (b *spec) has(name string) bool { _, ok := b.have[name]; return ok }

// need reports each missing field and returns whether all are present.
func (b *spec) need(names ...string) bool {
	ok := true
	for _, n := range names {
		if !b.has(n) {
			b.p.errorf(b.node, b.path+"."+n, "missing; a %s distribution needs %s", b.kind, kinds[b.kind].needs)
			ok = false
		}
	}
	return ok
}

// either checks that exactly one of the forms a and b is used, where each
// form is a list of fields. It returns 0 for a, 1 for b, or -1 after
// reporting an error.
func (b *spec) either(a, c []string) int {
	first := func(form []string) *yaml.Node {
		var n *yaml.Node
		for _, f := range form {
			if g, ok := b.have[f]; ok && (n == nil || before(g.key, n)) {
				n = g.key
			}
		}
		return n
	}
	na, nc := first(a), first(c)
	switch {
	case na != nil && nc != nil:
		later := nc
		if before(nc, na) {
			later = na
		}
		b.p.errorf(later, b.path+"."+later.Value, "give %s or %s, not both forms", strings.Join(a, " and "), strings.Join(c, " and "))
		return -1
	case na != nil:
		return 0
	case nc != nil:
		return 1
	}
	b.p.errorf(b.node, b.path, "a %s distribution needs %s", b.kind, kinds[b.kind].needs)
	return -1
}

func before(x, y *yaml.Node) bool {
	return x.Line < y.Line || x.Line == y.Line && x.Column < y.Column
}

// num returns a numeric field, or def when absent.
func (b *spec) num(name string, def float64) float64 {
	if v, ok := b.nums[name]; ok {
		return v
	}
	return def
}

// param decodes one parameter spec.
func (p *parser) param(f kv, path string) (Param, bool) {
	par := Param{Name: f.name, Pos: p.at(f.key)}
	pairs, ok := p.mapping(f.val, path, " such as {value: 0.1} or {dist: normal, mean: 0.6, sd: 0.05}")
	if !ok {
		return par, false
	}
	b := &spec{p: p, path: path, node: f.val, have: map[string]kv{},
		nums: map[string]float64{}, lists: map[string][]float64{}}
	for _, g := range pairs {
		b.have[g.name] = g
	}
	ok = true
	if g, has := b.have["unit"]; has {
		par.Unit, ok = p.text(g.val, path+".unit")
	}
	if g, has := b.have["note"]; has {
		var good bool
		par.Note, good = p.text(g.val, path+".note")
		ok = ok && good
	}
	value, hasValue := b.have["value"]
	dist, hasDist := b.have["dist"]
	switch {
	case hasValue && hasDist:
		later := dist
		if before(dist.key, value.key) {
			later = value
		}
		p.errorf(later.key, path, "give either value (a fixed parameter) or dist (an uncertain one), not both")
		return par, false
	case hasValue:
		return p.fixedParam(par, b, pairs, value, ok)
	case !hasDist:
		p.errorf(f.val, path, "missing value or dist: give value: for a fixed parameter or dist: for an uncertain one")
		return par, false
	}

	kind, good := p.text(dist.val, path+".dist")
	if !good {
		return par, false
	}
	ks, known := kinds[kind]
	if !known {
		p.errorf(dist.val, path+".dist", "unknown distribution %s%s (known: %s)",
			quoteShort(kind), didYouMean(kind, kindNames), strings.Join(kindNames, ", "))
		return par, false
	}
	b.kind = kind
	par.Kind = kind
	allowed := append(append([]string(nil), commonDist...), ks.fields...)
	var nominal *kv
	for i, g := range pairs {
		fp := path + "." + g.name
		switch {
		case containsStr(commonDist, g.name) && g.name != "nominal":
			// dist, unit, note: done above
		case !containsStr(allowed, g.name):
			if containsStr(allParamFields, g.name) {
				p.errorf(g.key, fp, "not a field of a %s distribution (its fields: %s)", kind, strings.Join(ks.fields, ", "))
			} else {
				p.unknownField(g, path, allowed, "fields of a "+kind+" distribution")
			}
			ok = false
		case containsStr(listFields, g.name):
			v, good := p.numbers(g.val, fp)
			b.lists[g.name] = v
			ok = ok && good
		case containsStr(textFields, g.name):
			_, good := p.text(g.val, fp)
			ok = ok && good
		default:
			v, good := p.number(g.val, fp)
			if !good {
				ok = false
				continue
			}
			if g.name == "nominal" {
				nominal = &pairs[i]
				par.Nominal, par.NominalGiven = v, true
				continue
			}
			b.nums[g.name] = v
			par.Args = append(par.Args, Arg{Name: g.name, Value: v, Pos: p.at(g.val)})
		}
	}
	if !ok {
		return par, false
	}
	d, good := p.build(b, &par)
	if !good {
		return par, false
	}
	par.Dist = d
	lo, hi := d.Support()
	if nominal != nil {
		if !(par.Nominal >= lo && par.Nominal <= hi) {
			p.errorf(nominal.val, path+".nominal", "%s lies outside the support %s of %s",
				num(par.Nominal), interval(lo, hi), d)
			return par, false
		}
	} else {
		par.Nominal = d.Median()
		if math.IsNaN(par.Nominal) || math.IsInf(par.Nominal, 0) {
			p.errorf(f.val, path, "the median of %s is not finite; give nominal", d)
			return par, false
		}
	}
	return par, true
}

// fixedParam finishes a parameter given by value.
func (p *parser) fixedParam(par Param, b *spec, pairs []kv, value kv, ok bool) (Param, bool) {
	for _, g := range pairs {
		switch {
		case g.name == "nominal":
			// Allowed only when it repeats the value.
			v, good := p.number(g.val, b.path+".nominal")
			w, isNum := p.quietNumber(value.val)
			if good && isNum && v != w {
				p.errorf(g.val, b.path+".nominal", "a fixed parameter's nominal is its value (%s); remove nominal", num(w))
				good = false
			}
			ok = ok && good
		case containsStr(fixedFields, g.name):
		case containsStr(allParamFields, g.name):
			p.errorf(g.key, b.path+"."+g.name, "not a field of a fixed parameter (its fields: %s); for an uncertain one give dist instead of value",
				strings.Join(fixedFields, ", "))
			ok = false
		default:
			p.unknownField(g, b.path, fixedFields, "fields of a fixed parameter")
			ok = false
		}
	}
	v, good := p.number(value.val, b.path+".value")
	if !ok || !good {
		return par, false
	}
	par.Kind, par.Fixed, par.Value, par.Nominal = "fixed", true, v, v
	par.Args = []Arg{{Name: "value", Value: v, Pos: p.at(value.val)}}
	return par, true
}

// build constructs the distribution of a parameter with package sample
// and maps its argument errors to the fields of the file.
func (p *parser) build(b *spec, par *Param) (sample.Distribution, bool) {
	var (
		d   sample.Distribution
		err error
	)
	n := b.num
	switch b.kind {
	case "normal":
		if !b.need("mean", "sd") {
			return nil, false
		}
		d, err = sample.NewNormal(n("mean", 0), n("sd", 0))
	case "lognormal":
		switch b.either([]string{"median", "gsd"}, []string{"mean", "sd"}) {
		case 0:
			if !b.need("median", "gsd") {
				return nil, false
			}
			d, err = sample.NewLognormalMedian(n("median", 0), n("gsd", 0))
		case 1:
			if !b.need("mean", "sd") {
				return nil, false
			}
			d, err = sample.NewLognormalMean(n("mean", 0), n("sd", 0))
		default:
			return nil, false
		}
	case "uniform":
		if !b.need("min", "max") {
			return nil, false
		}
		d, err = sample.NewUniform(n("min", 0), n("max", 0))
	case "loguniform":
		if !b.need("min", "max") {
			return nil, false
		}
		d, err = sample.NewLogUniform(n("min", 0), n("max", 0))
	case "triangular":
		if !b.need("min", "mode", "max") {
			return nil, false
		}
		d, err = sample.NewTriangular(n("min", 0), n("mode", 0), n("max", 0))
	case "pert":
		if !b.need("min", "mode", "max") {
			return nil, false
		}
		d, err = sample.NewPERT(n("min", 0), n("mode", 0), n("max", 0))
	case "beta":
		if !b.need("alpha", "beta") {
			return nil, false
		}
		d, err = sample.NewBeta(n("alpha", 0), n("beta", 0), n("min", 0), n("max", 1))
	case "gamma":
		if !b.need("shape") {
			return nil, false
		}
		switch b.either([]string{"scale"}, []string{"rate"}) {
		case 0:
			d, err = sample.NewGammaScale(n("shape", 0), n("scale", 0))
		case 1:
			d, err = sample.NewGammaRate(n("shape", 0), n("rate", 0))
		default:
			return nil, false
		}
	case "discrete":
		if !b.need("values", "weights") {
			return nil, false
		}
		d, err = sample.NewDiscrete(b.lists["values"], b.lists["weights"])
	case "empirical":
		var samples []float64
		switch b.either([]string{"samples"}, []string{"file", "column"}) {
		case 0:
			samples = b.lists["samples"]
		case 1:
			if !b.need("file", "column") {
				return nil, false
			}
			var ok bool
			samples, ok = p.readColumn(b, par)
			if !ok {
				return nil, false
			}
		default:
			return nil, false
		}
		d, err = sample.NewEmpirical(samples)
	default:
		p.errorf(b.node, b.path, "distribution %q is not implemented", b.kind)
		return nil, false
	}
	if err == nil && kinds[b.kind].truncates && (b.has("min") || b.has("max")) {
		d, err = sample.Truncate(d, n("min", math.Inf(-1)), n("max", math.Inf(1)))
	}
	if err != nil {
		p.distError(b, err)
		return nil, false
	}
	return d, true
}

// distError reports an error from a sample constructor at the field it
// names: a *sample.ArgError's Arg is a field name ("sd"), an element of a
// list field ("values[2]"), or "truncate" for the min/max truncation.
func (p *parser) distError(b *spec, err error) {
	ae, ok := errAs[*sample.ArgError](err)
	if !ok {
		p.errorf(b.node, b.path, "%v", err)
		return
	}
	field, elem := ae.Arg, -1
	if i := strings.IndexByte(field, '['); i > 0 && strings.HasSuffix(field, "]") {
		if k, err := strconv.Atoi(field[i+1 : len(field)-1]); err == nil {
			field, elem = field[:i], k
		}
	}
	switch {
	case field == "truncate" && b.has("min"):
		field = "min"
	case field == "truncate":
		field = "max"
	case field == "samples" && !b.has("samples") && b.has("column"):
		field = "column"
	}
	node := b.node
	path := b.path
	if g, ok := b.have[field]; ok {
		node, path = g.val, b.path+"."+field
		if elem >= 0 && g.val.Kind == yaml.SequenceNode && elem < len(g.val.Content) {
			node, path = g.val.Content[elem], index(path, elem)
		}
	}
	p.errorf(node, path, "%s", ae.Msg)
}

// interval formats [lo, hi], with open ends at infinities.
func interval(lo, hi float64) string {
	l, r := "[", "]"
	if math.IsInf(lo, -1) {
		l = "("
	}
	if math.IsInf(hi, 1) {
		r = ")"
	}
	return fmt.Sprintf("%s%s, %s%s", l, num(lo), num(hi), r)
}
