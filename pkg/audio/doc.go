// Package audio reads sound into the analysis pipeline: a streaming WAV
// decoder, an anti-aliasing resampler and the Source interface that every
// producer of mono int16 samples implements.
package audio
