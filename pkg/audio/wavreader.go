package audio

import (
	"errors"
	"fmt"
	"io"
	"os"
)

// wavBufferBytes is the size of a WAVReader's raw byte buffer; one Read
// decodes at most this many bytes (but always at least one frame).
const wavBufferBytes = 16384

// WAVReader streams a WAV file as mono int16 samples. It implements Source.
// It holds only a fixed buffer of at most 64 KiB, never the whole file.
//
// End of data: after the last declared frame Read returns io.EOF. If the
// file ends before the data chunk's declared size, Read first delivers
// every complete frame that was present and then returns an error wrapping
// ErrTruncatedData that names the file and the byte offset where the data
// stopped (also when the file stops in the middle of a frame). If the
// header declares the size as 0xFFFFFFFF, data runs to end of file and only
// a trailing partial frame is an error. Bytes after the declared data
// (trailing chunks) are never read.
type WAVReader struct {
	name      string
	r         io.Reader
	closer    io.Closer // the file OpenWAV opened; nil for NewWAVReader
	info      WAVInfo
	dec       sampleDecoder
	align     int   // bytes per frame
	declared  int64 // declared data bytes; -1 if unknown
	remaining int64 // data bytes still to read; -1 if unknown
	offset    int64 // file offset of the next data byte
	buf       []byte
	err       error // sticky end state: io.EOF or a failure
}

// OpenWAV opens the WAV file at path for streaming. channel selects one
// 0-based channel; -1 mixes all channels by averaging (see the conversion
// rules in decode.go). The caller must Close the reader.
func OpenWAV(path string, channel int) (*WAVReader, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("audio: %w", err)
	}
	w, err := NewWAVReader(f, path, channel)
	if err != nil {
		f.Close()
		return nil, err
	}
	w.closer = f
	return w, nil
}

// NewWAVReader parses the WAV header from r and returns a reader positioned
// at the first sample. name is used only in error messages. channel is a
// 0-based channel index or -1 to mix all channels. Close does not close r.
func NewWAVReader(r io.Reader, name string, channel int) (*WAVReader, error) {
	h, err := parseWAVHeader(r, name)
	if err != nil {
		return nil, err
	}
	if channel < -1 || channel >= h.info.Channels {
		return nil, failf(name, -1, ErrChannel, "channel %d requested but the file has %d (0..%d); use -1 to mix", channel, h.info.Channels, h.info.Channels-1)
	}
	size := max(wavBufferBytes/h.blockAlign, 1) * h.blockAlign
	return &WAVReader{
		name:  name,
		r:     r,
		info:  h.info,
		align: h.blockAlign,
		dec: sampleDecoder{
			sampleBytes: h.info.BitsPerSample / 8,
			channels:    h.info.Channels,
			channel:     channel,
			float:       h.info.Float,
		},
		declared:  h.dataBytes,
		remaining: h.dataBytes,
		offset:    h.dataOffset,
		buf:       make([]byte, size),
	}, nil
}

// Info returns the format declared by the file's header.
func (w *WAVReader) Info() WAVInfo { return w.info }

// Rate returns the sample rate in Hz.
func (w *WAVReader) Rate() int { return w.info.Rate }

// Read decodes up to len(p) frames into p as mono int16 samples and returns
// how many it wrote. At the end of the data it returns 0, io.EOF; a
// truncated file yields its complete frames first and then an error
// wrapping ErrTruncatedData. Errors are sticky. Read does not allocate.
func (w *WAVReader) Read(p []int16) (int, error) {
	if w.err != nil {
		return 0, w.err
	}
	if len(p) == 0 {
		return 0, nil
	}
	frames := min(len(p), len(w.buf)/w.align)
	if w.remaining >= 0 {
		frames = int(min(int64(frames), w.remaining/int64(w.align)))
		if frames == 0 {
			w.err = io.EOF
			return 0, io.EOF
		}
	}
	n, err := io.ReadFull(w.r, w.buf[:frames*w.align])
	got := n / w.align
	w.dec.decode(p[:got], w.buf[:got*w.align])
	w.offset += int64(n)
	if w.remaining >= 0 {
		w.remaining -= int64(n)
	}
	if err != nil {
		w.err = w.endError(n, err)
		if got > 0 {
			return got, nil
		}
		return 0, w.err
	}
	return got, nil
}

// endError classifies a short read of n bytes that ended with err.
func (w *WAVReader) endError(n int, err error) error {
	if !errors.Is(err, io.EOF) && !errors.Is(err, io.ErrUnexpectedEOF) {
		return wrapIO(w.name, w.offset, err)
	}
	partial := n%w.align != 0
	if w.declared < 0 {
		if partial {
			return failf(w.name, w.offset, ErrTruncatedData, "file ends in the middle of a %d-byte frame", w.align)
		}
		return io.EOF
	}
	got := w.declared - w.remaining
	if partial {
		return failf(w.name, w.offset, ErrTruncatedData, "data chunk declares %d bytes but the file ends after %d of them, in the middle of a %d-byte frame", w.declared, got, w.align)
	}
	return failf(w.name, w.offset, ErrTruncatedData, "data chunk declares %d bytes but the file ends after %d of them", w.declared, got)
}

// Close releases the file opened by OpenWAV; for a reader made with
// NewWAVReader it closes nothing. Reads after Close fail.
func (w *WAVReader) Close() error {
	w.err = fmt.Errorf("audio: %s: Read after Close: %w", w.name, os.ErrClosed)
	if w.closer == nil {
		return nil
	}
	c := w.closer
	w.closer = nil
	if err := c.Close(); err != nil {
		return fmt.Errorf("audio: closing %s: %w", w.name, err)
	}
	return nil
}
