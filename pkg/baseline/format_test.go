package baseline

import (
	"encoding/binary"
	"errors"
	"hash/crc32"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/features"
)

func testBaseline(t *testing.T) *Baseline {
	t.Helper()
	m, err := Fit(correlated(120, 30, 11), DefaultModelOptions())
	if err != nil {
		t.Fatal(err)
	}
	return &Baseline{Created: time.Date(2026, 3, 4, 5, 6, 7, 0, time.UTC), Asset: "P-101A",
		Features: features.DefaultConfig(), Embed: embed.DefaultConfig(), Options: DefaultModelOptions(),
		Calib: Calibration{Threshold: 0.4, K: 3, N: 5}, Model: m}
}

func TestSaveLoadRoundTrip(t *testing.T) {
	b := testBaseline(t)
	path := filepath.Join(t.TempDir(), "p101a.baseline")
	if err := b.Save(path); err != nil {
		t.Fatal(err)
	}
	got, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	if got.ID != b.ID || len(got.ID) != 12 || got.Asset != "P-101A" || got.Calib.Threshold != 0.4 {
		t.Errorf("header did not survive: %+v", got)
	}
	if got.Features != b.Features || got.Embed != b.Embed {
		t.Errorf("configuration did not survive")
	}
	x := correlated(5, 30, 12)
	s1, s2 := b.Model.NewScorer(), got.Model.NewScorer()
	for _, v := range x {
		if s1.Distance(v) != s2.Distance(v) {
			t.Fatal("loaded model scores differently")
		}
	}
	// Same content, same ID.
	data2, _ := got.Marshal()
	data1, _ := os.ReadFile(path)
	if string(data1) != string(data2) {
		t.Error("re-encoding a loaded baseline changed its bytes")
	}
}

func TestLoadRefusesDamage(t *testing.T) {
	b := testBaseline(t)
	good, err := b.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	flip := func(i int) []byte {
		d := append([]byte(nil), good...)
		d[i] ^= 0x40
		return d
	}
	cases := []struct {
		name string
		data []byte
		want error
	}{
		{"empty", nil, ErrNotBaseline},
		{"text file", []byte("threshold: 0.4\n"), ErrNotBaseline},
		{"newer version", append(append([]byte(magic), 9, 0, 0, 0), good[12:]...), ErrVersion},
		{"truncated", good[:len(good)/2], ErrCorrupt},
		{"flipped header byte", flip(40), ErrCorrupt},
		{"flipped model byte", flip(len(good) - 20), ErrCorrupt},
		{"flipped checksum", flip(len(good) - 1), ErrCorrupt},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := Unmarshal(c.data, "site/p101a.baseline")
			if !errors.Is(err, c.want) {
				t.Fatalf("got %v, want %v", err, c.want)
			}
			if !strings.Contains(err.Error(), "site/p101a.baseline") {
				t.Errorf("error does not name the file: %v", err)
			}
		})
	}
}

func TestSaveKeepsOldFileOnFailure(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "b")
	b := testBaseline(t)
	if err := b.Save(path); err != nil {
		t.Fatal(err)
	}
	before, _ := os.ReadFile(path)
	b.Model = nil
	if err := b.Save(path); err == nil {
		t.Fatal("saved a baseline without a model")
	}
	after, _ := os.ReadFile(path)
	if string(before) != string(after) {
		t.Error("failed save damaged the existing file")
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 {
		t.Errorf("temporary files left behind: %d entries", len(ents))
	}
}

func TestCompatible(t *testing.T) {
	b := testBaseline(t)
	fc := features.DefaultConfig()
	if err := b.Compatible(fc); err != nil {
		t.Fatal(err)
	}
	fc.Rate = 22050
	fc.FMax = 11025
	if err := b.Compatible(fc); !errors.Is(err, ErrMismatch) || !strings.Contains(err.Error(), "22050 Hz") {
		t.Errorf("rate mismatch: %v", err)
	}
}

// A version-1 file (written before operating-point centres existed: no
// centre count in the model) still loads and scores as it did.
func TestLoadReadsVersion1(t *testing.T) {
	b := testBaseline(t)
	one := b.Options
	one.Centroids = 1
	m, err := Fit(correlated(120, 30, 11), one)
	if err != nil {
		t.Fatal(err)
	}
	b.Model, b.Options = m, one
	v2, err := b.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	h := int(binary.LittleEndian.Uint32(v2[12:]))
	model := 16 + h // D, K, then C (0) in version 2
	if c := binary.LittleEndian.Uint32(v2[model+8:]); c != 0 {
		t.Fatalf("centre count %d for a one-mean model", c)
	}
	v1 := append(append([]byte(nil), v2[:model+8]...), v2[model+12:len(v2)-4]...)
	binary.LittleEndian.PutUint32(v1[8:], 1)
	v1 = binary.LittleEndian.AppendUint32(v1, crc32.Checksum(v1, castagnoli))
	got, err := Unmarshal(v1, "old.baseline")
	if err != nil {
		t.Fatal(err)
	}
	s1, s2 := m.NewScorer(), got.Model.NewScorer()
	for _, v := range correlated(5, 30, 12) {
		if s1.Distance(v) != s2.Distance(v) {
			t.Fatal("a version-1 file scores differently")
		}
	}
}
