package steady

import "math"

// Hand-written rate laws for the tests: a small truncated Taylor ("jet")
// arithmetic with running rounding-error bounds, in the manner of a compiled
// Taylor back end, and a polynomial whose Taylor coefficients come from
// repeated Horner shifts (synthetic division).

const unit = 0x1p-53 // unit roundoff u

// gamma is Higham's γ_m = m u / (1 − m u).
func gamma(m int) float64 { return float64(m) * unit / (1 - float64(m)*unit) }

// jet holds c[k] = f^(k)/k!, k < n, with error bounds e[k].
type jet struct {
	n    int
	v, e [MaxTaylor]float64
}

func jvar(n int, x float64) jet {
	j := jet{n: n}
	j.v[0] = x
	if n > 1 {
		j.v[1] = 1
	}
	return j
}

func jconst(n int, a float64) jet {
	j := jet{n: n}
	j.v[0] = a
	return j
}

func (a jet) add(b jet) jet {
	r := jet{n: a.n}
	for k := 0; k < a.n; k++ {
		r.v[k] = a.v[k] + b.v[k]
		r.e[k] = a.e[k] + b.e[k] + unit*math.Abs(r.v[k])
	}
	return r
}

func (a jet) sub(b jet) jet {
	r := jet{n: a.n}
	for k := 0; k < a.n; k++ {
		r.v[k] = a.v[k] - b.v[k]
		r.e[k] = a.e[k] + b.e[k] + unit*math.Abs(r.v[k])
	}
	return r
}

// addc adds the exact constant s.
func (a jet) addc(s float64) jet {
	a.v[0] += s
	a.e[0] += unit * math.Abs(a.v[0])
	return a
}

// scale multiplies by the exact constant s.
func (a jet) scale(s float64) jet {
	for k := 0; k < a.n; k++ {
		a.v[k] *= s
		a.e[k] = math.Abs(s)*a.e[k] + unit*math.Abs(a.v[k])
	}
	return a
}

func (a jet) mul(b jet) jet {
	r := jet{n: a.n}
	for k := 0; k < a.n; k++ {
		s, abs, err := 0.0, 0.0, 0.0
		for i := 0; i <= k; i++ {
			s += a.v[i] * b.v[k-i]
			abs += math.Abs(a.v[i] * b.v[k-i])
			err += math.Abs(a.v[i])*b.e[k-i] + a.e[i]*math.Abs(b.v[k-i]) + a.e[i]*b.e[k-i]
		}
		r.v[k] = s
		r.e[k] = err + gamma(k+1)*abs
	}
	return r
}

func (a jet) div(b jet) jet {
	r := jet{n: a.n}
	b0 := math.Abs(b.v[0])
	for k := 0; k < a.n; k++ {
		s, abs, err := a.v[k], math.Abs(a.v[k]), a.e[k]
		for i := 1; i <= k; i++ {
			s -= b.v[i] * r.v[k-i]
			abs += math.Abs(b.v[i] * r.v[k-i])
			err += math.Abs(b.v[i])*r.e[k-i] + b.e[i]*math.Abs(r.v[k-i])
		}
		r.v[k] = s / b.v[0]
		r.e[k] = (err+gamma(k+2)*abs)/b0 + math.Abs(r.v[k])*b.e[0]/b0
	}
	return r
}

func (a jet) exp() jet {
	r := jet{n: a.n}
	r.v[0] = math.Exp(a.v[0])
	r.e[0] = math.Abs(r.v[0]) * (a.e[0]*(1+a.e[0]) + 2*unit)
	for k := 1; k < a.n; k++ {
		s, abs, err := 0.0, 0.0, 0.0
		for j := 1; j <= k; j++ {
			w := float64(j) / float64(k)
			s += w * a.v[j] * r.v[k-j]
			abs += w * math.Abs(a.v[j]*r.v[k-j])
			err += w * (math.Abs(a.v[j])*r.e[k-j] + a.e[j]*math.Abs(r.v[k-j]))
		}
		r.v[k] = s
		r.e[k] = err + gamma(k+2)*abs
	}
	return r
}

func (a jet) log() jet {
	r := jet{n: a.n}
	r.v[0] = math.Log(a.v[0])
	a0 := math.Abs(a.v[0])
	r.e[0] = a.e[0]/a0 + unit*math.Abs(r.v[0])
	for k := 1; k < a.n; k++ {
		s, abs, err := a.v[k], math.Abs(a.v[k]), a.e[k]
		for j := 1; j < k; j++ {
			w := float64(j) / float64(k)
			s -= w * r.v[j] * a.v[k-j]
			abs += w * math.Abs(r.v[j]*a.v[k-j])
			err += w * (math.Abs(r.v[j])*a.e[k-j] + r.e[j]*math.Abs(a.v[k-j]))
		}
		r.v[k] = s / a.v[0]
		r.e[k] = (err+gamma(k+2)*abs)/a0 + math.Abs(r.v[k])*a.e[0]/a0
	}
	return r
}

// jetFunc is a Func from a plain evaluation and its jet version.
type jetFunc struct {
	eval func(x float64) float64
	jet  func(x jet) jet
}

func (f jetFunc) Eval(x float64) float64 { return f.eval(x) }

func (f jetFunc) Taylor(x float64, c, e []float64) {
	r := f.jet(jvar(len(c), x))
	copy(c, r.v[:len(c)])
	copy(e, r.e[:len(c)])
}

// poly is p(x) = Σ a[i] x^i. Its Taylor coefficients at x come from
// repeated Horner shifts (synthetic division); e[k] is the first-order
// running error bound of the shifts (Higham, Accuracy and Stability of
// Numerical Algorithms, 2nd ed., §5.1).
type poly []float64

func (p poly) Eval(x float64) float64 {
	s := 0.0
	for i := len(p) - 1; i >= 0; i-- {
		s = s*x + p[i]
	}
	return s
}

func (p poly) Taylor(x float64, c, e []float64) {
	var b, eb [32]float64
	d := len(p) - 1
	copy(b[:], p)
	ax := math.Abs(x)
	for k := 0; k < len(c); k++ {
		if k > d {
			c[k], e[k] = 0, 0
			continue
		}
		for i := d - 1; i >= k; i-- {
			t := x * b[i+1]
			y := b[i] + t
			eb[i] += ax*eb[i+1] + unit*(math.Abs(t)+math.Abs(y))
			b[i] = y
		}
		c[k], e[k] = b[k], eb[k]*(1+4*float64(d)*unit)
	}
}

// fromRoots returns the monomial coefficients of s·Π(x − r_i).
func fromRoots(s float64, roots ...float64) poly {
	p := poly{s}
	for _, r := range roots {
		q := make(poly, len(p)+1)
		for i, a := range p {
			q[i+1] += a
			q[i] -= r * a
		}
		p = q
	}
	return p
}

// factored is s·Π(x − r_i) evaluated in product form (accurate near its
// roots, so close pairs stay resolvable).
func factored(s float64, roots ...float64) jetFunc {
	rs := append([]float64(nil), roots...)
	return jetFunc{
		eval: func(x float64) float64 {
			v := s
			for _, r := range rs {
				v *= x - r
			}
			return v
		},
		jet: func(x jet) jet {
			v := jconst(x.n, s)
			for _, r := range rs {
				v = v.mul(x.addc(-r))
			}
			return v
		},
	}
}

// Rate laws from REFERENCE-CHECKS.md.

// logistic is r x (1 − x/K), written r/K · x (K − x) so that f(K) = 0 exactly.
func logistic(r, K float64) jetFunc {
	return jetFunc{
		eval: func(x float64) float64 { return r / K * x * (K - x) },
		jet: func(x jet) jet {
			return x.mul(x.scale(-1).addc(K)).scale(r / K)
		},
	}
}

// harvest is r x (1 − x/K) − H (Schaefer 1954).
func harvest(r, K, H float64) jetFunc {
	return jetFunc{
		eval: func(x float64) float64 { return r/K*x*(K-x) - H },
		jet: func(x jet) jet {
			return x.mul(x.scale(-1).addc(K)).scale(r / K).addc(-H)
		},
	}
}

// allee is r x (x/A − 1)(1 − x/K), written r/(A K) · x (x − A)(K − x).
func allee(r, A, K float64) jetFunc {
	return jetFunc{
		eval: func(x float64) float64 { return r / (A * K) * x * (x - A) * (K - x) },
		jet: func(x jet) jet {
			return x.mul(x.addc(-A)).mul(x.scale(-1).addc(K)).scale(r / (A * K))
		},
	}
}

// semenov is δ e^θ − θ (Semenov 1928, dimensionless).
func semenov(delta float64) jetFunc {
	return jetFunc{
		eval: func(t float64) float64 { return delta*math.Exp(t) - t },
		jet: func(t jet) jet {
			return t.exp().scale(delta).sub(t)
		},
	}
}

// lake is the scaled shallow-lake law a − bP + P²/(1 + P²) (Carpenter,
// Ludwig & Brock 1999).
func lake(a, b float64) jetFunc {
	return jetFunc{
		eval: func(p float64) float64 { return a - b*p + p*p/(1+p*p) },
		jet: func(p jet) jet {
			p2 := p.mul(p)
			return p.scale(-b).addc(a).add(p2.div(p2.addc(1)))
		},
	}
}

// lakeFunc is the shallow-lake law as a concrete type with hand-written
// Taylor arithmetic (fixed-size series, running error bounds), the way a
// compiled back end would evaluate it, for the benchmarks.
type lakeFunc struct{ a, b float64 }

func (l lakeFunc) Eval(p float64) float64 { return l.a - l.b*p + p*p/(1+p*p) }

func (l lakeFunc) Taylor(x float64, c, e []float64) {
	n := len(c)
	// P = x + t; S = P² = x² + 2x t + t²; D = 1 + S; Q = S/D.
	var q, eq [MaxTaylor]float64
	s0 := x * x
	es0 := unit * s0
	d0 := 1 + s0
	ed0 := es0 + unit*d0
	s1, d1, d2 := 2*x, 2*x, 1.0
	for k := 0; k < n; k++ {
		var sk, esk float64
		switch k {
		case 0:
			sk, esk = s0, es0
		case 1:
			sk = s1
		case 2:
			sk = 1
		}
		num, abs, err := sk, math.Abs(sk), esk
		if k >= 1 {
			t := d1 * q[k-1]
			num -= t
			abs += math.Abs(t)
			err += math.Abs(d1) * eq[k-1]
		}
		if k >= 2 {
			t := d2 * q[k-2]
			num -= t
			abs += math.Abs(t)
			err += eq[k-2]
		}
		q[k] = num / d0
		eq[k] = (err+float64(k+2)*unit*abs)/d0 + math.Abs(q[k])*ed0/d0
	}
	bx := l.b * x
	c[0] = l.a - bx + q[0]
	e[0] = eq[0] + unit*(math.Abs(bx)+2*math.Abs(l.a-bx)+2*math.Abs(c[0]))
	if n > 1 {
		c[1] = q[1] - l.b
		e[1] = eq[1] + unit*math.Abs(c[1])
	}
	for k := 2; k < n; k++ {
		c[k], e[k] = q[k], eq[k]
	}
}

// recipShift is 1/(x − 1) − 1: a pole at 1, a root at 2.
func recipShift() jetFunc {
	return jetFunc{
		eval: func(x float64) float64 { return 1/(x-1) - 1 },
		jet: func(x jet) jet {
			return jconst(x.n, 1).div(x.addc(-1)).addc(-1)
		},
	}
}

// negLog is −log x: undefined below 0, infinite at 0, root at 1.
func negLog() jetFunc {
	return jetFunc{
		eval: func(x float64) float64 { return -math.Log(x) },
		jet:  func(x jet) jet { return x.log().scale(-1) },
	}
}

// plateau is 1 − x below 1, 0 on [1, 2] and 2 − x above 2: f ≡ 0 on a
// sub-interval.
type plateau struct{}

func (plateau) Eval(x float64) float64 {
	switch {
	case x < 1:
		return 1 - x
	case x > 2:
		return 2 - x
	}
	return 0
}

func (plateau) Taylor(x float64, c, e []float64) {
	clear(c)
	clear(e)
	switch {
	case x < 1:
		c[0] = 1 - x
		e[0] = unit * math.Abs(c[0])
		if len(c) > 1 {
			c[1] = -1
		}
	case x > 2:
		c[0] = 2 - x
		e[0] = unit * math.Abs(c[0])
		if len(c) > 1 {
			c[1] = -1
		}
	}
}

// sincos returns the jets of sin a and cos a.
func (a jet) sincos() (jet, jet) {
	s, c := jet{n: a.n}, jet{n: a.n}
	s.v[0], c.v[0] = math.Sincos(a.v[0])
	s.e[0] = math.Abs(c.v[0])*a.e[0] + unit*math.Abs(s.v[0]) + unit
	c.e[0] = math.Abs(s.v[0])*a.e[0] + unit*math.Abs(c.v[0]) + unit
	for k := 1; k < a.n; k++ {
		var ss, cs, sabs, cabs, serr, cerr float64
		for j := 1; j <= k; j++ {
			w := float64(j) / float64(k)
			ss += w * a.v[j] * c.v[k-j]
			cs -= w * a.v[j] * s.v[k-j]
			sabs += w * math.Abs(a.v[j]*c.v[k-j])
			cabs += w * math.Abs(a.v[j]*s.v[k-j])
			serr += w * (math.Abs(a.v[j])*c.e[k-j] + a.e[j]*math.Abs(c.v[k-j]))
			cerr += w * (math.Abs(a.v[j])*s.e[k-j] + a.e[j]*math.Abs(s.v[k-j]))
		}
		s.v[k], c.v[k] = ss, cs
		s.e[k] = serr + gamma(k+2)*sabs
		c.e[k] = cerr + gamma(k+2)*cabs
	}
	return s, c
}

// hillLake is the shallow-lake law with a Hill recycling term,
// L − s P + r P^q/(m^q + P^q) (illustrative parameters in the benchmarks),
// whose Eval costs a math.Pow: a costlier law, like a compiled one. Taylor
// computes P^q = exp(q log P) by the series recurrences on fixed arrays.
type hillLake struct{ L, s, r, mq, q float64 }

func (h hillLake) Eval(p float64) float64 {
	pq := math.Pow(p, h.q)
	return h.L - h.s*p + h.r*pq/(h.mq+pq)
}

func (h hillLake) Taylor(x float64, c, e []float64) {
	n := len(c)
	var lg, pw, d, q [MaxTaylor]float64
	// log P with P = x + t: log x, then c_k = (−1)^(k+1)/(k x^k).
	lg[0] = math.Log(x)
	ix := 1 / x
	t := ix
	for k := 1; k < n; k++ {
		lg[k] = t / float64(k)
		if k%2 == 0 {
			lg[k] = -lg[k]
		}
		t *= ix
	}
	// P^q = exp(q log P).
	pw[0] = math.Exp(h.q * lg[0])
	for k := 1; k < n; k++ {
		s := 0.0
		for j := 1; j <= k; j++ {
			s += float64(j) * h.q * lg[j] * pw[k-j]
		}
		pw[k] = s / float64(k)
	}
	// D = m^q + P^q; Q = P^q / D.
	d = pw
	d[0] += h.mq
	eabs := 0.0
	for k := 0; k < n; k++ {
		s := pw[k]
		for i := 1; i <= k; i++ {
			s -= d[i] * q[k-i]
		}
		q[k] = s / d[0]
	}
	for k := 0; k < n; k++ {
		c[k] = h.r * q[k]
		eabs = float64(4*k+8) * unit * (math.Abs(c[k]) + math.Abs(h.r*pw[k]/d[0]))
		e[k] = eabs
	}
	c[0] += h.L - h.s*x
	e[0] += 4 * unit * (math.Abs(h.L) + math.Abs(h.s*x) + math.Abs(c[0]))
	if n > 1 {
		c[1] -= h.s
		e[1] += 2 * unit * math.Abs(c[1])
	}
}
