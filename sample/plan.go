package sample

import (
	"fmt"
	"math"

	"math/bits"
	"math/rand/v2"
	"strconv"
	"strings"
)

// PlanKind selects how a Plan fills the unit cube.
type PlanKind int

const (
	// Random is plain Monte Carlo: independent uniform coordinates.
	Random PlanKind = iota
	// LHS is Latin hypercube sampling (McKay, Beckman & Conover 1979): for
	// every coordinate, each of the n equal-probability strata
	// [s/n, (s+1)/n) holds exactly one of the points 0, …, n−1.
	LHS
	// QMC is randomized quasi-Monte Carlo: a Sobol' sequence (Sobol' 1967)
	// with Joe & Kuo (2008) direction numbers, Owen-scrambled (Owen 1995).
	QMC
)

var planNames = [...]string{Random: "random", LHS: "lhs", QMC: "qmc"}

// String returns "random", "lhs" or "qmc".
func (k PlanKind) String() string {
	if k >= 0 && int(k) < len(planNames) {
		return planNames[k]
	}
	return "PlanKind(" + strconv.Itoa(int(k)) + ")"
}

// ParsePlan converts "random", "lhs" or "qmc" to a PlanKind.
func ParsePlan(s string) (PlanKind, error) {
	for k, name := range planNames {
		if s == name {
			return PlanKind(k), nil
		}
	}
	return 0, fmt.Errorf("unknown sampling plan %q (want one of %s)", s, strings.Join(planNames[:], ", "))
}

// MaxQMCDim is the largest number of coordinates a QMC plan supports: the
// van der Corput sequence plus the 127 Joe–Kuo dimensions in this package.
const MaxQMCDim = 1 + len(joeKuo)

// MaxQMCPoints is the number of distinct points of the 32-bit Sobol'
// sequence used by a QMC plan.
const MaxQMCPoints = 1 << 32

// Plan maps a draw index i to a point in the open unit cube (0, 1)^k.
// Point i depends only on the plan's kind, n, k, seed and i; the plan holds
// no mutable state, so one Plan may be used from many goroutines and points
// may be computed in any order. Memory is O(k) whatever n is.
type Plan struct {
	kind PlanKind
	n, k int
	seed uint64
	// lhs: Feistel domain half-width in bits and its mask.
	half uint
	mask uint64
	// qmc: Sobol' direction numbers (bit b of the index selects dirs[j][b])
	// and one Owen-scrambling key per coordinate.
	dirs  [][32]uint32
	keys  []uint64
	depth uint    // scrambled leading bits, m = ⌈log₂ n⌉ (at least 1)
	scale float64 // 2^−m
}

// NewPlan returns a plan of n points in k dimensions. n is the total number
// of draws (LHS stratifies each coordinate into n strata; random and QMC
// plans do not depend on it); n ≥ 1, k ≥ 0. A QMC plan allows
// k ≤ MaxQMCDim and n ≤ MaxQMCPoints, and is best balanced when n is a
// power of two.
func NewPlan(kind PlanKind, n, k int, seed uint64) (*Plan, error) {
	if n < 1 {
		return nil, fmt.Errorf("sampling plan: number of draws must be ≥ 1 (got %d)", n)
	}
	if k < 0 {
		return nil, fmt.Errorf("sampling plan: dimension must be ≥ 0 (got %d)", k)
	}
	p := &Plan{kind: kind, n: n, k: k, seed: seed}
	switch kind {
	case Random:
	case LHS:
		m := uint(bits.Len64(uint64(n - 1)))
		p.half = (m + 1) / 2
		p.mask = 1<<p.half - 1
	case QMC:
		if k > MaxQMCDim {
			return nil, fmt.Errorf("sampling plan qmc: supports at most %d uncertain parameters (got %d); use lhs or random", MaxQMCDim, k)
		}
		if uint64(n) > MaxQMCPoints {
			return nil, fmt.Errorf("sampling plan qmc: supports at most %d draws (got %d)", uint64(MaxQMCPoints), n)
		}
		p.depth = max(1, uint(bits.Len64(uint64(n-1))))
		p.scale = math.Ldexp(1, -int(p.depth))
		p.dirs = make([][32]uint32, k)
		p.keys = make([]uint64, k)
		base := mix64(seed ^ domainQMCKey)
		for j := range k {
			if err := sobolDirections(j, &p.dirs[j]); err != nil {
				return nil, err
			}
			p.keys[j] = mix64(base ^ uint64(j)*golden)
		}
	default:
		return nil, fmt.Errorf("sampling plan: unknown kind %d", int(kind))
	}
	return p, nil
}

// Kind returns the plan's kind.
func (p *Plan) Kind() PlanKind { return p.kind }

// N returns the number of draws the plan was built for.
func (p *Plan) N() int { return p.n }

// Dim returns the number of coordinates k.
func (p *Plan) Dim() int { return p.k }

// Point fills u[:k] with point i of the plan, each coordinate in the open
// interval (0, 1). It does not allocate. u must have length ≥ k.
//
// Random: coordinates are consecutive outputs of the draw's PCG stream.
//
// LHS: coordinate j is (π_j(i) + v_j)/n, where π_j is a pseudo-random
// permutation of {0, …, n−1} keyed by (seed, j) and v_j is uniform on (0, 1)
// from the draw's stream. π_j is a balanced Feistel network (Luby & Rackoff
// 1988) on the smallest even-bit power-of-two domain ≥ n, restricted to
// [0, n) by cycle-walking (Black & Rogaway 2002), so it needs O(1) memory.
// Indices i ≥ n start further independent Latin hypercubes of n points
// each (replicate ⌊i/n⌋ uses fresh permutations).
//
// QMC: coordinate j is the Owen-scrambled j-th coordinate of Sobol' point i
// (natural order, i < 2³²), computed directly as the XOR of the direction
// numbers selected by the bits of i. The scramble is nested uniform
// (Owen 1995): the bit at depth d is flipped by a pseudo-random bit of the
// tree node holding the d leading bits, taken from a keyed hash of that
// prefix, so Owen's random permutation tree is realised without storing it
// (a hashed tree in the spirit of Burley 2020, with an independent bit per
// node). Only the leading m = ⌈log₂ n⌉ bits are scrambled this way; the
// points 0, …, 2^m − 1 lie in distinct cells of width 2^−m in every
// coordinate (the net property), so nested scrambling of the digits below
// is the same as filling them with independent uniform digits, which is
// what the draw's stream supplies, to full double precision. Each point is
// uniform on the cube, each power-of-two prefix of the sequence keeps the
// net property, and integration is unbiased. Points i ≥ 2^m are still
// uniform but no longer balanced; i is taken modulo 2³².
func (p *Plan) Point(i int, u []float64) {
	u = u[:p.k]
	a, b := streamSeeds(p.seed, domainPlan, uint64(i))
	var src rand.PCG
	src.Seed(a, b)
	switch p.kind {
	case Random:
		for j := range u {
			u[j] = openUnit(src.Uint64())
		}
	case LHS:
		n := uint64(p.n)
		ii := uint64(i)
		rep, idx := ii/n, ii%n
		base := mix64(mix64(p.seed^domainLHSKey) ^ rep)
		for j := range u {
			key := mix64(base ^ uint64(j)*golden)
			rk := [4]uint64{mix64(key), mix64(key ^ 1), mix64(key ^ 2), mix64(key ^ 3)}
			s := p.permute(idx, &rk)
			v := openUnit(src.Uint64())
			u[j] = belowOne((float64(s) + v) / float64(n))
		}
	case QMC:
		ii := uint64(i) & (MaxQMCPoints - 1)
		for j := range u {
			x := sobolCoord(&p.dirs[j], ii)
			y := owenScramble(x, p.keys[j], p.depth) >> (32 - p.depth)
			v := openUnit(src.Uint64())
			u[j] = belowOne((float64(y) + v) * p.scale)
		}
	}
}

// belowOne maps values that rounded up to 1 to the largest float64 < 1.
func belowOne(x float64) float64 {
	if x >= 1 {
		return maxUnit
	}
	return x
}

// permute returns π(x) for the keyed permutation of [0, n) (n = p.n):
// the Feistel permutation of the power-of-two domain, iterated until it
// lands in [0, n) (cycle-walking; the domain is < 4n, so fewer than four
// steps are expected).
func (p *Plan) permute(x uint64, rk *[4]uint64) uint64 {
	n := uint64(p.n)
	for {
		x = p.feistel(x, rk)
		if x < n {
			return x
		}
	}
}

// feistel is a 4-round balanced Feistel network on 2·half bits with round
// function F_r(R) = SplitMix64(R ⊕ k_r) restricted to half bits; four
// rounds with pseudo-random round functions give a pseudo-random
// permutation (Luby & Rackoff 1988).
func (p *Plan) feistel(x uint64, rk *[4]uint64) uint64 {
	l, r := x>>p.half, x&p.mask
	for _, k := range rk {
		l, r = r, l^(mix64(r^k)&p.mask)
	}
	return l<<p.half | r
}

// sobolCoord returns the 32-bit Sobol' coordinate of point i: the XOR of
// the direction numbers v_b over the set bits b of i (Bratley & Fox 1988).
func sobolCoord(v *[32]uint32, i uint64) uint32 {
	var x uint32
	for b := 0; i != 0 && b < 32; b, i = b+1, i>>1 {
		x ^= v[b] & -uint32(i&1) // branch-free: the bits of i are random
	}
	return x
}

// owenScramble applies a nested uniform scramble (Owen 1995) to the
// leading depth bits of x: the bit at depth d is flipped by a pseudo-random
// bit owned by the node of the permutation tree that holds the d leading
// bits of x. One 64-bit hash serves a whole subtree of six levels: the
// hash of the node at depth d (a multiple of 6), identified by its
// prefix under a marker bit, (1 << d) | prefix, which is unique across
// depths, supplies 1 + 2 + 4 + 8 + 16 + 32 = 63 bits, one for each node of
// the subtree (bit 2^t − 1 + c for the node c at relative depth t). Every
// node thus gets its own bit and the scramble is exact nested scrambling,
// with six times fewer hashes than one per node.
func owenScramble(x uint32, key uint64, depth uint) uint32 {
	y, x64 := x, uint64(x)
	for d := uint(0); d < depth; d += 6 {
		h := mix64(key ^ (1<<(d&63) | x64>>((32-d)&63)))
		var c uint64 // index of the node within its level of the subtree
		for t := uint(0); t < 6 && d+t < depth; t++ {
			b := (31 - d - t) & 31 // bit position of depth d+t
			y ^= uint32(h>>((1<<t-1+c)&63)&1) << b
			c = c<<1 | x64>>b&1
		}
	}
	return y
}

// sobolDirections fills v with the direction numbers of coordinate j
// (zero-based; j = 0 is the van der Corput sequence, j ≥ 1 uses row j−1 of
// joeKuo) scaled by 2³²: v_b = m_{b+1}·2^(31−b) for b < s and, beyond, the
// recurrence v_b = v_{b−s} ⊕ (v_{b−s} >> s) ⊕ ⨁_{k=1}^{s−1} a_k v_{b−k}
// (Bratley & Fox 1988; Joe & Kuo 2008).
func sobolDirections(j int, v *[32]uint32) error {
	if j == 0 {
		for b := range 32 {
			v[b] = 1 << (31 - b)
		}
		return nil
	}
	s, a, m, err := parseJoeKuo(joeKuo[j-1])
	if err != nil {
		return fmt.Errorf("sobol direction numbers, dimension %d: %w", j+1, err)
	}
	for b := range 32 {
		if b < s {
			v[b] = uint32(m[b]) << (31 - b)
			continue
		}
		x := v[b-s] ^ v[b-s]>>s
		for k := 1; k < s; k++ {
			if a>>(s-1-k)&1 != 0 {
				x ^= v[b-k]
			}
		}
		v[b] = x
	}
	return nil
}

// parseJoeKuo splits a row "s a m_1 … m_s".
func parseJoeKuo(row string) (s int, a uint64, m []uint64, err error) {
	f := strings.Fields(row)
	if len(f) < 3 {
		return 0, 0, nil, fmt.Errorf("short row %q", row)
	}
	if s, err = strconv.Atoi(f[0]); err != nil || s < 1 || s > 31 || len(f) != s+2 {
		return 0, 0, nil, fmt.Errorf("bad degree in row %q", row)
	}
	if a, err = strconv.ParseUint(f[1], 10, 32); err != nil {
		return 0, 0, nil, fmt.Errorf("bad polynomial in row %q", row)
	}
	m = make([]uint64, s)
	for i := range m {
		if m[i], err = strconv.ParseUint(f[i+2], 10, 32); err != nil || m[i]%2 == 0 || m[i] >= 1<<(i+1) {
			return 0, 0, nil, fmt.Errorf("bad direction integer m_%d in row %q", i+1, row)
		}
	}
	return s, a, m, nil
}
