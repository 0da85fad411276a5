package audio

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"os"
	"path/filepath"
)

// wavHeaderBytes is the size of the canonical 16-bit PCM WAV header.
const wavHeaderBytes = 44

// maxWAVSamples is the most 16-bit samples whose data size and RIFF size
// (data + 36) both fit in 32 bits.
const maxWAVSamples = (0xFFFFFFFF - (wavHeaderBytes - 8)) / 2

// WAVWriter streams 16-bit mono PCM samples to a WAV file. It writes to a
// temporary file in the destination directory and renames it into place
// on Close, so the destination path either keeps its old content or holds
// the complete new file. The header's size fields are patched on Close.
// The file is created with mode 0644.
type WAVWriter struct {
	path    string
	tmp     string
	f       *os.File
	bw      *bufio.Writer
	samples int64
	scratch []byte
	err     error // sticky write failure
	closed  bool
}

// CreateWAV starts a 16-bit mono PCM WAV file at path with the given sample
// rate in Hz (1..MaxSampleRate). The caller must call Close to publish the
// file, or Abort to discard it.
func CreateWAV(path string, rate int) (*WAVWriter, error) {
	if rate < 1 || rate > MaxSampleRate {
		return nil, failf(path, -1, ErrSampleRate, "%d Hz, want 1..%d", rate, MaxSampleRate)
	}
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return nil, fmt.Errorf("audio: create %s: %w", path, err)
	}
	w := &WAVWriter{
		path:    path,
		tmp:     f.Name(),
		f:       f,
		bw:      bufio.NewWriterSize(f, 32768),
		scratch: make([]byte, 8192),
	}
	var h [wavHeaderBytes]byte
	putWAVHeader(h[:], rate, 0)
	if _, err := w.bw.Write(h[:]); err != nil {
		w.Abort()
		return nil, fmt.Errorf("audio: writing %s: %w", path, err)
	}
	return w, nil
}

// Write appends samples to the file. It does not allocate. A failed write
// is sticky: later Writes and Close return the same error and Close
// removes the temporary file. Writing past the 4 GiB RIFF limit returns an
// error wrapping ErrTooLong and writes nothing.
func (w *WAVWriter) Write(p []int16) error {
	if w.closed {
		return failf(w.path, -1, ErrWriterClosed, "Write after Close or Abort")
	}
	if w.err != nil {
		return w.err
	}
	if w.samples+int64(len(p)) > maxWAVSamples {
		return failf(w.path, -1, ErrTooLong, "%d more samples after %d, limit %d", len(p), w.samples, int64(maxWAVSamples))
	}
	for len(p) > 0 {
		n := min(len(p), len(w.scratch)/2)
		for i, s := range p[:n] {
			binary.LittleEndian.PutUint16(w.scratch[2*i:], uint16(s))
		}
		if _, err := w.bw.Write(w.scratch[:2*n]); err != nil {
			w.err = fmt.Errorf("audio: writing %s: %w", w.path, err)
			return w.err
		}
		w.samples += int64(n)
		p = p[n:]
	}
	return nil
}

// Close flushes the samples, patches the RIFF and data sizes, syncs the
// temporary file and renames it to the destination path. On any failure
// the temporary file is removed and the destination is left untouched.
func (w *WAVWriter) Close() error {
	if w.closed {
		return failf(w.path, -1, ErrWriterClosed, "second Close, or Close after Abort")
	}
	if w.err != nil {
		w.Abort()
		return w.err
	}
	if err := w.finish(); err != nil {
		w.Abort()
		return fmt.Errorf("audio: closing %s: %w", w.path, err)
	}
	w.closed = true
	return nil
}

// finish does Close's work and returns the first failure.
func (w *WAVWriter) finish() error {
	if err := w.bw.Flush(); err != nil {
		return err
	}
	data := uint32(w.samples * 2)
	var b [4]byte
	binary.LittleEndian.PutUint32(b[:], data+wavHeaderBytes-8)
	if _, err := w.f.WriteAt(b[:], 4); err != nil {
		return err
	}
	binary.LittleEndian.PutUint32(b[:], data)
	if _, err := w.f.WriteAt(b[:], 40); err != nil {
		return err
	}
	if err := w.f.Chmod(0o644); err != nil {
		return err
	}
	if err := w.f.Sync(); err != nil {
		return err
	}
	if err := w.f.Close(); err != nil {
		return err
	}
	return os.Rename(w.tmp, w.path)
}

// Abort discards the file: it closes and removes the temporary file and
// leaves the destination path untouched. Abort after Close does nothing.
func (w *WAVWriter) Abort() {
	if w.closed {
		return
	}
	w.closed = true
	w.f.Close()
	os.Remove(w.tmp)
}

// WriteWAV writes samples as a 16-bit mono PCM WAV file at path with the
// given sample rate in Hz, atomically (see WAVWriter).
func WriteWAV(path string, rate int, samples []int16) error {
	w, err := CreateWAV(path, rate)
	if err != nil {
		return err
	}
	if err := w.Write(samples); err != nil {
		w.Abort()
		return err
	}
	return w.Close()
}
