package expand

// MT19937 is the Mersenne Twister of Matsumoto & Nishimura, "Mersenne
// twister: a 623-dimensionally equidistributed uniform pseudo-random number
// generator", ACM TOMACS 8 (1998) 3–30, with the seeding of their reference
// code (init_genrand). It is here as a generator with a known defect for
// tests and examples: each output bit follows a linear recurrence of order
// 19937 over GF(2). Its first output from seed 5489 is 3499211612 (also
// numpy's RandomState(5489)).
type MT19937 struct {
	s [624]uint32
	i int
}

// NewMT19937 returns the generator seeded as init_genrand(seed) does.
func NewMT19937(seed uint32) *MT19937 {
	m := &MT19937{i: 624}
	m.s[0] = seed
	for i := 1; i < 624; i++ {
		m.s[i] = 1812433253*(m.s[i-1]^(m.s[i-1]>>30)) + uint32(i)
	}
	return m
}

// Uint32 returns the next output.
func (m *MT19937) Uint32() uint32 {
	if m.i >= 624 {
		for k := 0; k < 624; k++ {
			y := m.s[k]&0x80000000 | m.s[(k+1)%624]&0x7fffffff
			v := m.s[(k+397)%624] ^ y>>1
			if y&1 != 0 {
				v ^= 0x9908b0df
			}
			m.s[k] = v
		}
		m.i = 0
	}
	y := m.s[m.i]
	m.i++
	y ^= y >> 11
	y ^= y << 7 & 0x9d2c5680
	y ^= y << 15 & 0xefc60000
	return y ^ y>>18
}
