package certify

import (
	"math"
	"math/rand/v2"
	"testing"

	"holdfast/assess/steady"
	"holdfast/sample"
)

// sameProof checks that two reports of the same law prove the same: the
// same status, the same roots with the same classes (enclosures that
// overlap: each holds the one root), the same number of unresolved
// intervals.
func sameProof(t *testing.T, what string, a, b *Report) {
	t.Helper()
	if a.Status != b.Status || len(a.Roots) != len(b.Roots) || len(a.Unresolved) != len(b.Unresolved) {
		t.Fatalf("%s: %v with roots %+v, unresolved %+v; want %v with %+v, %+v", what, b.Status, b.Roots, b.Unresolved, a.Status, a.Roots, a.Unresolved)
	}
	for i := range a.Roots {
		x, y := a.Roots[i], b.Roots[i]
		if x.Class != y.Class || x.Hi < y.Lo || y.Hi < x.Lo {
			t.Fatalf("%s: root %d %+v, want %+v", what, i, y, x)
		}
	}
}

// positions returns guesses to give CertifyNear: the scan's equilibria,
// and versions that are wrong in every way (random places, values that
// are not finite or outside the domain, repeats, one missing).
func positions(rng *rand.Rand, eqs []steady.Equilibrium, lo, hi float64) map[string][]float64 {
	scan := make([]float64, len(eqs))
	for i, e := range eqs {
		scan[i] = e.X
	}
	random := make([]float64, 1+rng.IntN(6))
	for i := range random {
		random[i] = lo + (hi-lo)*rng.Float64()
	}
	junk := append([]float64{math.NaN(), math.Inf(1), math.Inf(-1), lo - 1, hi + 1, lo, hi}, scan...)
	junk = append(junk, scan...)
	out := map[string][]float64{"scan": scan, "random": random, "junk": junk, "none": nil}
	if len(scan) > 1 {
		out["one missing"] = scan[1:]
	}
	return out
}

// The positions steer only the bisection: with the scan's equilibria,
// with random or invalid positions, CertifyNear proves what Certify
// proves (design of the method: every box is still discarded or
// certified by the interval tests alone). Checked on the laws with
// analytic roots of TestSimpleRootsCertified and on random draws of the
// demo scenarios (illustrative numbers).
func TestCertifyNearProvesTheSame(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	laws := []struct {
		src    string
		params []string
		theta  []float64
		lo, hi float64
		roots  []float64 // analytic, or nil
	}{
		// Verhulst: 0 and K.
		{"r*x*(1 - x/K)", []string{"r", "K"}, []float64{0.8, 3}, 0, 5, []float64{0, 3}},
		// Allee effect: 0, A and K.
		{"r*x*(x/A - 1)*(1 - x/K)", []string{"r", "A", "K"}, []float64{1, 2, 10}, 0, 12, []float64{0, 2, 10}},
		// Schaefer (1954) near the fold: K/2·(1 ± sqrt(1 − 4H/(rK))).
		{"r*x*(1 - x/K) - H", []string{"r", "K", "H"}, []float64{1, 1, 0.2499}, 0, 1.2,
			[]float64{0.5 * (1 - math.Sqrt(1-4*0.2499)), 0.5 * (1 + math.Sqrt(1-4*0.2499))}},
		// Strogatz ch. 2: x² at 0 is a double root, left unresolved.
		{"x^2*(r - a*x)", []string{"r", "a"}, []float64{1, 1}, -1, 2.3, nil},
	}
	ch, _ := NewChecker(Options{})
	near, _ := NewChecker(Options{})
	for _, lw := range laws {
		l := newLaw(t, lw.src, lw.params, lw.theta...)
		res, err := steady.Find(l, lw.lo, lw.hi, steady.DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		want, _ := ch.Certify(l.cert(), lw.lo, lw.hi)
		for name, pos := range positions(rng, res.Equilibria, lw.lo, lw.hi) {
			got, err := near.CertifyNear(l.cert(), lw.lo, lw.hi, pos)
			if err != nil {
				t.Fatal(err)
			}
			sameProof(t, lw.src+" near "+name, want, got)
			for i, x := range lw.roots {
				if r := got.Roots[i]; !(x >= r.Lo-1e-15 && x <= r.Hi+1e-15) {
					t.Errorf("%s near %s: analytic root %v not in [%v, %v]", lw.src, name, x, r.Lo, r.Hi)
				}
			}
		}
	}
	for _, demo := range []string{"lake", "reactor", "fishery", "tank"} {
		m := demoModel(t, demo)
		d, err := m.Design(sample.Random, 200, 3)
		if err != nil {
			t.Fatal(err)
		}
		theta := make([]float64, len(m.Names))
		f := Bind(m.Program.NewMachine(), theta)
		lo, hi := m.Domain[0], m.Domain[1]
		for i := range 200 {
			d.Draw(i, theta)
			res, err := steady.Find(m.Func(theta), lo, hi, steady.DefaultOptions())
			if err != nil {
				t.Fatal(err)
			}
			want, _ := ch.Certify(f, lo, hi)
			for name, pos := range positions(rng, res.Equilibria, lo, hi) {
				got, _ := near.CertifyNear(f, lo, hi, pos)
				sameProof(t, demo+" near "+name, want, got)
			}
		}
	}
}

// What the positions are for: on the lake demo (illustrative numbers)
// the scan's equilibria save interval evaluations. (A count of
// evaluations, which depends only on the draws; the time is measured by
// BenchmarkCertify and BenchmarkCertifiedMonteCarlo.)
func TestCertifyNearSavesEvaluations(t *testing.T) {
	m := demoModel(t, "lake")
	d, err := m.Design(sample.Random, 300, 1)
	if err != nil {
		t.Fatal(err)
	}
	theta := make([]float64, len(m.Names))
	f := Bind(m.Program.NewMachine(), theta)
	lo, hi := m.Domain[0], m.Domain[1]
	ch, _ := NewChecker(Options{RootWidth: math.Inf(1)})
	var plain, near int
	var pos []float64
	for i := range 300 {
		d.Draw(i, theta)
		res, err := steady.Find(m.Func(theta), lo, hi, steady.DefaultOptions())
		if err != nil {
			t.Fatal(err)
		}
		rep, _ := ch.Certify(f, lo, hi)
		plain += rep.Evals
		pos = pos[:0]
		for _, e := range res.Equilibria {
			pos = append(pos, e.X)
		}
		rep, _ = ch.CertifyNear(f, lo, hi, pos)
		near += rep.Evals
	}
	t.Logf("evaluations per draw: %.2f without positions, %.2f with", float64(plain)/300, float64(near)/300)
	if near >= plain {
		t.Errorf("%d evaluations with the scan's positions, %d without", near, plain)
	}
}
