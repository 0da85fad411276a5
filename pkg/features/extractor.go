package features

import (
	"fmt"
	"math"
)

// Extractor turns frames of int16 samples into rows of log-mel energies.
// Per frame: samples are scaled by 1/32768 (full scale = 1), multiplied by
// the periodic Hann window, transformed by a real FFT of length
// Config.FrameLen, squared to |X_k|^2, summed by the HTK mel filterbank
// and converted to dB.
//
// Reference (0 dB): RefEnergy() = N * sum(w^2) / 4 = 3 N^2 / 32 for the
// periodic Hann window, the total one-sided power (over k = 0..N/2) of a
// full-scale sine, by Parseval's theorem. A full-scale sine whose whole
// spectral line falls under the peak of one band reads 0 dB in that band;
// otherwise the line is shared by neighbouring triangles (which sum to 1)
// and the largest band reads lower, about -4 to 0 dB with the default
// config (see the package Caveats). Values are floored at Config.FloorDB.
//
// An Extractor holds scratch buffers: it is not safe for concurrent use;
// build one per goroutine.
type Extractor struct {
	cfg   Config
	win   []float32 // Hann window times 1/32768, in FFT gather order
	fft   *FFT
	bank  *Bank
	spec  []float32 // power of the last frame, FrameLen/2+1
	bands []float32 // band energies of the last frame
	refDB float32
}

// NewExtractor validates cfg and precomputes everything a frame needs.
// It returns an error wrapping ErrConfig for an invalid cfg and one
// wrapping ErrBank if a mel band would hold no FFT bin.
func NewExtractor(cfg Config) (*Extractor, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	fft, err := NewFFT(cfg.FrameLen)
	if err != nil {
		return nil, err
	}
	bank, err := NewMelBank(cfg.Rate, cfg.FrameLen, cfg.Mels, cfg.FMin, cfg.FMax)
	if err != nil {
		return nil, err
	}
	w := Hann(cfg.FrameLen)
	var sumSq float64
	for i, v := range w {
		sumSq += float64(v) * float64(v)
		w[i] = v / 32768
	}
	ref := float64(cfg.FrameLen) * sumSq / 4
	return &Extractor{
		cfg:   cfg,
		win:   fft.gatherWindow(w),
		fft:   fft,
		bank:  bank,
		spec:  make([]float32, cfg.FrameLen/2+1),
		bands: make([]float32, cfg.Mels),
		refDB: float32(10 * math.Log10(ref)),
	}, nil
}

// Config returns the configuration the Extractor was built with.
func (e *Extractor) Config() Config { return e.cfg }

// RefEnergy returns the band energy that maps to 0 dB, in units of the
// power spectrum returned by Spectrum.
func (e *Extractor) RefEnergy() float64 { return math.Pow(10, float64(e.refDB)/10) }

// Rows computes one row: frame must hold Config.FrameLen samples and dst
// Config.Mels elements (Rows panics otherwise). dst[i] is the energy of
// mel band i in dB relative to RefEnergy, floored at Config.FloorDB. Rows
// does not allocate. The name reflects that a run of frames yields the
// rows of a time-by-band matrix.
func (e *Extractor) Rows(frame []int16, dst []float32) {
	if len(frame) != e.cfg.FrameLen || len(dst) != e.cfg.Mels {
		panic(fmt.Sprintf("features: Extractor.Rows: len(frame) = %d, len(dst) = %d, want %d and %d", len(frame), len(dst), e.cfg.FrameLen, e.cfg.Mels))
	}
	e.fft.powerInt16(frame, e.win, e.spec)
	e.bank.Apply(e.spec, e.bands)
	dbInto(dst, e.bands, e.refDB, e.cfg.FloorDB)
}

// Spectrum returns the power spectrum |X_k|^2, k = 0..FrameLen/2, of the
// last frame passed to Rows, with samples scaled to full scale = 1 and
// the Hann window applied (unnormalised, as numpy.fft.rfft gives). It is
// a read-only view that the next Rows call overwrites.
func (e *Extractor) Spectrum() []float32 { return e.spec }

// Bank returns the mel filterbank (read-only).
func (e *Extractor) Bank() *Bank { return e.bank }
