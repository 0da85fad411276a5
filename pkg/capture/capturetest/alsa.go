// Package capturetest gives tests a real capture device without sound
// hardware: ALSA's file plugin, which PortAudio opens like a sound card and
// which reads a raw s16le file (measured on Debian 12; see the project's
// platform notes).
package capturetest

import (
	_ "embed"
	"os"
	"path/filepath"
)

// InfileEnv names the environment variable that points the device at its
// raw s16le file. The file must exist when PortAudio initialises; at its end
// the device repeats its last buffer, so end the file with a second or more
// of zeros.
const InfileEnv = "AUSCULT_TEST_INFILE"

// DeviceName is the capture device's name as PortAudio lists it.
const DeviceName = "testmic"

// ALSAConfig is a complete ALSA configuration holding only the test device
// (it replaces the system's when ALSA_CONFIG_PATH points at it). The file
// is shared with scripts/build.sh, which lists the device with each build.
//
//go:embed testmic.asoundrc
var ALSAConfig string

// Env writes ALSAConfig into dir and returns the environment entries that
// make a process (or, set with os.Setenv before PortAudio initialises, this
// one) capture from infile.
func Env(dir, infile string) ([]string, error) {
	conf := filepath.Join(dir, "asound.conf")
	if err := os.WriteFile(conf, []byte(ALSAConfig), 0o644); err != nil {
		return nil, err
	}
	return []string{"ALSA_CONFIG_PATH=" + conf, InfileEnv + "=" + infile}, nil
}
