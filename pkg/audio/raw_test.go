package audio

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"strings"
	"testing"
	"testing/iotest"
)

var _ Source = (*RawSource)(nil)

// TestRawChannels checks picking and mixing on frames built in Go; the mix
// is the mean rounded half up, floor((sum + C/2) / C) with C/2 exact
// (decode.go).
func TestRawChannels(t *testing.T) {
	left := []int16{0, 1, -1, 32767, -32768, 100, -3}
	right := []int16{0, 2, -2, 32767, -32768, -100, 0}
	third := []int16{5, 0, 0, 32767, -32768, 1, -1}
	cases := []struct {
		name     string
		frames   []int16
		channels int
		channel  int
		want     []int16
	}{
		{"mono", left, 1, 0, left},
		{"mono mixed is itself", left, 1, -1, left},
		{"stereo left", interleave(left, right), 2, 0, left},
		{"stereo right", interleave(left, right), 2, 1, right},
		// (1+2+1)/2 = 2 and (-1-2+1)/2 = -1: ties round up
		{"stereo mix", interleave(left, right), 2, -1, []int16{0, 2, -1, 32767, -32768, 0, -1}},
		{"three channels, last", interleave(left, right, third), 3, 2, third},
		// floor((5+1.5)/3)=2, floor((3+1.5)/3)=1, floor((-3+1.5)/3)=-1, floor((1+1.5)/3)=0, floor((-4+1.5)/3)=-1
		{"three channels mixed", interleave(left, right, third), 3, -1, []int16{2, 1, -1, 32767, -32768, 0, -1}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for _, chunk := range []int{1, 3, 1000} {
				s, err := NewRawSource(bytes.NewReader(int16Bytes(c.frames)), 16000, c.channels, c.channel)
				if err != nil {
					t.Fatal(err)
				}
				if got := readAll(t, s, chunk); !equalInt16(got, c.want) {
					t.Errorf("reads of %d: got %v, want %v", chunk, got, c.want)
				}
			}
		})
	}
}

// TestRawShortReads feeds the stream through readers that return fewer
// bytes than asked (splitting frames and samples), and through a pipe
// written three bytes at a time.
func TestRawShortReads(t *testing.T) {
	sig := testSignal(5003, 3)
	frames := interleave(sig, testSignal(5003, 4))
	data := int16Bytes(frames)
	pipe := func() io.Reader {
		pr, pw := io.Pipe()
		go func() {
			for i := 0; i < len(data); i += 3 {
				if _, err := pw.Write(data[i:min(i+3, len(data))]); err != nil {
					return
				}
			}
			pw.Close()
		}()
		return pr
	}
	cases := []struct {
		name string
		r    func() io.Reader
	}{
		{"one byte at a time", func() io.Reader { return iotest.OneByteReader(bytes.NewReader(data)) }},
		{"half of each request", func() io.Reader { return iotest.HalfReader(bytes.NewReader(data)) }},
		{"data with EOF", func() io.Reader { return iotest.DataErrReader(bytes.NewReader(data)) }},
		{"pipe, 3-byte writes", pipe},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := NewRawSource(c.r(), 16000, 2, 0)
			if err != nil {
				t.Fatal(err)
			}
			if got := readAll(t, s, 777); !equalInt16(got, sig) {
				t.Errorf("got %d samples, differing from the %d written", len(got), len(sig))
			}
		})
	}
}

// stallReader returns (0, nil) forever: a broken reader.
type stallReader struct{}

func (stallReader) Read([]byte) (int, error) { return 0, nil }

// TestRawEnd checks how streams end: the complete frames first, then
// io.EOF or an error that names what was wrong and where.
func TestRawEnd(t *testing.T) {
	boom := errors.New("device unplugged")
	ten := int16Bytes(interleave(testSignal(10, 5), testSignal(10, 6)))
	cases := []struct {
		name     string
		r        io.Reader
		wantN    int
		wantErr  error
		wantText string
	}{
		{"clean end", bytes.NewReader(ten), 10, nil, ""},
		{"empty stream", bytes.NewReader(nil), 0, nil, ""},
		{"three trailing bytes", bytes.NewReader(append(ten[:40:40], 1, 2, 3)), 10, ErrTruncatedData,
			"audio: raw PCM stream: truncated data at byte 40: stream ends 3 bytes into a 4-byte frame (2 channels of 16-bit samples)"},
		{"one byte only", bytes.NewReader([]byte{9}), 0, ErrTruncatedData, "truncated data at byte 0: stream ends 1 bytes into a 4-byte frame"},
		{"reader error", &failingReader{r: bytes.NewReader(ten[:22]), err: boom}, 5, boom, "audio: raw PCM stream: reading at byte 22: device unplugged"},
		{"reader makes no progress", stallReader{}, 0, io.ErrNoProgress, "multiple Read calls return no data or error"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := NewRawSource(c.r, 8000, 2, 1)
			if err != nil {
				t.Fatal(err)
			}
			got, err := readAllErr(s, 4)
			if len(got) != c.wantN {
				t.Errorf("%d samples before the end, want %d", len(got), c.wantN)
			}
			if !errors.Is(err, c.wantErr) || (c.wantErr == nil) != (err == nil) {
				t.Fatalf("error %v, want %v", err, c.wantErr)
			}
			if err != nil && !strings.Contains(err.Error(), c.wantText) {
				t.Errorf("error %q does not contain %q", err, c.wantText)
			}
			if err != nil {
				if _, again := s.Read(make([]int16, 4)); again != err {
					t.Errorf("error not sticky: then %v", again)
				}
			}
		})
	}
}

func TestRawArguments(t *testing.T) {
	cases := []struct {
		name                    string
		rate, channels, channel int
		want                    error
		text                    string
	}{
		{"fine", 16000, 2, -1, nil, ""},
		{"zero rate", 0, 1, 0, ErrSampleRate, "0 Hz, want 1..384000"},
		{"rate too high", MaxSampleRate + 1, 1, 0, ErrSampleRate, "384001 Hz"},
		{"zero channels", 16000, 0, 0, ErrChannels, "0 channels, want 1..1024"},
		{"too many channels", 16000, MaxRawChannels + 1, 0, ErrChannels, "1025 channels"},
		{"channel too high", 16000, 2, 2, ErrChannel, "channel 2 requested but the stream has 2 (0..1); use -1 to mix"},
		{"channel below -1", 16000, 2, -2, ErrChannel, "channel -2"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := NewRawSource(bytes.NewReader(nil), c.rate, c.channels, c.channel)
			if !errors.Is(err, c.want) || (c.want == nil) != (err == nil) {
				t.Fatalf("error %v, want %v", err, c.want)
			}
			if err != nil && !strings.Contains(err.Error(), c.text) {
				t.Errorf("error %q does not contain %q", err, c.text)
			}
			if err == nil && s.Rate() != c.rate {
				t.Errorf("Rate %d, want %d", s.Rate(), c.rate)
			}
		})
	}
}

// loopReader serves the same bytes forever.
type loopReader struct {
	data []byte
	off  int
}

func (l *loopReader) Read(p []byte) (int, error) {
	n := copy(p, l.data[l.off:])
	l.off = (l.off + n) % len(l.data)
	return n, nil
}

func TestRawReadDoesNotAllocate(t *testing.T) {
	for _, channel := range []int{0, -1} {
		s, err := NewRawSource(&loopReader{data: int16Bytes(testSignal(3001, 7))}, 16000, 1+1, channel)
		if err != nil {
			t.Fatal(err)
		}
		p := make([]int16, 500)
		if a := testing.AllocsPerRun(100, func() { s.Read(p) }); a != 0 {
			t.Errorf("channel %d: %v allocations per Read", channel, a)
		}
	}
}

func BenchmarkRawRead(b *testing.B) {
	for _, c := range []struct {
		name              string
		channels, channel int
	}{{"mono", 1, 0}, {"stereo-pick", 2, 1}, {"stereo-mix", 2, -1}} {
		b.Run(c.name, func(b *testing.B) {
			s, err := NewRawSource(&loopReader{data: int16Bytes(testSignal(16000, 8))}, 16000, c.channels, c.channel)
			if err != nil {
				b.Fatal(err)
			}
			p := make([]int16, 1024)
			b.ReportAllocs()
			b.SetBytes(int64(2 * c.channels * len(p)))
			for b.Loop() {
				s.Read(p)
			}
		})
	}
}

// Stereo from a recorder pipe (here a byte slice): keep the right channel,
// the contact microphone on the P-492B pump casing.
func ExampleNewRawSource() {
	pcm := []byte{
		0x01, 0x00, 0xe8, 0x03, // frame 0: left 1, right 1000
		0x02, 0x00, 0x18, 0xfc, // frame 1: left 2, right -1000
		0x03, 0x00, // half a frame: the recorder was cut off
	}
	src, err := NewRawSource(bytes.NewReader(pcm), 16000, 2, 1)
	if err != nil {
		panic(err)
	}
	p := make([]int16, 8)
	for {
		n, err := src.Read(p)
		if n > 0 {
			fmt.Println(p[:n])
		}
		if err != nil {
			fmt.Println(err)
			break
		}
	}
	// Output:
	// [1000 -1000]
	// audio: raw PCM stream: truncated data at byte 8: stream ends 2 bytes into a 4-byte frame (2 channels of 16-bit samples); check the channel count or whether the recorder was cut off
}
