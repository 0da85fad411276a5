package capture

import (
	"fmt"
	"io"
	"strconv"
	"strings"
)

// Device describes one PortAudio device, as Devices lists it.
type Device struct {
	// Index is PortAudio's device index, valid until PortAudio is next
	// initialised (devices plugged in or out may renumber).
	Index int
	// Name is the device name the host API reports, e.g. "USB Audio
	// Device: - (hw:1,0)" or "default".
	Name string
	// HostAPI names the host API the device belongs to, e.g. "ALSA".
	HostAPI string
	// MaxInputChannels is 0 for an output-only device.
	MaxInputChannels int
	// DefaultRate is the device's default sample rate in Hz.
	DefaultRate float64
	// DefaultInput marks PortAudio's default input device.
	DefaultInput bool
}

// FormatDevices writes devs as a plain-text table for `auscult devices`:
// index, input channels, default rate, host API and name, with the
// default input marked by an asterisk and output-only devices noted.
func FormatDevices(w io.Writer, devs []Device) error {
	hostW := len("host")
	for _, d := range devs {
		hostW = max(hostW, len(d.HostAPI))
	}
	var b strings.Builder
	fmt.Fprintf(&b, "  index  inputs  rate Hz  %-*s  name\n", hostW, "host")
	for _, d := range devs {
		mark := " "
		if d.DefaultInput {
			mark = "*"
		}
		note := ""
		if d.MaxInputChannels == 0 {
			note = "  (output only)"
		}
		fmt.Fprintf(&b, "%s %5d  %6d  %7.0f  %-*s  %s%s\n", mark, d.Index, d.MaxInputChannels, d.DefaultRate, hostW, d.HostAPI, d.Name, note)
	}
	b.WriteString("* default input. Pick a device by its index or by part of its name.\n")
	if _, err := io.WriteString(w, b.String()); err != nil {
		return fmt.Errorf("capture: writing the device list: %w", err)
	}
	return nil
}

// selectDevice picks the device spec names (see Config.Device) from devs,
// which needs at least channels input channels. Errors list the input
// devices so the user can correct the name.
func selectDevice(devs []Device, spec string, channels int) (Device, error) {
	pick := func(d Device) (Device, error) {
		if d.MaxInputChannels < channels {
			return Device{}, fmt.Errorf("%w: %q (index %d, %s) has %d input channels, %d needed; %s",
				ErrNoInput, d.Name, d.Index, d.HostAPI, d.MaxInputChannels, channels, listInputs(devs))
		}
		return d, nil
	}
	spec = strings.TrimSpace(spec)
	if spec == "" {
		for _, d := range devs {
			if d.DefaultInput {
				return pick(d)
			}
		}
		return Device{}, fmt.Errorf("%w: there is no default input device; %s", ErrNoDevice, listInputs(devs))
	}
	if i, err := strconv.Atoi(spec); err == nil {
		for _, d := range devs {
			if d.Index == i {
				return pick(d)
			}
		}
		return Device{}, fmt.Errorf("%w: no device has index %d; %s", ErrNoDevice, i, listInputs(devs))
	}
	var exact, inputs, named []Device
	for _, d := range devs {
		switch {
		case strings.EqualFold(d.Name, spec):
			exact = append(exact, d)
		case strings.Contains(strings.ToLower(d.Name), strings.ToLower(spec)):
			named = append(named, d)
			if d.MaxInputChannels > 0 {
				inputs = append(inputs, d)
			}
		}
	}
	switch {
	case len(exact) > 0:
		return pick(exact[0])
	case len(inputs) == 1:
		return pick(inputs[0])
	case len(inputs) > 1:
		return Device{}, fmt.Errorf("%w: %q matches %s; use the index or more of the name", ErrAmbiguousDevice, spec, names(inputs))
	case len(named) > 0:
		return pick(named[0]) // reports that it has no inputs
	}
	return Device{}, fmt.Errorf("%w: no device name contains %q; %s", ErrNoDevice, spec, listInputs(devs))
}

// listInputs describes the input devices in devs for an error message.
func listInputs(devs []Device) string {
	var in []Device
	for _, d := range devs {
		if d.MaxInputChannels > 0 {
			in = append(in, d)
		}
	}
	if len(in) == 0 {
		if len(devs) == 0 {
			return "PortAudio lists no devices at all (is the microphone plugged in? run `auscult devices`)"
		}
		return fmt.Sprintf("PortAudio lists %d devices, none with input channels: %s (is the microphone plugged in? run `auscult devices`)", len(devs), names(devs))
	}
	return "input devices: " + names(in)
}

// names formats devices as `0 "name" (ALSA, 2 in), ...`.
func names(devs []Device) string {
	var b strings.Builder
	for i, d := range devs {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, "%d %q (%s, %d in)", d.Index, d.Name, d.HostAPI, d.MaxInputChannels)
	}
	return b.String()
}
