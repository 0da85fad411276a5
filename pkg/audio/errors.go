package audio

import "errors"

// Sentinel errors. Every error this package returns for bad input wraps
// exactly one of these, so callers can test with errors.Is; the message of
// the wrapping error names the file and, where known, the byte offset.
var (
	// ErrNotWAV is returned when the stream does not begin with a RIFF
	// header whose form type is WAVE.
	ErrNotWAV = errors.New("audio: not a RIFF/WAVE file")

	// ErrTruncatedHeader is returned when the stream ends before the data
	// chunk begins, for example inside the RIFF header, a chunk header or
	// the fmt chunk.
	ErrTruncatedHeader = errors.New("audio: truncated header")

	// ErrNoFormat is returned when the data chunk is reached before any fmt
	// chunk, so the sample format is unknown.
	ErrNoFormat = errors.New("audio: no fmt chunk before data chunk")

	// ErrFormatChunk is returned when the fmt chunk is too short for its
	// format tag (under 16 bytes, or under 40 bytes for
	// WAVE_FORMAT_EXTENSIBLE) or its extension fields are inconsistent.
	ErrFormatChunk = errors.New("audio: malformed fmt chunk")

	// ErrUnsupportedFormat is returned when the format tag or extensible
	// sub-format is not integer PCM or IEEE float (for example ADPCM, A-law,
	// mu-law or MPEG), or when the bit depth is not one this package decodes
	// (8, 16, 24 or 32-bit integer; 32 or 64-bit float).
	ErrUnsupportedFormat = errors.New("audio: unsupported sample format")

	// ErrBlockAlign is returned when the fmt chunk's block align is not
	// channels*bitsPerSample/8.
	ErrBlockAlign = errors.New("audio: inconsistent block align")

	// ErrSampleRate is returned when a sample rate is outside 1..384000 Hz.
	ErrSampleRate = errors.New("audio: sample rate out of range")

	// ErrChannels is returned when the fmt chunk declares zero channels.
	ErrChannels = errors.New("audio: zero channels")

	// ErrChannel is returned when the requested channel index is neither -1
	// (mix) nor in 0..channels-1.
	ErrChannel = errors.New("audio: channel out of range")

	// ErrEmptyData is returned when the data chunk declares zero bytes.
	ErrEmptyData = errors.New("audio: empty data chunk")

	// ErrPartialFrame is returned when the data chunk's declared size is not
	// a whole number of sample frames.
	ErrPartialFrame = errors.New("audio: data size not a whole number of frames")

	// ErrTruncatedData is returned when the file ends before the number of
	// bytes the data chunk declares, or ends in the middle of a sample frame.
	ErrTruncatedData = errors.New("audio: truncated data")

	// ErrWriterClosed is returned when Write or Close is called on a
	// WAVWriter that has already been closed.
	ErrWriterClosed = errors.New("audio: wav writer already closed")

	// ErrTooLong is returned when a WAVWriter is asked to write more samples
	// than a RIFF file's 32-bit size fields can describe.
	ErrTooLong = errors.New("audio: wav file would exceed 4 GiB")

	// ErrResampleRatio is returned when the downsampling factor in/out is
	// so large that the anti-aliasing filter table would exceed
	// MaxResampleTaps coefficients (for example 384000 Hz to 1000 Hz).
	ErrResampleRatio = errors.New("audio: resampling factor too large")
)
