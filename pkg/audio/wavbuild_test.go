package audio

import (
	"bytes"
	"encoding/binary"
)

// Hand-built WAV files for tests. The layout follows the Microsoft RIFF/WAVE
// specification (Multimedia Programming Interface and Data Specifications
// 1.0, 1991) and the WAVE_FORMAT_EXTENSIBLE addendum (KSDATAFORMAT GUIDs),
// from memory; TestWAVReaderAgainstSox checks the same layouts on files
// written by sox.

// fmtBody returns a 16-byte fmt chunk body; align is written as given.
func fmtBody(tag uint16, channels, rate, bits, align int) []byte {
	b := make([]byte, 16)
	binary.LittleEndian.PutUint16(b[0:], tag)
	binary.LittleEndian.PutUint16(b[2:], uint16(channels))
	binary.LittleEndian.PutUint32(b[4:], uint32(rate))
	binary.LittleEndian.PutUint32(b[8:], uint32(rate*align))
	binary.LittleEndian.PutUint16(b[12:], uint16(align))
	binary.LittleEndian.PutUint16(b[14:], uint16(bits))
	return b
}

// fmtPlain returns a consistent 16-byte fmt body.
func fmtPlain(tag uint16, channels, rate, bits int) []byte {
	return fmtBody(tag, channels, rate, bits, channels*bits/8)
}

// fmtExt returns a 40-byte WAVE_FORMAT_EXTENSIBLE fmt body with the given
// sub-format tag (1 = PCM, 3 = float) and valid bits.
func fmtExt(sub uint16, channels, rate, bits, valid int) []byte {
	b := fmtPlain(tagExtensible, channels, rate, bits)
	ext := make([]byte, 24)
	binary.LittleEndian.PutUint16(ext[0:], 22)
	binary.LittleEndian.PutUint16(ext[2:], uint16(valid))
	binary.LittleEndian.PutUint32(ext[4:], 0)
	binary.LittleEndian.PutUint16(ext[8:], sub)
	copy(ext[10:], extensibleGUIDTail)
	return append(b, ext...)
}

// chunk returns a RIFF chunk with a pad byte after an odd-sized body.
func chunk(id string, body []byte) []byte {
	return chunkSized(id, uint32(len(body)), body)
}

// chunkSized returns a chunk whose size field says size, whatever the body.
func chunkSized(id string, size uint32, body []byte) []byte {
	var b bytes.Buffer
	b.WriteString(id)
	binary.Write(&b, binary.LittleEndian, size)
	b.Write(body)
	if len(body)%2 == 1 {
		b.WriteByte(0)
	}
	return b.Bytes()
}

// riff wraps chunks in a RIFF/WAVE header with a correct RIFF size.
func riff(chunks ...[]byte) []byte {
	var body bytes.Buffer
	body.WriteString("WAVE")
	for _, c := range chunks {
		body.Write(c)
	}
	return append(chunkSized("RIFF", uint32(body.Len()), nil), body.Bytes()...)
}

// simpleWAV returns a mono 16-bit 8 kHz file holding samples.
func simpleWAV(samples []int16) []byte {
	return riff(chunk("fmt ", fmtPlain(tagPCM, 1, 8000, 16)), chunk("data", int16Bytes(samples)))
}
