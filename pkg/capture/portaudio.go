//go:build cgo

package capture

import (
	"errors"
	"fmt"
	"sync"
	"time"

	"github.com/gordonklaus/portaudio"
)

// paMu serialises every call into PortAudio's process-wide state:
// Initialize and Terminate, the device list, opening, starting and closing
// streams. PortAudio itself is process-global and its Go binding keeps its
// reference count and device cache in unsynchronised package variables,
// so this lock has to be package-level too. It guards no data of ours.
// Blocking reads (Stream.Read) run without it.
var paMu sync.Mutex

// Devices lists PortAudio's devices, inputs and outputs, for `auscult
// devices`. It takes and releases its own PortAudio reference. While a
// Capture holds PortAudio open, the list is the one enumerated when that
// Capture last opened its device.
func Devices() ([]Device, error) {
	paMu.Lock()
	defer paMu.Unlock()
	if err := portaudio.Initialize(); err != nil {
		return nil, fmt.Errorf("capture: initialising PortAudio: %w", err)
	}
	defer portaudio.Terminate()
	devs, _, err := listDevices()
	return devs, err
}

// New starts capturing from the device cfg names (see Config for the
// defaults). Unless cfg.WaitForDevice is set, it returns the error of the
// first open: ErrNoDevice, ErrAmbiguousDevice or ErrNoInput with the list
// of input devices, or PortAudio's reason (an unsupported rate, a busy
// device). The caller must Close the Capture.
func New(cfg Config) (*Capture, error) {
	cfg, err := cfg.withDefaults()
	if err != nil {
		return nil, err
	}
	return start(cfg, &paOpener{cfg: cfg}, wallClock{})
}

// listDevices converts PortAudio's device list. Call with paMu held and
// PortAudio initialised.
func listDevices() ([]Device, []*portaudio.DeviceInfo, error) {
	infos, err := portaudio.Devices()
	if err != nil {
		return nil, nil, fmt.Errorf("capture: listing PortAudio devices: %w", err)
	}
	def := -1
	if d, err := portaudio.DefaultInputDevice(); err == nil && d != nil {
		def = d.Index
	}
	devs := make([]Device, len(infos))
	for i, d := range infos {
		host := ""
		if d.HostApi != nil {
			host = d.HostApi.Name
		}
		devs[i] = Device{
			Index:            d.Index,
			Name:             d.Name,
			HostAPI:          host,
			MaxInputChannels: d.MaxInputChannels,
			DefaultRate:      d.DefaultSampleRate,
			DefaultInput:     d.Index == def,
		}
	}
	return devs, infos, nil
}

// paOpener opens cfg's device through PortAudio. It holds one PortAudio
// reference between opens; every open after the first drops and retakes
// it, so that PortAudio enumerates the devices afresh (a reopen follows a
// failure, and the device may have been unplugged and plugged back in).
// Only the capture goroutine uses it (New, before the goroutine starts).
type paOpener struct {
	cfg   Config
	ref   bool // this opener holds a PortAudio reference
	opens int  // open calls so far
}

func (o *paOpener) open(buf []int16) (stream, error) {
	paMu.Lock()
	defer paMu.Unlock()
	if o.ref && o.opens > 0 {
		o.ref = false
		if err := portaudio.Terminate(); err != nil {
			return nil, fmt.Errorf("capture: releasing PortAudio to rescan devices: %w", err)
		}
	}
	o.opens++
	if !o.ref {
		if err := portaudio.Initialize(); err != nil {
			return nil, fmt.Errorf("capture: initialising PortAudio: %w", err)
		}
		o.ref = true
	}
	devs, infos, err := listDevices()
	if err != nil {
		return nil, err
	}
	d, err := selectDevice(devs, o.cfg.Device, o.cfg.Channels)
	if err != nil {
		return nil, err
	}
	p := portaudio.HighLatencyParameters(infos[d.Index], nil)
	p.Input.Channels = o.cfg.Channels
	p.SampleRate = float64(o.cfg.Rate)
	p.FramesPerBuffer = o.cfg.FramesPerRead
	desc := fmt.Sprintf("%q (index %d, %s) at %d Hz, %d channel(s)", d.Name, d.Index, d.HostAPI, o.cfg.Rate, o.cfg.Channels)
	s, err := portaudio.OpenStream(p, buf)
	if err != nil {
		return nil, fmt.Errorf("capture: opening %s: %w", desc, err)
	}
	if err := s.Start(); err != nil {
		s.Close()
		return nil, fmt.Errorf("capture: starting %s: %w", desc, err)
	}
	return &paStream{s: s, desc: desc}, nil
}

func (o *paOpener) close() error {
	paMu.Lock()
	defer paMu.Unlock()
	if !o.ref {
		return nil
	}
	o.ref = false
	if err := portaudio.Terminate(); err != nil {
		return fmt.Errorf("capture: terminating PortAudio: %w", err)
	}
	return nil
}

// paStream is an open, started PortAudio input stream.
type paStream struct {
	s    *portaudio.Stream
	desc string
}

// read does one blocking read. PortAudio reports an input overflow as an
// error after filling the buffer (Pa_ReadStream returns paInputOverflowed;
// PortAudio V19 portaudio.h), so that one is not a failure.
func (p *paStream) read() error {
	err := p.s.Read()
	switch {
	case err == nil:
		return nil
	case errors.Is(err, portaudio.InputOverflowed):
		return fmt.Errorf("%w (%v)", ErrInputOverflow, err)
	}
	return fmt.Errorf("capture: reading %s: %w", p.desc, err)
}

func (p *paStream) close() error {
	paMu.Lock()
	defer paMu.Unlock()
	abortErr := p.s.Abort()
	if err := p.s.Close(); err != nil {
		return fmt.Errorf("capture: closing %s: %w", p.desc, err)
	}
	if abortErr != nil {
		return fmt.Errorf("capture: stopping %s: %w", p.desc, abortErr)
	}
	return nil
}

func (p *paStream) String() string { return p.desc }

// wallClock is the real clock.
type wallClock struct{}

func (wallClock) now() time.Time { return time.Now() }

func (wallClock) wait(d time.Duration, stop <-chan struct{}) bool {
	t := time.NewTimer(d)
	defer t.Stop()
	select {
	case <-t.C:
		return true
	case <-stop:
		return false
	}
}
