package audio

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
)

// MaxSampleRate is the highest sample rate in Hz this package accepts from
// a file header, a writer or a resampler; the lowest is 1 Hz.
const MaxSampleRate = 384000

// unknownDataSize is the data chunk size that streaming writers put in the
// header when they cannot seek back to patch it; it means "until end of file".
const unknownDataSize = 0xFFFFFFFF

// WAV format tags (RFC 2361 registry).
const (
	tagPCM        = 0x0001
	tagFloat      = 0x0003
	tagExtensible = 0xFFFE
)

// extensibleGUIDTail is bytes 2..15 of the KSDATAFORMAT_SUBTYPE GUIDs for
// PCM and IEEE float; bytes 0..1 hold the plain format tag.
const extensibleGUIDTail = "\x00\x00\x00\x00\x10\x00\x80\x00\x00\xAA\x00\x38\x9B\x71"

// WAVInfo describes the sample format of a WAV file as declared by its fmt
// and data chunks.
type WAVInfo struct {
	// Rate is the sample rate in Hz (sample frames per second).
	Rate int
	// Channels is the number of interleaved channels, at least 1.
	Channels int
	// BitsPerSample is the container size of one sample in bits: 8, 16, 24
	// or 32 for integer PCM, 32 or 64 for IEEE float.
	BitsPerSample int
	// Float is true for IEEE floating-point samples.
	Float bool
	// Frames is the number of sample frames the data chunk declares, or -1
	// when the header gives the size as 0xFFFFFFFF ("read until end of
	// file", as written by streaming writers).
	Frames int64
}

// wavHeader is the parsed header plus what the reader needs to continue.
type wavHeader struct {
	info       WAVInfo
	dataBytes  int64 // declared data size in bytes; -1 if unknown
	dataOffset int64 // byte offset of the first data byte
	blockAlign int   // bytes per sample frame
}

// ParseWAVHeader reads a WAV stream from r up to the first byte of sample
// data and returns the format and the declared data size in bytes (-1 when
// the header says 0xFFFFFFFF, meaning "until end of file"). Unknown chunks
// (LIST, fact, cue and so on) before the data chunk are skipped, including
// the pad byte that follows an odd-sized chunk. The fmt chunk must come
// before the data chunk; a data chunk with no fmt chunk before it is an
// error (ErrNoFormat), as the reader cannot seek back. The RIFF size field
// is not checked, because writers often leave it wrong; the data chunk's
// own size governs. Any error wraps one of the sentinels in errors.go
// or is an I/O error from r. ParseWAVHeader never allocates memory in
// proportion to a size read from the header.
func ParseWAVHeader(r io.Reader) (WAVInfo, int64, error) {
	h, err := parseWAVHeader(r, "")
	if err != nil {
		return WAVInfo{}, 0, err
	}
	return h.info, h.dataBytes, nil
}

// parseWAVHeader is ParseWAVHeader with a file name for error messages.
func parseWAVHeader(r io.Reader, name string) (wavHeader, error) {
	var h wavHeader
	var hdr [12]byte
	if err := readHeaderBytes(r, hdr[:], name, 0, "RIFF header"); err != nil {
		return h, err
	}
	if string(hdr[0:4]) != "RIFF" || string(hdr[8:12]) != "WAVE" {
		return h, failf(name, 0, ErrNotWAV, "starts with %q ... %q, want \"RIFF\" ... \"WAVE\"", hdr[0:4], hdr[8:12])
	}
	off := int64(12)
	haveFmt := false
	for {
		var ch [8]byte
		if err := readHeaderBytes(r, ch[:], name, off, "chunk header"); err != nil {
			if errors.Is(err, ErrTruncatedHeader) && !haveFmt {
				return h, failf(name, off, ErrTruncatedHeader, "file ends before any fmt or data chunk")
			}
			return h, err
		}
		id := string(ch[0:4])
		size := int64(binary.LittleEndian.Uint32(ch[4:8]))
		body := off + 8
		switch id {
		case "fmt ":
			if haveFmt {
				return h, failf(name, off, ErrFormatChunk, "second fmt chunk")
			}
			info, align, err := readFmtChunk(r, size, name, body)
			if err != nil {
				return h, err
			}
			h.info, h.blockAlign, haveFmt = info, align, true
		case "data":
			if !haveFmt {
				return h, failf(name, off, ErrNoFormat, "data chunk found before any fmt chunk")
			}
			h.dataOffset = body
			switch {
			case size == 0:
				return h, failf(name, off, ErrEmptyData, "data chunk declares 0 bytes")
			case size == unknownDataSize:
				h.dataBytes, h.info.Frames = -1, -1
			case size%int64(h.blockAlign) != 0:
				return h, failf(name, off, ErrPartialFrame, "data chunk declares %d bytes, not a multiple of the %d-byte frame", size, h.blockAlign)
			default:
				h.dataBytes, h.info.Frames = size, size/int64(h.blockAlign)
			}
			return h, nil
		}
		if id != "fmt " {
			if err := skipBytes(r, size+size&1, size, name, body, id); err != nil {
				return h, err
			}
		} else if size&1 == 1 {
			if err := skipBytes(r, 1, size, name, body+size, id); err != nil {
				return h, err
			}
		}
		off = body + size + size&1
	}
}

// readHeaderBytes fills p from r; a short read is ErrTruncatedHeader.
func readHeaderBytes(r io.Reader, p []byte, name string, off int64, what string) error {
	n, err := io.ReadFull(r, p)
	if err == nil {
		return nil
	}
	if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
		return failf(name, off+int64(n), ErrTruncatedHeader, "file ends inside the %d-byte %s", len(p), what)
	}
	return wrapIO(name, off+int64(n), err)
}

// skipBytes discards n bytes of chunk id, whose size field says declared
// bytes, from r without buffering them. The error message reports the
// declared size, not n (the rest of the body, or a pad byte).
func skipBytes(r io.Reader, n, declared int64, name string, off int64, id string) error {
	got, err := io.CopyN(io.Discard, r, n)
	if err == nil {
		return nil
	}
	if errors.Is(err, io.EOF) {
		return failf(name, off+got, ErrTruncatedHeader, "chunk %q declares %d bytes but the file ends before the data chunk", id, declared)
	}
	return wrapIO(name, off+got, err)
}

// wrapIO wraps an I/O error of the underlying reader with file and offset.
func wrapIO(name string, off int64, err error) error {
	if name == "" {
		return fmt.Errorf("audio: reading at byte %d: %w", off, err)
	}
	return fmt.Errorf("audio: %s: reading at byte %d: %w", name, off, err)
}

// readFmtChunk reads and validates a fmt chunk of the given declared size
// whose body starts at byte off. It reads at most 40 bytes into a fixed
// array and discards the rest, so a lying size cannot force an allocation.
func readFmtChunk(r io.Reader, size int64, name string, off int64) (WAVInfo, int, error) {
	var b [40]byte
	if size < 16 {
		return WAVInfo{}, 0, failf(name, off, ErrFormatChunk, "fmt chunk is %d bytes, need at least 16", size)
	}
	n := min(size, int64(len(b)))
	if err := readHeaderBytes(r, b[:n], name, off, "fmt chunk"); err != nil {
		return WAVInfo{}, 0, err
	}
	if size > n {
		if err := skipBytes(r, size-n, size, name, off+n, "fmt "); err != nil {
			return WAVInfo{}, 0, err
		}
	}
	tag := binary.LittleEndian.Uint16(b[0:])
	channels := int(binary.LittleEndian.Uint16(b[2:]))
	rate := int64(binary.LittleEndian.Uint32(b[4:]))
	align := int(binary.LittleEndian.Uint16(b[12:]))
	bits := int(binary.LittleEndian.Uint16(b[14:]))

	if tag == tagExtensible {
		if n < 40 || binary.LittleEndian.Uint16(b[16:]) < 22 {
			return WAVInfo{}, 0, failf(name, off, ErrFormatChunk, "WAVE_FORMAT_EXTENSIBLE fmt chunk is %d bytes, need 40 with a 22-byte extension", size)
		}
		valid := int(binary.LittleEndian.Uint16(b[18:]))
		if valid > bits {
			return WAVInfo{}, 0, failf(name, off, ErrFormatChunk, "%d valid bits in a %d-bit container", valid, bits)
		}
		if string(b[26:40]) != extensibleGUIDTail {
			return WAVInfo{}, 0, failf(name, off, ErrUnsupportedFormat, "WAVE_FORMAT_EXTENSIBLE sub-format GUID is neither PCM nor IEEE float")
		}
		tag = binary.LittleEndian.Uint16(b[24:])
	}
	info := WAVInfo{Rate: int(rate), Channels: channels, BitsPerSample: bits}
	switch tag {
	case tagPCM:
		if bits != 8 && bits != 16 && bits != 24 && bits != 32 {
			return WAVInfo{}, 0, failf(name, off, ErrUnsupportedFormat, "%d-bit integer PCM; supported are 8, 16, 24 and 32", bits)
		}
	case tagFloat:
		if bits != 32 && bits != 64 {
			return WAVInfo{}, 0, failf(name, off, ErrUnsupportedFormat, "%d-bit IEEE float; supported are 32 and 64", bits)
		}
		info.Float = true
	default:
		return WAVInfo{}, 0, failf(name, off, ErrUnsupportedFormat, "format tag 0x%04X (%s); only PCM and IEEE float are decoded", tag, formatTagName(tag))
	}
	if channels == 0 {
		return WAVInfo{}, 0, failf(name, off, ErrChannels, "fmt chunk declares 0 channels")
	}
	if rate < 1 || rate > MaxSampleRate {
		return WAVInfo{}, 0, failf(name, off, ErrSampleRate, "%d Hz, want 1..%d", rate, MaxSampleRate)
	}
	if align != channels*bits/8 {
		return WAVInfo{}, 0, failf(name, off, ErrBlockAlign, "block align %d, but %d channels of %d bits need %d", align, channels, bits, channels*bits/8)
	}
	return info, align, nil
}

// formatTagName names a few common non-PCM format tags for error messages.
func formatTagName(tag uint16) string {
	switch tag {
	case 0x0002:
		return "Microsoft ADPCM"
	case 0x0006:
		return "A-law"
	case 0x0007:
		return "mu-law"
	case 0x0011:
		return "IMA ADPCM"
	case 0x0031:
		return "GSM 6.10"
	case 0x0050:
		return "MPEG"
	case 0x0055:
		return "MPEG Layer III"
	default:
		return "compressed or unknown"
	}
}
