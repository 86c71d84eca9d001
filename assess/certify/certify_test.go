package certify

import (
	"errors"
	"math"
	"strings"
	"testing"

	"holdfast/assess/expr"
	"holdfast/assess/steady"
)

// law is a rate law compiled from text with its parameters bound: a
// steady.Func for the scan and, through Bind, a Func for certification.
type law struct {
	m     *expr.Machine
	theta []float64
	src   string
}

func newLaw(t testing.TB, src string, params []string, theta ...float64) *law {
	t.Helper()
	p, err := expr.Compile(src, expr.Env{State: "x", Params: params})
	if err != nil {
		t.Fatalf("%s: %v", src, err)
	}
	return &law{m: p.NewMachine(), theta: theta, src: src}
}

func (l *law) Eval(x float64) float64           { return l.m.Eval(x, l.theta) }
func (l *law) Taylor(x float64, c, e []float64) { l.m.Taylor(x, l.theta, c, e) }
func (l *law) cert() Func                       { return Bind(l.m, l.theta) }

// check runs the scan and the certification with the comparison.
func check(t *testing.T, l *law, lo, hi float64) (*Report, []steady.Equilibrium) {
	t.Helper()
	res, err := steady.Find(l, lo, hi, steady.DefaultOptions())
	if err != nil {
		t.Fatalf("%s: %v", l.src, err)
	}
	rep, err := Check(l.cert(), lo, hi, res.Equilibria, Options{})
	if err != nil {
		t.Fatalf("%s: %v", l.src, err)
	}
	return rep, res.Equilibria
}

// inRoot reports whether x lies in one of the certified enclosures,
// widened by tol.
func inRoot(rep *Report, x, tol float64) int {
	for i, r := range rep.Roots {
		if x >= r.Lo-tol && x <= r.Hi+tol {
			return i
		}
	}
	return -1
}

func inBox(rep *Report, x, tol float64) int {
	for i, b := range rep.Unresolved {
		if x >= b.Lo-tol && x <= b.Hi+tol {
			return i
		}
	}
	return -1
}

func TestSimpleRootsCertified(t *testing.T) {
	cases := []struct {
		name, src string
		params    []string
		theta     []float64
		lo, hi    float64
		roots     []float64 // analytic
		classes   []steady.Class
		source    string
	}{
		{"logistic", "r*x*(1 - x/K)", []string{"r", "K"}, []float64{0.8, 3}, 0, 5,
			[]float64{0, 3}, []steady.Class{steady.Unstable, steady.Stable},
			"Verhulst: x* = 0 repelling (f' = r), x* = K attracting (f' = −r); the root at the domain end is exact"},
		{"allee", "r*x*(x/A - 1)*(1 - x/K)", []string{"r", "A", "K"}, []float64{1, 2, 10}, 0, 12,
			[]float64{0, 2, 10}, []steady.Class{steady.Stable, steady.Unstable, steady.Stable},
			"Allee effect: 0 attracting, A repelling, K attracting"},
		{"harvest near fold", "r*x*(1 - x/K) - H", []string{"r", "K", "H"}, []float64{1, 1, 0.2499}, 0, 1.2,
			[]float64{0.5 * (1 - math.Sqrt(1-4*0.2499)), 0.5 * (1 + math.Sqrt(1-4*0.2499))},
			[]steady.Class{steady.Unstable, steady.Stable},
			"Schaefer (1954): x* = K/2(1 ± sqrt(1 − 4H/(rK))), lower repelling, upper attracting; 0.02 apart near the fold H = rK/4"},
		{"semenov below", "d*exp(x) - x", []string{"d"}, []float64{1/math.E - 1e-6}, 0, 5,
			nil, []steady.Class{steady.Stable, steady.Unstable},
			"Semenov (1928): δ < 1/e, lower attracting, upper repelling; δ = 1/e − 1e-6 puts them ≈ 2.3e-3 from θ = 1"},
		{"no root", "1 + x^2", nil, nil, -3, 3, nil, nil, "x² + 1 > 0"},
		{"lake", "a - b*x + x^2/(1 + x^2)", []string{"a", "b"}, []float64{0.05, 0.52}, 0, 4,
			nil, []steady.Class{steady.Stable, steady.Unstable, steady.Stable},
			"Carpenter, Ludwig & Brock (1999): three equilibria inside the window below the cusp b = 3√3/8"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			l := newLaw(t, c.src, c.params, c.theta...)
			rep, found := check(t, l, c.lo, c.hi)
			// Source: c.source.
			if rep.Status != Certified {
				t.Fatalf("%s: status %v, unresolved %+v", c.source, rep.Status, rep.Unresolved)
			}
			if len(rep.Roots) != len(c.classes) {
				t.Fatalf("%s: %d certified roots %+v, want %d", c.source, len(rep.Roots), rep.Roots, len(c.classes))
			}
			for i, r := range rep.Roots {
				if r.Class != c.classes[i] {
					t.Errorf("%s: root %d class %v, want %v", c.source, i, r.Class, c.classes[i])
				}
				if r.Hi-r.Lo > 1e-9*(c.hi-c.lo) {
					t.Errorf("root %d enclosure [%v, %v] not narrowed", i, r.Lo, r.Hi)
				}
				if c.roots != nil && !(c.roots[i] >= r.Lo-1e-15 && c.roots[i] <= r.Hi+1e-15) {
					t.Errorf("%s: analytic root %v not in [%v, %v]", c.source, c.roots[i], r.Lo, r.Hi)
				}
			}
			if len(rep.Disagreements) != 0 {
				t.Errorf("disagreements %+v with scan %+v", rep.Disagreements, found)
			}
			if !rep.Agrees(patternOf(found)) {
				t.Errorf("Agrees false for the scan's pattern")
			}
		})
	}
}

func patternOf(eqs []steady.Equilibrium) []steady.Class {
	p := make([]steady.Class, len(eqs))
	for i, e := range eqs {
		p[i] = e.Class
	}
	return p
}

func TestSemenovAtCriticalPoint(t *testing.T) {
	// Semenov (1928); Frank-Kamenetskii (1969): θ' = δe^θ − θ at δ = 1/e
	// has one equilibrium θ = 1 where f and f' vanish (f(1) = δe − 1 = 0,
	// f'(1) = δe − 1 = 0, f''(1) = δe = 1 > 0: attracting from below only).
	// In floating point δ = fl(1/e) leaves f within rounding of zero near
	// θ = 1, which no enclosure can resolve: the certification must come
	// back unresolved with θ = 1 located in a small interval, never missed.
	l := newLaw(t, "d*exp(x) - x", []string{"d"}, 1/math.E)
	rep, found := check(t, l, 0, 5)
	if rep.Status != Unresolved {
		t.Fatalf("status %v, want unresolved; roots %+v", rep.Status, rep.Roots)
	}
	if len(rep.Roots) != 0 || len(rep.Unresolved) != 1 {
		t.Fatalf("roots %+v, unresolved %+v; want one unresolved interval only", rep.Roots, rep.Unresolved)
	}
	b := rep.Unresolved[0]
	if !(b.Lo <= 1 && 1 <= b.Hi) || b.Width() > 1e-6 {
		t.Errorf("unresolved interval [%v, %v] should hold θ = 1 and be narrow", b.Lo, b.Hi)
	}
	if b.Why&Multiple == 0 {
		t.Errorf("reason %v, want a multiple root", b.Why)
	}
	// The scan's touching root is matched to the interval, with its
	// (uncertified) classification: semistable, attracting from below.
	if b.ScanHi-b.ScanLo != 1 {
		t.Fatalf("scan equilibria %d..%d in the interval, want one (scan %+v)", b.ScanLo, b.ScanHi, found)
	}
	if e := found[b.ScanLo]; e.Class != steady.Semistable || e.AttractsFrom != steady.Below {
		t.Errorf("scan verdict %v from %v, want semistable from below", e.Class, e.AttractsFrom)
	}
	if len(rep.Disagreements) != 0 {
		t.Errorf("disagreements %+v", rep.Disagreements)
	}
}

func TestNormalForms(t *testing.T) {
	// Strogatz, Nonlinear Dynamics and Chaos, ch. 2–3: at x = 0 the linear
	// term vanishes, so no interval method can certify the root; it must
	// be located in a small unresolved interval, the scan's higher-order
	// verdict kept, and the Dormand–Prince cross-check must confirm the
	// sides from which 0 is approached.
	cases := []struct {
		src          string
		class        steady.Class
		from         steady.Side
		below, above Approach
		source       string
	}{
		{"-x^3", steady.Stable, steady.None, Approached, Approached, "x' = −x³ attracting, third order"},
		{"x^3", steady.Unstable, steady.None, Repelled, Repelled, "x' = x³ repelling"},
		{"x^2", steady.Semistable, steady.Below, Approached, Repelled, "x' = x² attracting from below only"},
		{"r*x - x^3", steady.Stable, steady.None, Approached, Approached, "x' = rx − x³ at r = 0 (pitchfork): attracting, third order"},
	}
	for _, c := range cases {
		t.Run(c.src, func(t *testing.T) {
			l := newLaw(t, c.src, []string{"r"}, 0)
			lo, hi := -1.0, 1.3 // 0 is not a bisection point
			rep, found := check(t, l, lo, hi)
			if rep.Status != Unresolved || len(rep.Roots) != 0 || len(rep.Unresolved) != 1 {
				t.Fatalf("%s: status %v, roots %+v, unresolved %+v", c.source, rep.Status, rep.Roots, rep.Unresolved)
			}
			b := rep.Unresolved[0]
			if !(b.Lo <= 0 && 0 <= b.Hi) || b.Width() > 1e-3 {
				t.Errorf("%s: unresolved [%v, %v]", c.source, b.Lo, b.Hi)
			}
			if len(found) != 1 || b.ScanHi-b.ScanLo != 1 {
				t.Fatalf("%s: scan %+v, matched %d..%d", c.source, found, b.ScanLo, b.ScanHi)
			}
			e := found[0]
			if e.Class != c.class || e.AttractsFrom != c.from {
				t.Errorf("%s: scan verdict %v %v", c.source, e.Class, e.AttractsFrom)
			}
			sd := CheckSides(l, found, 0, lo, hi, SimOptions{})
			if sd.Below != c.below || sd.Above != c.above || !sd.Agree {
				t.Errorf("%s: simulation below %v above %v agree %v", c.source, sd.Below, sd.Above, sd.Agree)
			}
			// A wrong verdict is contradicted.
			wrong := append([]steady.Equilibrium(nil), found...)
			if c.class == steady.Unstable {
				wrong[0].Class = steady.Stable
			} else {
				wrong[0].Class, wrong[0].AttractsFrom = steady.Unstable, steady.None
			}
			if sd := CheckSides(l, wrong, 0, lo, hi, SimOptions{}); sd.Agree {
				t.Errorf("%s: the simulation did not contradict the verdict %v", c.source, wrong[0].Class)
			}
		})
	}
}

func TestScanMissIsReported(t *testing.T) {
	// A Gaussian bump of width 0.002 on [0, 1] leaves no trace at the
	// scan's 13 grid points (steady's documented limit: features narrower
	// than about a third of a cell), so the scan finds no root, while
	// −1/2 + exp(−((x − c)/w)²) = 0 at x = c ± w·sqrt(ln 2) (analytic).
	const c, w = 0.37, 0.002
	l := newLaw(t, "-0.5 + exp(-((x - c)/w)^2)", []string{"c", "w"}, c, w)
	rep, found := check(t, l, 0, 1)
	if rep.Status != Certified || len(rep.Roots) != 2 {
		t.Fatalf("status %v roots %+v", rep.Status, rep.Roots)
	}
	for i, want := range []float64{c - w*math.Sqrt(math.Ln2), c + w*math.Sqrt(math.Ln2)} {
		if inRoot(rep, want, 1e-12) != i {
			t.Errorf("analytic root %v not in enclosure %d: %+v", want, i, rep.Roots)
		}
	}
	if len(found) != 0 {
		t.Skipf("the scan found the bump (%d equilibria); nothing to report", len(found))
	}
	if len(rep.Disagreements) != 2 {
		t.Fatalf("disagreements %+v, want two missed roots", rep.Disagreements)
	}
	for _, d := range rep.Disagreements {
		if d.Kind != MissedByScan {
			t.Errorf("kind %v, want %v", d.Kind, MissedByScan)
		}
	}
}

func TestCompareFlagsWrongScan(t *testing.T) {
	// Logistic growth (Verhulst), roots 0 and K = 3: a fabricated scan
	// with a spurious equilibrium, a wrong class and a duplicate.
	l := newLaw(t, "r*x*(1 - x/K)", []string{"r", "K"}, 0.8, 3)
	ch, err := NewChecker(Options{})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := ch.Certify(l.cert(), -1, 5); err != nil {
		t.Fatal(err)
	}
	fake := []steady.Equilibrium{
		{X: 0, Class: steady.Stable, Span: [2]float64{0, 0}},         // wrong class (f'(0) = r > 0)
		{X: 1.5, Class: steady.Stable, Span: [2]float64{1.5, 1.5}},   // not a root: f(1.5) = 0.6
		{X: 3, Class: steady.Stable, Span: [2]float64{3, 3}},         // right
		{X: 3 + 1e-12, Class: steady.Stable, Span: [2]float64{3, 3}}, // the same root again
	}
	rep := ch.Compare(fake)
	want := map[Kind]int{ClassDiffers: 1, NotARoot: 1, Duplicate: 1}
	got := map[Kind]int{}
	for _, d := range rep.Disagreements {
		got[d.Kind]++
	}
	for k, n := range want {
		if got[k] != n {
			t.Errorf("%v: %d disagreements, want %d (all: %+v)", k, got[k], n, rep.Disagreements)
		}
	}
	// Without the root at K the scan missed one.
	rep = ch.Compare(fake[:1])
	if len(rep.Disagreements) != 2 || rep.Disagreements[1].Kind != MissedByScan {
		t.Errorf("disagreements %+v, want class and missed root", rep.Disagreements)
	}
}

func TestUndefinedAndPoles(t *testing.T) {
	cases := []struct {
		src    string
		lo, hi float64
		roots  []float64
		source string
	}{
		// log(x) − 1 = 0 at x = e; log undefined at and below 0.
		{"log(x) - 1", -1, 5, []float64{math.E}, "log x = 1 ⇔ x = e"},
		// sqrt(x) − 0.5 at x = 1/4; sqrt undefined below 0.
		{"sqrt(x) - 0.5", -2, 3, []float64{0.25}, "sqrt x = 1/2 ⇔ x = 1/4"},
		// A pole at 1: the interval holding it stays unresolved (singular).
		{"1/(x - 1) + 2", -3, 4, []float64{0.5}, "1/(x − 1) = −2 ⇔ x = 1/2; pole at 1"},
	}
	for _, c := range cases {
		l := newLaw(t, c.src, nil)
		rep, _ := check(t, l, c.lo, c.hi)
		// Source: c.source.
		if len(rep.Roots) != len(c.roots) {
			t.Errorf("%s: roots %+v, want %v", c.src, rep.Roots, c.roots)
			continue
		}
		for i, x := range c.roots {
			if inRoot(rep, x, 1e-12) != i {
				t.Errorf("%s (%s): %v not certified: %+v", c.src, c.source, x, rep.Roots)
			}
		}
		for _, b := range rep.Unresolved {
			if b.Why&Singular == 0 || b.Width() > 1e-6*(c.hi-c.lo) {
				t.Errorf("%s: unresolved %+v should be a narrow singular interval", c.src, b)
			}
		}
	}
}

func TestOptionsAndDomain(t *testing.T) {
	for _, o := range []Options{{MinWidth: -1}, {MinWidth: 2}, {RootWidth: -1}, {MaxBoxes: -3}, {MatchTol: 5}} {
		if _, err := NewChecker(o); err == nil {
			t.Errorf("%+v accepted", o)
		}
	}
	l := newLaw(t, "x", nil)
	for _, d := range [][2]float64{{1, 1}, {2, 1}, {math.Inf(-1), 0}, {0, math.NaN()}} {
		if _, err := Check(l.cert(), d[0], d[1], nil, Options{}); !errors.Is(err, ErrDomain) {
			t.Errorf("domain %v: err %v", d, err)
		}
	}
	// A budget too small to finish leaves the rest unresolved, never
	// cleared.
	l = newLaw(t, "sin(20*x)", nil)
	rep, err := Check(l.cert(), 0, 10, nil, Options{MaxBoxes: 10})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Status != Unresolved || rep.Unresolved[len(rep.Unresolved)-1].Why&Budget == 0 {
		t.Errorf("budget: %+v", rep.Unresolved)
	}
	// sin(20x) has roots kπ/20, k = 0..63, on [0, 10].
	rep, _ = Check(l.cert(), 0, 10, nil, Options{})
	if rep.Status != Certified || len(rep.Roots) != 64 {
		t.Errorf("sin(20x): %v with %d roots, want 64 (kπ/20)", rep.Status, len(rep.Roots))
	}
	for k := range 64 {
		if inRoot(rep, float64(k)*math.Pi/20, 1e-12) < 0 {
			t.Errorf("sin(20x): kπ/20 for k = %d not certified", k)
		}
	}
}

func TestDnUp(t *testing.T) {
	for _, x := range []float64{1, -1, 0x1p-1074, -0x1p-1074, 0, math.MaxFloat64, -math.MaxFloat64, 3.7e-310, math.Pi} {
		if got, want := dn(x), math.Nextafter(x, math.Inf(-1)); got != want {
			t.Errorf("dn(%v) = %v, math.Nextafter %v", x, got, want)
		}
		if got, want := up(x), math.Nextafter(x, math.Inf(1)); got != want {
			t.Errorf("up(%v) = %v, math.Nextafter %v", x, got, want)
		}
	}
	if dn(math.Inf(1)) != math.MaxFloat64 || up(math.Inf(-1)) != -math.MaxFloat64 || !math.IsInf(dn(math.Inf(-1)), -1) {
		t.Error("infinities")
	}
}

func TestContinuum(t *testing.T) {
	// f = min(0, x − 1) + max(0, x − 2) vanishes exactly on [1, 2] (a
	// continuum of equilibria) and nowhere else: the certification leaves
	// one unresolved interval around [1, 2] holding the scan's degenerate
	// equilibrium, within a small budget.
	l := newLaw(t, "min(0, x - 1) + max(0, x - 2)", nil)
	rep, found := check(t, l, 0, 3.3)
	if len(found) != 1 || found[0].Class != steady.Degenerate {
		t.Fatalf("scan %+v", found)
	}
	if rep.Status != Unresolved || len(rep.Roots) != 0 || len(rep.Unresolved) != 1 {
		t.Fatalf("roots %+v unresolved %+v", rep.Roots, rep.Unresolved)
	}
	b := rep.Unresolved[0]
	if !(b.Lo <= 1 && b.Hi >= 2 && b.Lo > 0.99 && b.Hi < 2.01) || b.ScanHi-b.ScanLo != 1 || len(rep.Disagreements) != 0 {
		t.Errorf("unresolved %+v, disagreements %+v", b, rep.Disagreements)
	}
	if rep.Boxes > 2000 {
		t.Errorf("%d boxes for a continuum", rep.Boxes)
	}
	for _, s := range []string{Certified.String(), Unresolved.String(), (Multiple | Edge).String(), MissedByScan.String(), Approached.String()} {
		if s == "" || strings.Contains(s, "(") {
			t.Errorf("name %q", s)
		}
	}
}
