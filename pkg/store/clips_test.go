package store

import (
	"bytes"
	"encoding/binary"
	"errors"
	"strings"
	"testing"
	"time"
)

func TestClipRoundTrip(t *testing.T) {
	s := mustOpen(t, testOptions())
	seq, err := s.AppendEvent(eventAt(t0, 0))
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name     string
		clip     Clip
		rate     int
		duration time.Duration
	}{
		{"10 s at 16 kHz, metadata derived", Clip{EventSeq: seq, Start: t0, Asset: "P-492B", WAV: makeWAV(16000, 160000)}, 16000, 10 * time.Second},
		{"rate and duration given and agreeing", Clip{Start: t0.Add(time.Minute), SampleRate: 8000, Duration: 250 * time.Millisecond,
			WAV: makeWAV(8000, 2000)}, 8000, 250 * time.Millisecond},
		{"larger than a page", Clip{Start: t0.Add(2 * time.Minute), WAV: makeWAV(48000, 48000)}, 48000, time.Second},
	}
	for i, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			id, err := s.PutClip(c.clip)
			if err != nil {
				t.Fatal(err)
			}
			if id != uint64(i+1) {
				t.Errorf("id %d, want %d", id, i+1)
			}
			got, err := s.Clip(id)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.Equal(got.WAV, c.clip.WAV) {
				t.Error("WAV bytes changed")
			}
			if got.SampleRate != c.rate || got.Duration != c.duration || got.EventSeq != c.clip.EventSeq ||
				!got.Start.Equal(c.clip.Start) || got.Asset != c.clip.Asset {
				t.Errorf("metadata %+v", got)
			}
		})
	}
	list, err := s.Clips(Range{From: t0.Add(30 * time.Second)})
	if err != nil {
		t.Fatal(err)
	}
	if len(list) != 2 || list[0].ID != 2 || list[1].ID != 3 || list[0].WAV != nil {
		t.Errorf("listing from t0+30s: %+v", list)
	}
	if _, err := s.Clip(42); !errors.Is(err, ErrNotFound) {
		t.Errorf("missing clip: %v, want ErrNotFound", err)
	}
}

func TestClipValidation(t *testing.T) {
	opt := testOptions()
	opt.MaxBytes = 1 << 20
	s := mustOpen(t, opt)
	good := makeWAV(16000, 1600)
	edit := func(f func(b []byte) []byte) []byte { return f(append([]byte(nil), good...)) }
	le := binary.LittleEndian
	cases := []struct {
		name string
		clip Clip
		says string
	}{
		{"zero start", Clip{WAV: good}, "zero time"},
		{"not RIFF", Clip{Start: t0, WAV: []byte("ID3\x03 an mp3 file, not a wav")}, "RIFF/WAVE"},
		{"empty", Clip{Start: t0}, "RIFF/WAVE"},
		{"truncated", Clip{Start: t0, WAV: good[:len(good)-10]}, "RIFF size field"},
		{"data chunk past the end", Clip{Start: t0, WAV: edit(func(b []byte) []byte { le.PutUint32(b[40:], 1<<20); return b })}, `chunk "data"`},
		{"no fmt chunk", Clip{Start: t0, WAV: edit(func(b []byte) []byte { copy(b[12:], "junk"); return b })}, "no fmt chunk"},
		{"empty data chunk", Clip{Start: t0, WAV: makeWAV(16000, 0)}, "no data chunk"},
		{"rate disagrees", Clip{Start: t0, SampleRate: 48000, WAV: good}, "WAV header says 16000 Hz"},
		{"duration disagrees", Clip{Start: t0, Duration: time.Second, WAV: good}, "lasts 100ms"},
		{"unknown event", Clip{Start: t0, EventSeq: 7, WAV: good}, "event 7 does not exist"},
		{"over a quarter of the cap", Clip{Start: t0, WAV: makeWAV(16000, 140000)}, "at most 262144"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := s.PutClip(c.clip)
			if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), c.says) {
				t.Errorf("error %v, want ErrInvalid mentioning %q", err, c.says)
			}
		})
	}
	if st := mustStats(t, s); st.Clips != 0 {
		t.Errorf("%d clips stored by refused calls", st.Clips)
	}
	// A refused clip does not use up an id.
	if id, err := s.PutClip(Clip{Start: t0, WAV: good}); err != nil || id != 1 {
		t.Errorf("first good clip: id %d, %v; want 1", id, err)
	}
}

func TestCheckWAVOddChunk(t *testing.T) {
	// A LIST chunk of odd size before data, padded to even as RIFF requires.
	w := makeWAV(8000, 80)
	list := []byte("LIST\x03\x00\x00\x00abc\x00")
	b := append(append(append([]byte(nil), w[:36]...), list...), w[36:]...)
	binary.LittleEndian.PutUint32(b[4:], uint32(len(b)-8))
	info, err := checkWAV(b)
	if err != nil || info.sampleRate != 8000 || info.duration != 10*time.Millisecond {
		t.Errorf("checkWAV = %+v, %v", info, err)
	}
}
