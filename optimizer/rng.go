package optimizer

import (
	"math/rand"
	randv2 "math/rand/v2"
)

// Random streams. Every random draw of a run comes from a generator seeded
// from (seed, generation, stream, island); none is carried from one
// generation to the next, so a run can be cut anywhere and resumed.
const (
	streamInit      uint64 = 1 // initial population, generation 0
	streamIsland    uint64 = 2 // survival and breeding of one island
	streamMigration uint64 = 3 // eaopt's migrator
)

// streamRand returns a math/rand generator (as eaopt takes) over a PCG
// generator (math/rand/v2) whose 128-bit state is derived from the key by
// the SplitMix64 finaliser (G. L. Steele, D. Lea and C. H. Flood, "Fast
// splittable pseudorandom number generators", OOPSLA 2014,
// doi:10.1145/2660193.2660195).
func streamRand(seed uint64, generation int, stream uint64, island int) *rand.Rand {
	h := mix64(seed ^ 0x6a09e667f3bcc909)
	h = mix64(h ^ uint64(generation))
	h = mix64(h ^ stream)
	h = mix64(h ^ uint64(island))
	return rand.New(pcgSource{randv2.NewPCG(h, mix64(h^0xbb67ae8584caa73b))})
}

// mix64 is the SplitMix64 output function.
func mix64(z uint64) uint64 {
	z += 0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// pcgSource adapts a PCG to math/rand's Source64.
type pcgSource struct{ pcg *randv2.PCG }

func (s pcgSource) Uint64() uint64 { return s.pcg.Uint64() }
func (s pcgSource) Int63() int64   { return int64(s.pcg.Uint64() >> 1) }

// Seed re-keys the generator from one value; eaopt never calls it.
func (s pcgSource) Seed(seed int64) { s.pcg.Seed(uint64(seed), mix64(uint64(seed))) }
