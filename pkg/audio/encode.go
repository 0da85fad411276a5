package audio

import "encoding/binary"

// putWAVHeader writes the canonical 44-byte header of a 16-bit mono PCM WAV
// file with dataBytes of samples into h.
func putWAVHeader(h []byte, rate int, dataBytes uint32) {
	copy(h[0:], "RIFF")
	binary.LittleEndian.PutUint32(h[4:], dataBytes+wavHeaderBytes-8)
	copy(h[8:], "WAVEfmt ")
	binary.LittleEndian.PutUint32(h[16:], 16)
	binary.LittleEndian.PutUint16(h[20:], tagPCM)
	binary.LittleEndian.PutUint16(h[22:], 1)
	binary.LittleEndian.PutUint32(h[24:], uint32(rate))
	binary.LittleEndian.PutUint32(h[28:], uint32(rate*2))
	binary.LittleEndian.PutUint16(h[32:], 2)
	binary.LittleEndian.PutUint16(h[34:], 16)
	copy(h[36:], "data")
	binary.LittleEndian.PutUint32(h[40:], dataBytes)
}

// EncodeWAV returns a complete 16-bit mono PCM WAV file holding samples at
// rate Hz, for clips kept in memory or in a database rather than on disk.
// It panics if the samples exceed the 4 GiB RIFF limit (programmer misuse:
// clips are seconds long).
func EncodeWAV(rate int, samples []int16) []byte {
	if int64(len(samples)) > maxWAVSamples {
		panic("audio: EncodeWAV: too many samples for one WAV file")
	}
	b := make([]byte, wavHeaderBytes+2*len(samples))
	putWAVHeader(b, rate, uint32(2*len(samples)))
	for i, v := range samples {
		binary.LittleEndian.PutUint16(b[wavHeaderBytes+2*i:], uint16(v))
	}
	return b
}
