package audio

// Source is a stream of mono int16 samples at a fixed rate. Every producer of
// audio (a WAV file, a resampler, later a microphone or stdin) implements it,
// so the analysis pipeline has exactly one input path.
type Source interface {
	// Rate is the sample rate in Hz; it never changes during the stream.
	Rate() int
	// Read fills p with up to len(p) samples and returns how many it wrote.
	// It returns io.EOF (with n == 0) when the stream has ended; any other
	// error is a failure of the underlying device or file.
	Read(p []int16) (n int, err error)
}
