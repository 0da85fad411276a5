package main

import (
	"io"

	"github.com/auscult/auscult/pkg/capture"
)

func runDevices(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("devices", stderr)
	if rest, err := parse(fs, args); err != nil {
		return err
	} else if len(rest) > 0 {
		return usagef("unexpected argument %q", rest[0])
	}
	devs, err := capture.Devices()
	if err != nil {
		return err
	}
	return capture.FormatDevices(stdout, devs)
}
