package main

import (
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"github.com/auscult/auscult/pkg/audio"
)

// wavPaths expands files and folders (their *.wav files, sorted, not
// recursive) into a list of WAV files.
func wavPaths(args []string) ([]string, error) {
	if len(args) == 0 {
		return nil, usagef("no WAV files or folders given")
	}
	var out []string
	for _, a := range args {
		st, err := os.Stat(a)
		if err != nil {
			return nil, err
		}
		if !st.IsDir() {
			out = append(out, a)
			continue
		}
		ents, err := os.ReadDir(a)
		if err != nil {
			return nil, err
		}
		var found []string
		for _, e := range ents {
			if !e.IsDir() && strings.EqualFold(filepath.Ext(e.Name()), ".wav") {
				found = append(found, filepath.Join(a, e.Name()))
			}
		}
		if len(found) == 0 {
			return nil, fmt.Errorf("%s: no .wav files in this folder", a)
		}
		sort.Strings(found)
		out = append(out, found...)
	}
	return out, nil
}

// openAt opens a WAV file as a mono source at the analysis rate. channel -1
// mixes all channels. The returned close function closes the file.
func openAt(path string, rate, channel int) (audio.Source, func() error, error) {
	r, err := audio.OpenWAV(path, channel)
	if err != nil {
		return nil, nil, err
	}
	if r.Rate() < rate {
		r.Close()
		return nil, nil, fmt.Errorf("%s: recorded at %d Hz, below the %d Hz analysis rate: it holds no sound above %d Hz, "+
			"where the analysis looks; for such recordings enrol a baseline with --rate %d", path, r.Rate(), rate, r.Rate()/2, r.Rate())
	}
	src, err := audio.NewResampler(r, rate)
	if err != nil {
		r.Close()
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	return src, r.Close, nil
}
