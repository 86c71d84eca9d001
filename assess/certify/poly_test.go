package certify

import (
	"cmp"
	"flag"
	"math"
	"math/big"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"holdfast/assess/steady"
)

// polyFromRoots returns the coefficients c[0..n] (ascending powers) of
// lead·Π(x − r_i)·Π(x² + p_j x + q_j), multiplied out in float64.
func polyFromRoots(lead float64, roots []float64, quads [][2]float64) []float64 {
	c := []float64{lead}
	mul := func(f []float64) { // c ← c·(f[0] + f[1]x + …)
		out := make([]float64, len(c)+len(f)-1)
		for i, a := range c {
			for j, b := range f {
				out[i+j] += a * b
			}
		}
		c = out
	}
	for _, r := range roots {
		mul([]float64{-r, 1})
	}
	for _, q := range quads {
		mul([]float64{q[1], q[0], 1})
	}
	return c
}

// polySource writes the polynomial with every coefficient as its exact
// float64 literal, so the compiled law is that polynomial exactly.
func polySource(c []float64) string {
	var b strings.Builder
	for k, a := range c {
		if k > 0 {
			b.WriteString(" + ")
		}
		b.WriteString("(" + strconv.FormatFloat(a, 'g', -1, 64) + ")")
		if k > 0 {
			b.WriteString("*x^" + strconv.Itoa(k))
		}
	}
	return b.String()
}

// companionRoots returns the eigenvalues of the companion matrix of the
// polynomial with coefficients c (gonum's mat.Eigen, a reference
// library): its roots.
func companionRoots(t *testing.T, c []float64) []complex128 {
	n := len(c) - 1
	a := mat.NewDense(n, n, nil)
	for i := 1; i < n; i++ {
		a.Set(i, i-1, 1)
	}
	for i := 0; i < n; i++ {
		a.Set(i, n-1, -c[i]/c[n])
	}
	var eig mat.Eigen
	if !eig.Factorize(a, mat.EigenNone) {
		t.Fatal("eigen decomposition failed")
	}
	return eig.Values(nil)
}

// polyScale multiplies the number of random polynomials
// (go test -run Polynomials -poly.scale 20).
var polyScale = flag.Int("poly.scale", 1, "multiply the random polynomials of the certification test")

// ratPoly is a polynomial with exact rational coefficients, ascending.
type ratPoly []*big.Rat

func ratFrom(c []float64) ratPoly {
	p := make(ratPoly, len(c))
	for i, a := range c {
		p[i] = new(big.Rat).SetFloat64(a)
	}
	return p.trim()
}

func (p ratPoly) trim() ratPoly {
	for len(p) > 0 && p[len(p)-1].Sign() == 0 {
		p = p[:len(p)-1]
	}
	return p
}

func (p ratPoly) deriv() ratPoly {
	d := make(ratPoly, max(len(p)-1, 0))
	for k := 1; k < len(p); k++ {
		d[k-1] = new(big.Rat).Mul(p[k], big.NewRat(int64(k), 1))
	}
	return d.trim()
}

// rem returns a mod b (b non-zero).
func (a ratPoly) rem(b ratPoly) ratPoly {
	r := make(ratPoly, len(a))
	for i := range a {
		r[i] = new(big.Rat).Set(a[i])
	}
	r = r.trim()
	lead := b[len(b)-1]
	for len(r) >= len(b) {
		q := new(big.Rat).Quo(r[len(r)-1], lead)
		shift := len(r) - len(b)
		for i := range b {
			r[shift+i].Sub(r[shift+i], new(big.Rat).Mul(q, b[i]))
		}
		r = r[:len(r)-1].trim() // the leading term cancels exactly
	}
	return r
}

func (p ratPoly) at(x *big.Rat) *big.Rat {
	s := new(big.Rat)
	for k := len(p) - 1; k >= 0; k-- {
		s.Mul(s, x)
		s.Add(s, p[k])
	}
	return s
}

// sturm returns the Sturm sequence p, p', −rem(p, p'), … (Sturm 1829):
// the number of distinct real roots in (a, b] is V(a) − V(b), V(x) the
// number of sign changes of the sequence at x.
func sturm(p ratPoly) []ratPoly {
	chain := []ratPoly{p, p.deriv()}
	for {
		n := len(chain)
		r := chain[n-2].rem(chain[n-1])
		if len(r) == 0 {
			return chain
		}
		for i := range r {
			r[i].Neg(r[i])
		}
		chain = append(chain, r)
	}
}

func signChanges(chain []ratPoly, x float64) int {
	xr := new(big.Rat).SetFloat64(x)
	n, last := 0, 0
	for _, q := range chain {
		s := q.at(xr).Sign()
		if s == 0 {
			continue
		}
		if last != 0 && s != last {
			n++
		}
		last = s
	}
	return n
}

// distinctRoots counts the distinct real roots in the open interval (a, b)
// exactly.
func distinctRoots(p ratPoly, chain []ratPoly, a, b float64) int {
	n := signChanges(chain, a) - signChanges(chain, b)
	if p.at(new(big.Rat).SetFloat64(b)).Sign() == 0 {
		n-- // (a, b] counts b
	}
	return n
}

// TestPolynomialsAgainstCompanionEigenvalues: random polynomials with
// chosen real roots (some in close pairs 1e-8 apart, some double) and
// complex pairs, multiplied out in float64, on [−2, 2]. Two references:
// Sturm sequences in exact rational arithmetic (math/big) count the
// distinct real roots of the float64 polynomial in any interval, and
// gonum's companion-matrix eigenvalues locate its roots. Checks: the parts
// of the domain the certification clears hold no root (Sturm: 0, so no
// root is missed); every certified enclosure holds exactly one (Sturm: 1)
// with the class given by the sign of p across it; each isolated real
// eigenvalue lies in a certified enclosure; unresolved intervals are
// narrow unless the box budget ran out. (Rounding the coefficients can
// turn a chosen double root into a complex pair or a close real pair;
// the exact references say which, and the scan's verdicts are only
// logged.)
func TestPolynomialsAgainstCompanionEigenvalues(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	const lo, hi = -2.0, 2.0
	n := 300 * *polyScale
	if testing.Short() {
		n = 60
	}
	var certified, pairsSplit, pairs, spurious, budgets int
	for trial := 0; trial < n; trial++ {
		// Degree at most 7: higher-degree monomial forms on [−2, 2] carry
		// coefficients in the hundreds, whose cancellation no naive
		// interval evaluation survives within the box budget.
		kind := rng.IntN(4) // 0: simple only, 1: close pair, 2: double root, 3: both
		var roots []float64
		for range 1 + rng.IntN(3-kind/3*2) {
			roots = append(roots, -1.8+3.6*rng.Float64())
		}
		if kind == 1 || kind == 3 {
			r := -1.5 + 3*rng.Float64()
			roots = append(roots, r, r+1e-8)
			pairs++
		}
		if kind >= 2 {
			r := -1.5 + 3*rng.Float64()
			roots = append(roots, r, r)
		}
		var quads [][2]float64
		if rng.IntN(2) == 0 { // x² + px + q with p² < 4q: no real roots
			p := -1 + 2*rng.Float64()
			quads = append(quads, [2]float64{p, p*p/4 + 0.1 + rng.Float64()})
		}
		c := polyFromRoots(0.5+rng.Float64(), roots, quads)
		src := polySource(c)
		l := newLaw(t, src, nil)
		rep, found := check(t, l, lo, hi)
		p := ratFrom(c)
		chain := sturm(p)

		// Covered intervals: certified enclosures and unresolved ones.
		type cover struct {
			lo, hi float64
			root   int
		}
		var cov []cover
		for i, r := range rep.Roots {
			cov = append(cov, cover{r.Lo, r.Hi, i})
		}
		for _, b := range rep.Unresolved {
			cov = append(cov, cover{b.Lo, b.Hi, -1})
		}
		slices.SortFunc(cov, func(a, b cover) int { return cmp.Compare(a.lo, b.lo) })
		at := lo
		for _, cv := range cov {
			if k := distinctRoots(p, chain, at, cv.lo); cv.lo > at && k != 0 {
				t.Errorf("%s: (%v, %v) was cleared but holds %d roots (Sturm)", src, at, cv.lo, k)
			}
			if cv.root >= 0 {
				a, b := math.Nextafter(cv.lo, lo), math.Nextafter(cv.hi, hi)
				if k := distinctRoots(p, chain, a, b); k != 1 {
					t.Errorf("%s: certified enclosure [%v, %v] holds %d roots (Sturm)", src, cv.lo, cv.hi, k)
				}
				// The class is the sign of p' on the enclosure, that is of
				// p(hi) − p(lo) across the root.
				fa := p.at(new(big.Rat).SetFloat64(a)).Sign()
				want := steady.Stable
				if fa < 0 {
					want = steady.Unstable
				}
				if got := rep.Roots[cv.root].Class; got != want {
					t.Errorf("%s: root in [%v, %v] class %v, want %v", src, cv.lo, cv.hi, got, want)
				}
			}
			at = math.Max(at, cv.hi)
		}
		if k := distinctRoots(p, chain, at, hi); at < hi && k != 0 {
			t.Errorf("%s: (%v, %v] was cleared but holds %d roots (Sturm)", src, at, hi, k)
		}

		// gonum: isolated real eigenvalues are certified (unless the box
		// budget ran out).
		eig := companionRoots(t, c)
		budget := slices.ContainsFunc(rep.Unresolved, func(b Box) bool { return b.Why&Budget != 0 })
		if budget {
			budgets++
		}
		for i, z := range eig {
			if budget {
				break
			}
			if imag(z) != 0 || real(z) < lo+1e-3 || real(z) > hi-1e-3 {
				continue
			}
			isolated := true
			for j, w := range eig {
				if j != i && cmplx.Abs(w-z) < 1e-2 {
					isolated = false
				}
			}
			if isolated && inRoot(rep, real(z), 1e-9) < 0 {
				t.Errorf("%s: isolated eigenvalue %v not certified: %+v %+v", src, real(z), rep.Roots, rep.Unresolved)
			}
		}
		for _, b := range rep.Unresolved {
			if b.Why&Budget == 0 && b.Width() > 1e-3 {
				t.Errorf("%s: unresolved interval [%v, %v] is wide", src, b.Lo, b.Hi)
			}
		}
		if rep.Status == Certified {
			certified++
			if kind == 1 {
				pairsSplit++
			}
		}
		for _, d := range rep.Disagreements {
			if d.Kind == NotARoot {
				spurious++
				t.Logf("%s: the scan reports an equilibrium at %v where there is none (scan %d)", src, d.X, len(found))
			}
		}
	}
	t.Logf("%d polynomials: %d certified; close pairs separated and certified: %d of %d; spurious scan roots: %d; box budget exhausted: %d",
		n, certified, pairsSplit, pairs, spurious, budgets)
	if budgets > n/20 {
		t.Errorf("the box budget ran out for %d of %d polynomials", budgets, n)
	}
}
