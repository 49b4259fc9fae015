package expand

import "testing"

// The first outputs from seed 5489 (numpy 1.24's RandomState(5489), the
// same generator; and the 10000th, 4123659995, which the C++ standard
// requires of std::mt19937, [rand.predef]).
func TestMT19937(t *testing.T) {
	m := NewMT19937(5489)
	if a, b := m.Uint32(), m.Uint32(); a != 3499211612 || b != 581869302 {
		t.Errorf("first outputs %d, %d", a, b)
	}
	m = NewMT19937(5489)
	var v uint32
	for range 10000 {
		v = m.Uint32()
	}
	if v != 4123659995 {
		t.Errorf("10000th output %d", v)
	}
}
