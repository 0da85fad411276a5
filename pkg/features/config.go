package features

import (
	"fmt"
	"math"
)

// Config describes the spectral front end: how a stream is cut into
// frames and how each frame becomes a row of log-mel energies.
type Config struct {
	// Rate is the sample rate in Hz.
	Rate int
	// FrameLen is the frame length in samples; it must be a power of two
	// of at least 4 and is also the FFT length.
	FrameLen int
	// Hop is the distance in samples between the starts of consecutive
	// frames. Hop > FrameLen leaves gaps, which is allowed.
	Hop int
	// Mels is the number of mel bands, i.e. the length of one row.
	Mels int
	// FMin and FMax bound the mel filterbank in Hz:
	// 0 <= FMin < FMax <= Rate/2.
	FMin, FMax float64
	// FloorDB is the lowest value a row element can take, in dB relative
	// to full scale (see Extractor). It must be finite and above MinDB.
	FloorDB float32
}

// DefaultConfig returns the configuration used on the pump skids:
// 16 kHz, 1024-sample frames (64 ms), hop 512 (50 % overlap), 128 HTK mel
// bands from 0 Hz to 8 kHz, and a floor of -100 dB.
func DefaultConfig() Config {
	return Config{
		Rate:     16000,
		FrameLen: 1024,
		Hop:      512,
		Mels:     128,
		FMin:     0,
		FMax:     8000,
		FloorDB:  -100,
	}
}

// Validate returns nil when c can build an Extractor. Otherwise it returns
// an error wrapping ErrConfig that names the first offending field. It
// does not check that every mel band holds an FFT bin; NewExtractor does.
func (c Config) Validate() error {
	switch {
	case c.Rate <= 0:
		return fmt.Errorf("%w: Rate = %d, want > 0", ErrConfig, c.Rate)
	case c.FrameLen < 4 || c.FrameLen > 1<<24 || c.FrameLen&(c.FrameLen-1) != 0:
		return fmt.Errorf("%w: FrameLen = %d, want a power of two in [4, 2^24]", ErrConfig, c.FrameLen)
	case c.Hop <= 0:
		return fmt.Errorf("%w: Hop = %d, want > 0", ErrConfig, c.Hop)
	case c.Mels <= 0:
		return fmt.Errorf("%w: Mels = %d, want > 0", ErrConfig, c.Mels)
	case !(c.FMin >= 0) || math.IsInf(c.FMin, 0):
		return fmt.Errorf("%w: FMin = %g Hz, want >= 0", ErrConfig, c.FMin)
	case !(c.FMax > c.FMin) || c.FMax > float64(c.Rate)/2:
		return fmt.Errorf("%w: FMax = %g Hz, want FMin < FMax <= Rate/2 = %g", ErrConfig, c.FMax, float64(c.Rate)/2)
	case !(c.FloorDB > MinDB) || math.IsInf(float64(c.FloorDB), 0):
		return fmt.Errorf("%w: FloorDB = %g dB, want finite and > MinDB = %g", ErrConfig, c.FloorDB, float32(MinDB))
	}
	return nil
}
