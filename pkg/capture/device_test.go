package capture

import (
	"errors"
	"strings"
	"testing"
)

// pumpRoom is a device list like a Raspberry Pi with a USB microphone.
var pumpRoom = []Device{
	{Index: 0, Name: "bcm2835 Headphones: - (hw:0,0)", HostAPI: "ALSA", MaxInputChannels: 0, DefaultRate: 44100},
	{Index: 1, Name: "USB PnP Sound Device: Audio (hw:1,0)", HostAPI: "ALSA", MaxInputChannels: 1, DefaultRate: 48000},
	{Index: 2, Name: "USB Contact Mic: Audio (hw:2,0)", HostAPI: "ALSA", MaxInputChannels: 2, DefaultRate: 48000},
	{Index: 3, Name: "sysdefault", HostAPI: "ALSA", MaxInputChannels: 128, DefaultRate: 44100},
	{Index: 4, Name: "default", HostAPI: "ALSA", MaxInputChannels: 128, DefaultRate: 44100, DefaultInput: true},
}

func TestSelectDevice(t *testing.T) {
	cases := []struct {
		name     string
		devs     []Device
		spec     string
		channels int
		want     int // index, or -1 for an error
		err      error
		text     []string // the message must contain each
	}{
		{"empty is the default input", pumpRoom, "", 1, 4, nil, nil},
		{"index", pumpRoom, "2", 2, 2, nil, nil},
		{"index with spaces", pumpRoom, " 1 ", 1, 1, nil, nil},
		{"unique substring, any case", pumpRoom, "contact MIC", 1, 2, nil, nil},
		{"exact name beats substrings", pumpRoom, "DEFAULT", 1, 4, nil, nil},
		{"ambiguous substring", pumpRoom, "usb", 1, -1, ErrAmbiguousDevice,
			[]string{`"usb" matches 1 "USB PnP Sound Device: Audio (hw:1,0)" (ALSA, 1 in), 2 "USB Contact Mic`, "use the index"}},
		{"unknown name lists the inputs", pumpRoom, "P-492B mic", 1, -1, ErrNoDevice,
			[]string{`no device name contains "P-492B mic"`, `1 "USB PnP Sound Device: Audio (hw:1,0)"`, `4 "default" (ALSA, 128 in)`}},
		{"unknown index", pumpRoom, "9", 1, -1, ErrNoDevice, []string{"no device has index 9", `3 "sysdefault"`}},
		{"output-only device", pumpRoom, "headphones", 1, -1, ErrNoInput,
			[]string{`"bcm2835 Headphones: - (hw:0,0)" (index 0, ALSA) has 0 input channels, 1 needed`}},
		{"too few channels", pumpRoom, "PnP", 2, -1, ErrNoInput, []string{"has 1 input channels, 2 needed"}},
		{"no default input", pumpRoom[:3], "", 1, -1, ErrNoDevice, []string{"there is no default input device", `2 "USB Contact Mic`}},
		{"no inputs at all", pumpRoom[:1], "", 1, -1, ErrNoDevice, []string{`PortAudio lists 1 devices, none with input channels: 0 "bcm2835 Headphones: - (hw:0,0)" (ALSA, 0 in)`}},
		{"no devices", nil, "mic", 1, -1, ErrNoDevice, []string{"PortAudio lists no devices at all"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, err := selectDevice(c.devs, c.spec, c.channels)
			if c.want >= 0 {
				if err != nil || d.Index != c.want {
					t.Fatalf("got %+v, %v; want index %d", d, err, c.want)
				}
				return
			}
			if !errors.Is(err, c.err) {
				t.Fatalf("error %v, want %v", err, c.err)
			}
			for _, s := range c.text {
				if !strings.Contains(err.Error(), s) {
					t.Errorf("error %q\ndoes not contain %q", err, s)
				}
			}
		})
	}
}

func TestFormatDevices(t *testing.T) {
	var b strings.Builder
	if err := FormatDevices(&b, []Device{pumpRoom[0], pumpRoom[1], pumpRoom[4]}); err != nil {
		t.Fatal(err)
	}
	want := "" +
		"  index  inputs  rate Hz  host  name\n" +
		"      0       0    44100  ALSA  bcm2835 Headphones: - (hw:0,0)  (output only)\n" +
		"      1       1    48000  ALSA  USB PnP Sound Device: Audio (hw:1,0)\n" +
		"*     4     128    44100  ALSA  default\n" +
		"* default input. Pick a device by its index or by part of its name.\n"
	if b.String() != want {
		t.Errorf("got\n%s\nwant\n%s", b.String(), want)
	}
}
