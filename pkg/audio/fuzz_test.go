package audio

import (
	"bytes"
	"errors"
	"io"
	"testing"
)

// sentinels lists every bad-input error the WAV reader may wrap.
var sentinels = []error{
	ErrNotWAV, ErrTruncatedHeader, ErrNoFormat, ErrFormatChunk, ErrUnsupportedFormat,
	ErrBlockAlign, ErrSampleRate, ErrChannels, ErrChannel, ErrEmptyData,
	ErrPartialFrame, ErrTruncatedData,
}

func wrapsSentinel(err error) bool {
	for _, s := range sentinels {
		if errors.Is(err, s) {
			return true
		}
	}
	return false
}

// FuzzParseWAV feeds arbitrary bytes to the header parser and the reader.
// Neither may panic, every error must wrap a sentinel, a parsed header must
// be self-consistent, reading must terminate, and the reader's buffer must
// stay within 64 KiB whatever sizes the header claims.
func FuzzParseWAV(f *testing.F) {
	data := int16Bytes([]int16{1, -2, 3, -4, 5, -6, 7, -8})
	fmt16 := chunk("fmt ", fmtPlain(tagPCM, 1, 8000, 16))
	for _, seed := range [][]byte{
		simpleWAV([]int16{1, 2, 3}),
		riff(chunk("fmt ", fmtPlain(tagPCM, 2, 44100, 24)), chunk("data", data[:12])),
		riff(chunk("fmt ", fmtPlain(tagPCM, 1, 8000, 8)), chunk("data", data[:3])),
		riff(chunk("fmt ", fmtPlain(tagFloat, 2, 48000, 32)), chunk("fact", le32(2)), chunk("data", data[:16])),
		riff(chunk("fmt ", fmtExt(tagPCM, 4, 16000, 32, 24)), chunk("data", data[:16])),
		riff(chunk("fmt ", fmtExt(tagFloat, 1, 16000, 64, 64)), chunk("data", data[:16])),
		riff(chunk("LIST", []byte("INFOabc")), fmt16, chunk("data", data)),
		riff(fmt16, chunkSized("data", 0xFFFFFFFF, data[:5])),
		riff(fmt16, chunkSized("data", 0x7FFFFFF0, data)),
		riff(chunkSized("fmt ", 0xFFFFFFF0, fmtPlain(tagPCM, 1, 8000, 16))),
		riff(chunkSized("LIST", 0xFFFFFFFF, nil)),
		riff(chunk("fmt ", fmtBody(tagPCM, 0xFFFF, 8000, 32, 0xFFFF)), chunk("data", data)),
		riff(chunk("fmt ", fmtBody(0x55, 1, 8000, 0, 1)), chunk("data", data)),
		riff(chunk("data", data), fmt16),
		[]byte("RIFF\x00\x00\x00\x00WAVE"),
		nil,
	} {
		f.Add(seed)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		info, n, err := ParseWAVHeader(bytes.NewReader(b))
		if err != nil {
			if !wrapsSentinel(err) {
				t.Fatalf("error wraps no sentinel: %v", err)
			}
		} else {
			align := int64(info.Channels * info.BitsPerSample / 8)
			if info.Channels < 1 || info.Rate < 1 || info.Rate > MaxSampleRate || align < 1 ||
				(n != -1 && (n <= 0 || n%align != 0 || info.Frames != n/align)) {
				t.Fatalf("inconsistent header %+v with %d data bytes", info, n)
			}
		}
		for _, ch := range []int{-1, 0} {
			w, err := NewWAVReader(bytes.NewReader(b), "fuzz.wav", ch)
			if err != nil {
				if !wrapsSentinel(err) {
					t.Fatalf("error wraps no sentinel: %v", err)
				}
				continue
			}
			if cap(w.buf) > 1<<16 {
				t.Fatalf("buffer of %d bytes", cap(w.buf))
			}
			buf := make([]int16, 100)
			total := 0
			for i := 0; ; i++ {
				k, err := w.Read(buf)
				total += k
				if errors.Is(err, io.EOF) {
					break
				}
				if err != nil {
					if !errors.Is(err, ErrTruncatedData) {
						t.Fatalf("read error %v", err)
					}
					break
				}
				if k == 0 || i > len(b) {
					t.Fatalf("no progress after %d reads", i)
				}
			}
			if total > len(b) {
				t.Fatalf("%d samples from %d bytes", total, len(b))
			}
		}
	})
}
