package features

import "errors"

// ErrConfig is returned when a Config field is out of range. The returned
// error wraps it and names the offending field.
var ErrConfig = errors.New("features: invalid config")

// ErrFFTSize is returned when an FFT length is not a power of two of at
// least 4.
var ErrFFTSize = errors.New("features: FFT length must be a power of two >= 4")

// ErrBank is returned when a filterbank cannot be built from the given
// rate, FFT length, band count and frequency range, for example when the
// range is empty or a band would hold no FFT bin.
var ErrBank = errors.New("features: invalid filterbank")
