// Package nativeref holds the hand-written Go references that benchmarks
// and tests put beside holdfast's own code: what a practitioner would
// write without holdfast, against which its speed and results are judged.
package nativeref

import "math"

// Brent is Brent's zero-finder ("zeroin") for a bracket [a, b] with
// f(a)·f(b) < 0, given fa = f(a) and fb = f(b): inverse quadratic
// interpolation, secant and bisection, to the absolute tolerance tol
// (Brent 1973, Algorithms for Minimization without Derivatives, ch. 4). It
// returns the root and the number of evaluations of f it made.
func Brent(f func(float64) float64, a, b, fa, fb, tol float64) (float64, int) {
	evals := 0
	c, fc := a, fa
	d := b - a
	e := d
	for it := 0; it < 100; it++ {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol1 := 2*0x1p-52*math.Abs(b) + 0.5*tol
		xm := 0.5 * (c - b)
		if math.Abs(xm) <= tol1 || fb == 0 {
			return b, evals
		}
		if math.Abs(e) >= tol1 && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p = 2 * xm * s
				q = 1 - s
			} else {
				q = fa / fc
				r := fb / fc
				p = s * (2*xm*q*(q-r) - (b-a)*(r-1))
				q = (q - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if 2*p < math.Min(3*xm*q-math.Abs(tol1*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d = xm
				e = d
			}
		} else {
			d = xm
			e = d
		}
		a, fa = b, fb
		if math.Abs(d) > tol1 {
			b += d
		} else {
			b += math.Copysign(tol1, xm)
		}
		fb = f(b)
		evals++
	}
	return b, evals
}
