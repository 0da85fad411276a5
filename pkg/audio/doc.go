// Package audio reads sound into the analysis pipeline: a streaming WAV
// decoder, an anti-aliasing resampler and the Source interface that every
// producer of mono int16 samples implements.
//
// WAVReader (OpenWAV, NewWAVReader) decodes integer PCM (8-bit unsigned,
// 16, 24 and 32-bit signed), IEEE float (32 and 64-bit) and
// WAVE_FORMAT_EXTENSIBLE files with any number of channels into mono int16,
// picking one channel or averaging all of them; decode.go states the exact
// conversion and rounding rules. It streams through a fixed buffer and
// reports bad input as errors that wrap a sentinel from errors.go and name
// the file and byte offset.
//
// WAVWriter (CreateWAV, WriteWAV) writes 16-bit mono PCM atomically.
//
// NewResampler converts a Source to another rate with a Kaiser-window
// polyphase filter whose alignment and output length match
// scipy.signal.resample_poly.
package audio
