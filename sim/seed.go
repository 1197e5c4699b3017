package sim

import "math/rand/v2"

// splitmix64 is the finaliser of Steele, Lea and Flood's SplitMix64: a
// bijective mix of 64 bits whose outputs for consecutive inputs look
// independent.
func splitmix64(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// seedPath seeds rng for path i of a run with the given seed. Every path has
// its own stream, so a path's numbers do not depend on which worker runs it
// or on how many paths ran before it.
func seedPath(rng *rand.PCG, seed uint64, i int) {
	a := splitmix64(seed ^ splitmix64(uint64(i)))
	rng.Seed(a, splitmix64(a^0x6a09e667f3bcc909))
}
