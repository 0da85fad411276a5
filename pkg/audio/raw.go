package audio

import (
	"errors"
	"io"
)

// Limits and sizes of RawSource.
const (
	// MaxRawChannels is the largest channel count NewRawSource accepts.
	MaxRawChannels = 1024
	// rawBufferBytes is the size of a RawSource's byte buffer; one Read
	// takes at most this many bytes from the reader (but at least a frame).
	rawBufferBytes = 16384
	// rawName names the stream in RawSource's error messages.
	rawName = "raw PCM stream"
	// maxEmptyReads is how many consecutive (0, nil) reads RawSource
	// tolerates before it gives up with io.ErrNoProgress, as bufio does.
	maxEmptyReads = 100
)

// RawSource reads headerless PCM, signed 16-bit little-endian samples with
// the channels interleaved (what `arecord -t raw -f S16_LE` or
// `sox ... -t raw -e signed -b 16` write), as a mono Source. It picks one
// channel or mixes all of them with the rounding rule of decode.go: the
// mean of the C samples rounded half up, floor((sum + C/2) / C) with C/2
// taken exactly.
//
// Reads: a Read takes whatever the reader has (one underlying Read call
// once at least one whole frame is available), so a pipe from a recorder
// is passed on as it arrives; partial frames are kept for the next Read.
// Read does not allocate.
//
// End of stream: when the reader returns io.EOF on a frame boundary, Read
// returns io.EOF. When the stream ends inside a frame (a recorder killed
// mid-write, a wrong channel count), Read first delivers every complete
// frame and then returns an error wrapping ErrTruncatedData that names the
// byte offset where the partial frame starts and how many bytes it has;
// those bytes are not silently dropped. Any other reader error is returned,
// wrapped with its byte offset, after the complete frames before it.
// Errors are sticky. The caller owns r and closes it.
type RawSource struct {
	r      io.Reader
	rate   int
	dec    sampleDecoder
	align  int    // bytes per frame
	buf    []byte // whole frames' worth of bytes
	have   int    // bytes carried in buf[:have]; less than align between Reads
	offset int64  // stream offset of the next byte to read from r
	err    error  // sticky end state: io.EOF or a failure
}

// NewRawSource returns a Source reading raw s16le PCM of the given rate
// (Hz, 1..MaxSampleRate) and channels (1..MaxRawChannels) from r. channel
// is the 0-based channel to keep, or -1 to mix all channels. Errors wrap
// ErrSampleRate, ErrChannels or ErrChannel.
func NewRawSource(r io.Reader, rate, channels, channel int) (*RawSource, error) {
	if rate < 1 || rate > MaxSampleRate {
		return nil, failf(rawName, -1, ErrSampleRate, "%d Hz, want 1..%d", rate, MaxSampleRate)
	}
	if channels < 1 || channels > MaxRawChannels {
		return nil, failf(rawName, -1, ErrChannels, "%d channels, want 1..%d", channels, MaxRawChannels)
	}
	if channel < -1 || channel >= channels {
		return nil, failf(rawName, -1, ErrChannel, "channel %d requested but the stream has %d (0..%d); use -1 to mix", channel, channels, channels-1)
	}
	align := 2 * channels
	return &RawSource{
		r:     r,
		rate:  rate,
		dec:   sampleDecoder{sampleBytes: 2, channels: channels, channel: channel},
		align: align,
		buf:   make([]byte, max(rawBufferBytes/align, 1)*align),
	}, nil
}

// Rate returns the sample rate in Hz given to NewRawSource.
func (s *RawSource) Rate() int { return s.rate }

// Read delivers up to len(p) mono samples, one per frame; see RawSource
// for how it waits and ends.
func (s *RawSource) Read(p []int16) (int, error) {
	if s.err != nil {
		return 0, s.err
	}
	if len(p) == 0 {
		return 0, nil
	}
	limit := min(len(p), len(s.buf)/s.align) * s.align
	for empty := 0; s.have < s.align; {
		n, err := s.r.Read(s.buf[s.have:limit])
		s.have += n
		s.offset += int64(n)
		if err != nil {
			s.err = s.endError(err)
			break
		}
		if n > 0 {
			empty = 0
		} else if empty++; empty >= maxEmptyReads {
			s.err = wrapIO(rawName, s.offset, io.ErrNoProgress)
			break
		}
	}
	frames := s.have / s.align
	if frames == 0 {
		return 0, s.err
	}
	used := frames * s.align
	s.dec.decode(p[:frames], s.buf[:used])
	s.have = copy(s.buf, s.buf[used:s.have])
	return frames, nil
}

// endError classifies the reader error err, given the bytes still in buf.
func (s *RawSource) endError(err error) error {
	partial := s.have % s.align
	if !errors.Is(err, io.EOF) {
		return wrapIO(rawName, s.offset, err)
	}
	if partial != 0 {
		return failf(rawName, s.offset-int64(partial), ErrTruncatedData,
			"stream ends %d bytes into a %d-byte frame (%d channels of 16-bit samples); check the channel count or whether the recorder was cut off",
			partial, s.align, s.align/2)
	}
	return io.EOF
}
