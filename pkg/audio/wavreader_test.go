package audio

import (
	"bytes"
	"encoding/binary"
	"errors"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

func le24(v int32) []byte { return []byte{byte(v), byte(v >> 8), byte(v >> 16)} }
func le32(v uint32) []byte {
	return binary.LittleEndian.AppendUint32(nil, v)
}
func f32(x float32) []byte { return le32(math.Float32bits(x)) }
func f64(x float64) []byte { return binary.LittleEndian.AppendUint64(nil, math.Float64bits(x)) }

func cat(parts ...[]byte) []byte { return bytes.Join(parts, nil) }

// TestWAVDecodeRules checks the conversion rules documented in decode.go on
// worked examples (hand-computed from those rules).
func TestWAVDecodeRules(t *testing.T) {
	cases := []struct {
		name    string
		fmt     []byte
		data    []byte
		channel int
		want    []int16
	}{
		{"8-bit unsigned", fmtPlain(tagPCM, 1, 8000, 8), []byte{0, 128, 255, 1, 129},
			0, []int16{-32768, 0, 32512, -32512, 256}},
		{"16-bit", fmtPlain(tagPCM, 1, 8000, 16), int16Bytes([]int16{-32768, -1, 0, 1, 32767}),
			0, []int16{-32768, -1, 0, 1, 32767}},
		// 24-bit v/256 rounded half up: 128/256 = 0.5 -> 1; -128/256 = -0.5 -> 0;
		// 383/256 = 1.496 -> 1; -129/256 -> -1; 0x7FFFFF -> 32768 clipped to 32767.
		{"24-bit rounding", fmtPlain(tagPCM, 1, 8000, 24),
			cat(le24(128), le24(-128), le24(383), le24(-129), le24(0x7FFFFF), le24(-0x800000), le24(256*1234)),
			0, []int16{1, 0, 1, -1, 32767, -32768, 1234}},
		{"32-bit rounding", fmtPlain(tagPCM, 1, 8000, 32),
			cat(le32(0x8000), le32(uint32(0xFFFF8000)), le32(0x7FFFFFFF), le32(0x80000000), le32(0x12345678), le32(0x1234C000)),
			0, []int16{1, 0, 32767, -32768, 0x1234, 0x1235}},
		// float: floor(x*32768 + 0.5), clipped; NaN -> 0.
		{"float32", fmtPlain(tagFloat, 1, 8000, 32),
			cat(f32(0.5), f32(-0.5), f32(1), f32(-1), f32(1.5), f32(-2), f32(float32(math.NaN())), f32(-1.0/65536), f32(1.0/65536)),
			0, []int16{16384, -16384, 32767, -32768, 32767, -32768, 0, 0, 1}},
		{"float64", fmtPlain(tagFloat, 1, 8000, 64), cat(f64(0.25), f64(-0.75), f64(math.Inf(1))),
			0, []int16{8192, -24576, 32767}},
		// Mix: mean rounded half up: (1+2)/2 = 1.5 -> 2; (-1-2)/2 = -1.5 -> -1.
		{"stereo 16-bit mix", fmtPlain(tagPCM, 2, 8000, 16), int16Bytes([]int16{1, 2, -1, -2, 32767, 32767, -32768, 32767}),
			-1, []int16{2, -1, 32767, 0}},
		{"stereo 16-bit right", fmtPlain(tagPCM, 2, 8000, 16), int16Bytes([]int16{1, 2, -1, -2}),
			1, []int16{2, -2}},
		{"3-channel 8-bit mix", fmtPlain(tagPCM, 3, 8000, 8), []byte{129, 129, 128, 0, 0, 0},
			-1, []int16{171, -32768}}, // 512/3 = 170.67 -> 171
		{"stereo float mix", fmtPlain(tagFloat, 2, 8000, 32), cat(f32(0.5), f32(0.25), f32(1), f32(1)),
			-1, []int16{12288, 32767}},
		{"extensible 24-bit in 32", fmtExt(tagPCM, 1, 8000, 32, 24), cat(le32(0x12348000), le32(0xFFFFFF00)),
			0, []int16{0x1235, 0}},
		{"extensible float", fmtExt(tagFloat, 2, 8000, 32, 32), cat(f32(0.1), f32(-0.5)),
			1, []int16{-16384}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w, err := NewWAVReader(bytes.NewReader(riff(chunk("fmt ", c.fmt), chunk("data", c.data))), "case.wav", c.channel)
			if err != nil {
				t.Fatal(err)
			}
			if got := readAll(t, w, 3); !slices.Equal(got, c.want) {
				t.Errorf("got %v, want %v", got, c.want)
			}
		})
	}
}

// TestWAVChunkLayout checks chunk skipping: LIST before fmt with an odd
// size and pad byte, a chunk between fmt and data, trailing chunks, an
// odd-sized fmt chunk and the 0xFFFFFFFF "until end of file" data size.
func TestWAVChunkLayout(t *testing.T) {
	samples := []int16{10, -20, 30, -40, 50}
	data := int16Bytes(samples)
	fmt16 := fmtPlain(tagPCM, 1, 22050, 16)
	cases := []struct {
		name   string
		file   []byte
		frames int64
	}{
		{"plain", riff(chunk("fmt ", fmt16), chunk("data", data)), 5},
		{"LIST before fmt, odd size", riff(chunk("LIST", []byte("INFOICMT\x03\x00\x00\x00ab\x00")), chunk("fmt ", fmt16), chunk("data", data)), 5},
		{"fact between fmt and data", riff(chunk("fmt ", fmt16), chunk("fact", le32(5)), chunk("junk", []byte{1, 2, 3}), chunk("data", data)), 5},
		{"trailing chunk after data", riff(chunk("fmt ", fmt16), chunk("data", data), chunk("LIST", []byte("garbage!"))), 5},
		{"18-byte fmt with cbSize", riff(chunk("fmt ", append(slices.Clone(fmt16), 0, 0)), chunk("data", data)), 5},
		{"odd 17-byte fmt", riff(chunk("fmt ", append(slices.Clone(fmt16), 0)), chunk("data", data)), 5},
		{"unknown data size", riff(chunk("fmt ", fmt16), chunkSized("data", 0xFFFFFFFF, data)), -1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			info, n, err := ParseWAVHeader(bytes.NewReader(c.file))
			if err != nil {
				t.Fatal(err)
			}
			want := WAVInfo{Rate: 22050, Channels: 1, BitsPerSample: 16, Frames: c.frames}
			if info != want {
				t.Errorf("info %+v, want %+v", info, want)
			}
			if c.frames >= 0 && n != 2*c.frames || c.frames < 0 && n != -1 {
				t.Errorf("data bytes %d", n)
			}
			w, err := NewWAVReader(bytes.NewReader(c.file), "layout.wav", 0)
			if err != nil {
				t.Fatal(err)
			}
			if got := readAll(t, w, 2); !slices.Equal(got, samples) {
				t.Errorf("samples %v, want %v", got, samples)
			}
		})
	}
}

// TestWAVErrors checks that each kind of bad input yields its sentinel and
// a message naming the file.
func TestWAVErrors(t *testing.T) {
	data := int16Bytes([]int16{1, 2, 3, 4})
	fmt16 := chunk("fmt ", fmtPlain(tagPCM, 1, 8000, 16))
	good := riff(fmt16, chunk("data", data))
	badGUID := fmtExt(tagPCM, 1, 8000, 16, 16)
	badGUID[30] ^= 0xFF
	cases := []struct {
		name    string
		file    []byte
		channel int
		want    error
		inMsg   string // also required in the message
	}{
		{"empty file", nil, 0, ErrTruncatedHeader, "at byte 0"},
		{"short RIFF header", good[:7], 0, ErrTruncatedHeader, "at byte 7"},
		{"not RIFF", append([]byte("RIFX"), good[4:]...), 0, ErrNotWAV, "RIFX"},
		{"not WAVE", append(append(slices.Clone(good[:8]), "AVI "...), good[12:]...), 0, ErrNotWAV, "AVI"},
		{"no chunks", good[:12], 0, ErrTruncatedHeader, "before any fmt"},
		{"ends after fmt", riff(fmt16), 0, ErrTruncatedHeader, "at byte 36"},
		{"fmt cut short", good[:30], 0, ErrTruncatedHeader, "fmt chunk"},
		{"data before fmt", riff(chunk("data", data), fmt16), 0, ErrNoFormat, ""},
		{"fmt too short", riff(chunk("fmt ", fmtPlain(tagPCM, 1, 8000, 16)[:14]), chunk("data", data)), 0, ErrFormatChunk, "14 bytes"},
		{"two fmt chunks", riff(fmt16, fmt16, chunk("data", data)), 0, ErrFormatChunk, "second"},
		{"extensible too short", riff(chunk("fmt ", fmtExt(tagPCM, 1, 8000, 16, 16)[:18]), chunk("data", data)), 0, ErrFormatChunk, "EXTENSIBLE"},
		{"valid bits above container", riff(chunk("fmt ", fmtExt(tagPCM, 1, 8000, 16, 24)), chunk("data", data)), 0, ErrFormatChunk, "valid bits"},
		{"extensible unknown GUID", riff(chunk("fmt ", badGUID), chunk("data", data)), 0, ErrUnsupportedFormat, "GUID"},
		{"ADPCM", riff(chunk("fmt ", fmtBody(2, 1, 8000, 4, 256)), chunk("data", data)), 0, ErrUnsupportedFormat, "0x0002"},
		{"A-law", riff(chunk("fmt ", fmtPlain(6, 1, 8000, 8)), chunk("data", data)), 0, ErrUnsupportedFormat, "A-law"},
		{"mu-law", riff(chunk("fmt ", fmtPlain(7, 1, 8000, 8)), chunk("data", data)), 0, ErrUnsupportedFormat, "mu-law"},
		{"MP3", riff(chunk("fmt ", fmtBody(0x55, 1, 8000, 0, 1)), chunk("data", data)), 0, ErrUnsupportedFormat, "0x0055"},
		{"extensible ADPCM", riff(chunk("fmt ", fmtExt(2, 1, 8000, 16, 16)), chunk("data", data)), 0, ErrUnsupportedFormat, "0x0002"},
		{"12-bit PCM", riff(chunk("fmt ", fmtBody(tagPCM, 1, 8000, 12, 2)), chunk("data", data)), 0, ErrUnsupportedFormat, "12-bit"},
		{"16-bit float", riff(chunk("fmt ", fmtPlain(tagFloat, 1, 8000, 16)), chunk("data", data)), 0, ErrUnsupportedFormat, "16-bit"},
		{"zero channels", riff(chunk("fmt ", fmtBody(tagPCM, 0, 8000, 16, 2)), chunk("data", data)), 0, ErrChannels, ""},
		{"zero rate", riff(chunk("fmt ", fmtPlain(tagPCM, 1, 0, 16)), chunk("data", data)), 0, ErrSampleRate, "0 Hz"},
		{"rate too high", riff(chunk("fmt ", fmtPlain(tagPCM, 1, 384001, 16)), chunk("data", data)), 0, ErrSampleRate, "384001"},
		{"block align too big", riff(chunk("fmt ", fmtBody(tagPCM, 1, 8000, 16, 4)), chunk("data", data)), 0, ErrBlockAlign, "block align 4"},
		{"block align zero", riff(chunk("fmt ", fmtBody(tagPCM, 2, 8000, 16, 0)), chunk("data", data)), 0, ErrBlockAlign, ""},
		{"empty data", riff(fmt16, chunk("data", nil)), 0, ErrEmptyData, ""},
		{"odd data size", riff(fmt16, chunk("data", data[:7])), 0, ErrPartialFrame, "7 bytes"},
		{"channel too high", good, 1, ErrChannel, "channel 1"},
		{"channel negative", good, -2, ErrChannel, "channel -2"},
		{"LIST larger than file", riff(fmt16, chunkSized("LIST", 1000, []byte("ab"))), 0, ErrTruncatedHeader, "LIST"},
		// The message reports the size field, not the bytes left to skip
		// (fmt: size minus the 40 bytes read; odd LIST: size plus pad).
		{"fmt larger than file", riff(chunkSized("fmt ", 0xFFFFFFF0, fmtExt(tagPCM, 1, 8000, 16, 16))), 0, ErrTruncatedHeader, `chunk "fmt " declares 4294967280 bytes`},
		{"odd LIST larger than file", riff(fmt16, chunkSized("LIST", 7, []byte("ab"))), 0, ErrTruncatedHeader, `chunk "LIST" declares 7 bytes`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewWAVReader(bytes.NewReader(c.file), "site7/pump-B.wav", c.channel)
			if !errors.Is(err, c.want) {
				t.Fatalf("err = %v, want %v", err, c.want)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, "audio: site7/pump-B.wav: ") || !strings.Contains(msg, c.inMsg) {
				t.Errorf("message %q should start with audio: and the file name and contain %q", msg, c.inMsg)
			}
			if _, _, perr := ParseWAVHeader(bytes.NewReader(c.file)); c.want != ErrChannel && !errors.Is(perr, c.want) {
				t.Errorf("ParseWAVHeader err = %v, want %v", perr, c.want)
			}
		})
	}
}

// TestWAVTruncatedData checks that a file shorter than its data chunk
// declares delivers the complete frames first, then ErrTruncatedData with
// the byte offset.
func TestWAVTruncatedData(t *testing.T) {
	fmtSt := chunk("fmt ", fmtPlain(tagPCM, 2, 8000, 16))
	frames := int16Bytes([]int16{1, 2, 3, 4, 5, 6}) // three stereo frames
	cases := []struct {
		name string
		file []byte
		want []int16
		msg  string
	}{
		// header 12 + fmt chunk 24 + data header 8 = 44 data offset.
		{"whole frames missing", riff(fmtSt, chunkSized("data", 400, frames)), []int16{1, 3, 5}, "at byte 56: data chunk declares 400 bytes but the file ends after 12"},
		{"ends mid-frame", riff(fmtSt, chunkSized("data", 400, frames[:10])), []int16{1, 3}, "at byte 54: data chunk declares 400 bytes but the file ends after 10 of them, in the middle"},
		{"unknown size, ends mid-frame", riff(fmtSt, chunkSized("data", 0xFFFFFFFF, frames[:10])), []int16{1, 3}, "at byte 54: file ends in the middle"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			w, err := NewWAVReader(bytes.NewReader(c.file), "north/skid2.wav", 0)
			if err != nil {
				t.Fatal(err)
			}
			got, err := readAllErr(w, 1000)
			if !slices.Equal(got, c.want) {
				t.Errorf("samples %v, want %v", got, c.want)
			}
			if !errors.Is(err, ErrTruncatedData) {
				t.Fatalf("err = %v, want ErrTruncatedData", err)
			}
			if !strings.Contains(err.Error(), "audio: north/skid2.wav: truncated data "+c.msg) {
				t.Errorf("message %q lacks %q", err, c.msg)
			}
			if _, err2 := w.Read(make([]int16, 4)); !errors.Is(err2, ErrTruncatedData) {
				t.Errorf("error not sticky: %v", err2)
			}
		})
	}
}

// failingReader returns its header bytes and then an I/O error.
type failingReader struct {
	r   io.Reader
	err error
}

func (f *failingReader) Read(p []byte) (int, error) {
	n, err := f.r.Read(p)
	if err == io.EOF {
		return n, f.err
	}
	return n, err
}

func TestWAVPassesIOError(t *testing.T) {
	boom := errors.New("sector not found")
	file := simpleWAV([]int16{1, 2, 3})
	cut := file[:len(file)-2] // data chunk longer than what the reader has
	w, err := NewWAVReader(&failingReader{r: bytes.NewReader(cut), err: boom}, "east.wav", 0)
	if err != nil {
		t.Fatal(err)
	}
	_, err = readAllErr(w, 16)
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), "east.wav") {
		t.Errorf("err = %v, want the reader's error naming the file", err)
	}
}

func TestOpenWAV(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "valve-12.wav")
	want := testSignal(40000, 7)
	if err := os.WriteFile(path, simpleWAV(want), 0o644); err != nil {
		t.Fatal(err)
	}
	w, err := OpenWAV(path, -1)
	if err != nil {
		t.Fatal(err)
	}
	if w.Rate() != 8000 || w.Info().Frames != int64(len(want)) {
		t.Errorf("rate %d frames %d", w.Rate(), w.Info().Frames)
	}
	if got := readAll(t, w, 999); !slices.Equal(got, want) {
		t.Error("samples differ")
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if _, err := w.Read(make([]int16, 1)); !errors.Is(err, os.ErrClosed) {
		t.Errorf("Read after Close: %v", err)
	}
	if _, err := OpenWAV(filepath.Join(dir, "missing.wav"), 0); !errors.Is(err, fs.ErrNotExist) || !strings.Contains(err.Error(), "missing.wav") {
		t.Errorf("missing file: %v", err)
	}
	bad := filepath.Join(dir, "bad.wav")
	os.WriteFile(bad, []byte("RIFF...."), 0o644)
	if _, err := OpenWAV(bad, 0); !errors.Is(err, ErrTruncatedHeader) || !strings.Contains(err.Error(), bad) {
		t.Errorf("bad file: %v", err)
	}
}

func TestWAVReadDoesNotAllocate(t *testing.T) {
	file := riff(chunk("fmt ", fmtPlain(tagPCM, 2, 8000, 24)), chunk("data", make([]byte, 6*100000)))
	for _, ch := range []int{0, -1} {
		w, err := NewWAVReader(bytes.NewReader(file), "x.wav", ch)
		if err != nil {
			t.Fatal(err)
		}
		buf := make([]int16, 256)
		if a := testing.AllocsPerRun(100, func() { w.Read(buf) }); a != 0 {
			t.Errorf("channel %d: %v allocations per Read", ch, a)
		}
	}
}
