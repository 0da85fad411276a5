package ring

import "testing"

// mustNew returns a Buffer for cfg or stops the test.
func mustNew(t testing.TB, cfg Config) *Buffer {
	t.Helper()
	b, err := New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// counter returns n samples whose values are their producer positions
// from start, modulo 2^16.
func counter(start uint64, n int) []int16 {
	p := make([]int16, n)
	for i := range p {
		p[i] = int16(uint16(start + uint64(i)))
	}
	return p
}
