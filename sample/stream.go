package sample

import "math/rand/v2"

// Reproducible random streams.
//
// Draw i of a run with seed s uses random numbers that depend only on (s, i):
// the pair is hashed with the SplitMix64 finaliser (Steele, Lea & Flood,
// "Fast splittable pseudorandom number generators", OOPSLA 2014) into the
// two 64-bit words that seed a PCG generator (O'Neill 2014; math/rand/v2
// PCG, 128-bit LCG with DXSM output). Because the finaliser is a bijection
// with full avalanche, neighbouring i give unrelated seeds, and no state is
// shared between draws, so any number of workers in any order reproduce the
// same numbers.

const golden = 0x9e3779b97f4a7c15 // 2⁶⁴/φ, the SplitMix64 increment

// mix64 is the SplitMix64 output function (a bijection on uint64).
func mix64(z uint64) uint64 {
	z += golden
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// Stream domains keep the streams used inside this package independent of
// the one Stream hands out for the same (seed, i).
const (
	domainUser   = 0x243f6a8885a308d3 // π digits, nothing up the sleeve
	domainPlan   = 0x13198a2e03707344
	domainLHSKey = 0xa4093822299f31d0
	domainQMCKey = 0x082efa98ec4e6c89
)

// streamSeeds returns the two PCG seed words for (seed, i) in a domain.
func streamSeeds(seed, domain, i uint64) (uint64, uint64) {
	h := mix64(mix64(seed^domain) ^ i)
	return h, mix64(h ^ golden)
}

// Stream returns the random number generator of draw i in a run seeded
// with seed. It depends only on (seed, i): Stream(s, i) returns the same
// sequence every time, and streams for different i are statistically
// unrelated. It allocates; hot loops should use a Design or Plan, which
// keep their generator on the stack.
func Stream(seed uint64, i int) *rand.Rand {
	a, b := streamSeeds(seed, domainUser, uint64(i))
	return rand.New(rand.NewPCG(a, b))
}

// openUnit maps 64 random bits to a float64 in the open interval (0, 1):
// (⌊x/2¹²⌋ + ½)·2⁻⁵², so 2⁻⁵³ ≤ u ≤ 1 − 2⁻⁵³, both ends exact and the
// grid symmetric about ½. (With 53 bits the top value 1 − 2⁻⁵⁴ is not
// representable and would round to 1.)
func openUnit(x uint64) float64 {
	return (float64(x>>12) + 0.5) * 0x1p-52
}

// Extremes of openUnit, also used to clamp copula probabilities.
const (
	minUnit = 0x1p-53
	maxUnit = 1 - 0x1p-53
)
