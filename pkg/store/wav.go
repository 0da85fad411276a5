package store

import (
	"encoding/binary"
	"fmt"
	"time"
)

// wavInfo is what checkWAV reads from a WAV file's header.
type wavInfo struct {
	sampleRate int
	duration   time.Duration
}

// checkWAV checks that b is a complete RIFF/WAVE file, so it can be served
// as-is, and returns its sample rate and duration. It walks the chunk list
// (Microsoft/IBM RIFF layout: 4-byte id, little-endian 4-byte size, data,
// pad byte if the size is odd) and needs a fmt chunk of at least 16 bytes
// and a data chunk that fits the file.
func checkWAV(b []byte) (wavInfo, error) {
	le := binary.LittleEndian
	if len(b) < 12 || string(b[0:4]) != "RIFF" || string(b[8:12]) != "WAVE" {
		return wavInfo{}, fmt.Errorf("%w: clip: WAV bytes do not start with a RIFF/WAVE header", ErrInvalid)
	}
	if riff := int64(le.Uint32(b[4:8])); riff+8 != int64(len(b)) {
		return wavInfo{}, fmt.Errorf("%w: clip: RIFF size field says %d bytes, the clip has %d", ErrInvalid, riff+8, len(b))
	}
	var rate, align, data int64 = 0, 0, -1
	for p := 12; p+8 <= len(b); {
		id, size := string(b[p:p+4]), int64(le.Uint32(b[p+4:p+8]))
		body := int64(p + 8)
		if body+size > int64(len(b)) {
			return wavInfo{}, fmt.Errorf("%w: clip: chunk %q at byte %d runs past the end of the file", ErrInvalid, id, p)
		}
		switch id {
		case "fmt ":
			if size < 16 {
				return wavInfo{}, fmt.Errorf("%w: clip: fmt chunk is %d bytes, need 16", ErrInvalid, size)
			}
			rate = int64(le.Uint32(b[body+4:]))
			align = int64(le.Uint16(b[body+12:]))
		case "data":
			data = size
		}
		p = int(body + size + size&1)
	}
	switch {
	case rate == 0 || align == 0:
		return wavInfo{}, fmt.Errorf("%w: clip: no fmt chunk with a sample rate and block align", ErrInvalid)
	case data <= 0:
		return wavInfo{}, fmt.Errorf("%w: clip: no data chunk, or an empty one", ErrInvalid)
	}
	frames := data / align
	return wavInfo{sampleRate: int(rate), duration: time.Duration(frames * int64(time.Second) / rate)}, nil
}
