package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
	"syscall"
	"time"

	"github.com/auscult/auscult/pkg/audio"
	"github.com/auscult/auscult/pkg/capture"
	"github.com/auscult/auscult/pkg/config"
)

// liveSource is an opened sound source for the live agent: samples at the
// analysis rate, a clock for what they produce, and what to close.
type liveSource struct {
	audio.Source
	desc     string
	realtime bool                            // wall-clock time stamps (device, stdin, wav at speed 1)
	capture  *capture.Capture                // set for a device, for its diagnostics
	closeFn  func(ctx context.Context) error // releases the device or files
	clock    func(start time.Time, rate int) func(int64) time.Time
	// interrupt, if set, makes a read blocked on the source return, so a
	// stop signal is not held up by a pipe with nothing in it.
	interrupt func()
}

// interruptible returns a reader whose blocked Read the returned function
// ends: stdin as a pollable, non-blocking file with a read deadline. A
// terminal, or a reader that is not a file, is returned as it is.
func interruptible(r io.Reader) (io.Reader, func()) {
	f, ok := r.(*os.File)
	if !ok {
		return r, nil
	}
	if fi, err := f.Stat(); err != nil || fi.Mode()&os.ModeCharDevice != 0 {
		return r, nil
	}
	fd := f.Fd()
	if err := syscall.SetNonblock(int(fd), true); err != nil {
		return r, nil
	}
	nf := os.NewFile(fd, f.Name())
	return nf, func() { nf.SetReadDeadline(time.Now()) }
}

// parseSourceFlag turns --source into a config.Source, starting from the
// configured one: "device", "device:NAME", "wav:PATH" or "stdin".
func parseSourceFlag(spec string, base config.Source) (config.Source, error) {
	kind, arg, _ := strings.Cut(spec, ":")
	s := base
	s.Kind = kind
	switch kind {
	case config.SourceDevice:
		s.Device = arg
	case config.SourceWAV:
		if arg == "" {
			return s, usagef("--source wav:PATH needs a WAV file or folder")
		}
		s.Path = arg
	case config.SourceStdin:
		if arg != "" {
			return s, usagef("--source stdin takes no argument")
		}
	default:
		return s, usagef("--source %q: want device[:NAME], wav:PATH or stdin", spec)
	}
	return s, nil
}

// openSource opens s delivering samples at rate Hz.
func openSource(s config.Source, rate int, stdin io.Reader) (*liveSource, error) {
	wall := wallClock
	switch s.Kind {
	case config.SourceDevice:
		c, err := capture.New(capture.Config{Device: s.Device, Rate: s.RateHz, Channels: s.Channels,
			Channel: s.Channel, WaitForDevice: true})
		if err != nil {
			return nil, err
		}
		src, err := audio.NewResampler(c, rate)
		if err != nil {
			c.Close(context.Background())
			return nil, err
		}
		// interrupt stops the capture without waiting for it: a read waiting
		// for a device that cannot be opened then ends at once, so a signal
		// or a deadline never waits on the reopen back-off.
		return &liveSource{Source: src, desc: "device " + quoteOrDefault(s.Device), realtime: true, capture: c,
			closeFn: c.Close, clock: wall, interrupt: func() { go c.Close(context.Background()) }}, nil
	case config.SourceStdin:
		in, interrupt := interruptible(stdin)
		r, err := audio.NewRawSource(in, s.RateHz, s.Channels, s.Channel)
		if err != nil {
			return nil, err
		}
		src, err := audio.NewResampler(r, rate)
		if err != nil {
			return nil, err
		}
		return &liveSource{Source: src, desc: fmt.Sprintf("stdin (s16le, %d Hz, %d channels)", s.RateHz, s.Channels),
			realtime: true, closeFn: func(context.Context) error { return nil }, clock: wall, interrupt: interrupt}, nil
	case config.SourceWAV:
		files, err := wavPaths([]string{s.Path})
		if err != nil {
			return nil, err
		}
		chain := &fileChain{files: files, rate: rate, channel: s.Channel}
		if err := chain.next(); err != nil {
			return nil, err
		}
		var src audio.Source = chain
		if s.Speed > 0 {
			if src, err = audio.NewPaced(chain, s.Speed, nil); err != nil {
				chain.close()
				return nil, err
			}
		}
		return &liveSource{Source: src, desc: fmt.Sprintf("%d WAV file(s) from %s at speed %g", len(files), s.Path, s.Speed),
			closeFn: func(context.Context) error { return chain.close() }, clock: sampleClock}, nil
	}
	return nil, fmt.Errorf("unknown source kind %q", s.Kind)
}

func quoteOrDefault(name string) string {
	if name == "" {
		return "(system default input)"
	}
	return fmt.Sprintf("%q", name)
}

// fileChain plays WAV files one after another as one stream at the
// analysis rate.
type fileChain struct {
	files   []string
	rate    int
	channel int
	cur     audio.Source
	closeFn func() error
}

func (c *fileChain) Rate() int { return c.rate }

func (c *fileChain) next() error {
	if err := c.close(); err != nil {
		return err
	}
	if len(c.files) == 0 {
		return io.EOF
	}
	src, closeFn, err := openAt(c.files[0], c.rate, c.channel)
	if err != nil {
		return err
	}
	c.files, c.cur, c.closeFn = c.files[1:], src, closeFn
	return nil
}

func (c *fileChain) Read(p []int16) (int, error) {
	for {
		if c.cur == nil {
			return 0, io.EOF
		}
		n, err := c.cur.Read(p)
		if err != nil && !errors.Is(err, io.EOF) {
			return n, err
		}
		if n > 0 {
			return n, nil // an end of file is seen again at the next Read
		}
		if err := c.next(); err != nil {
			return 0, err
		}
	}
}

func (c *fileChain) close() error {
	if c.closeFn == nil {
		return nil
	}
	err := c.closeFn()
	c.cur, c.closeFn = nil, nil
	return err
}

// wallClock stamps what a window produces with the computer's clock.
func wallClock(time.Time, int) func(int64) time.Time {
	return func(int64) time.Time { return time.Now().UTC() }
}

// sampleClock stamps replayed sound by its own sample count from the start,
// so an hour replayed in a minute still spans an hour of log.
func sampleClock(start time.Time, rate int) func(int64) time.Time {
	return func(pos int64) time.Time { return start.Add(time.Duration(pos) * time.Second / time.Duration(rate)) }
}
