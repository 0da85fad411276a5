package audio

import "io"

// SliceSource is a Source that plays back samples held in memory. It is
// meant for tests and for feeding already-decoded audio into the pipeline.
type SliceSource struct {
	rate    int
	samples []int16
	pos     int
}

// NewSliceSource returns a Source delivering samples at rate Hz. It does not
// copy samples; the caller must not change them while the source is read.
func NewSliceSource(rate int, samples []int16) *SliceSource {
	return &SliceSource{rate: rate, samples: samples}
}

// Rate returns the sample rate in Hz given to NewSliceSource.
func (s *SliceSource) Rate() int { return s.rate }

// Read copies the next samples into p; it returns 0, io.EOF once all
// samples have been delivered. It does not allocate.
func (s *SliceSource) Read(p []int16) (int, error) {
	if s.pos >= len(s.samples) {
		return 0, io.EOF
	}
	n := copy(p, s.samples[s.pos:])
	s.pos += n
	return n, nil
}
