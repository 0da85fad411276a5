package features

import (
	"encoding/json"
	"os"
	"path/filepath"
	"testing"
)

// reference is testdata/features/reference.json, written by
// scripts/ref/make_features_fixture.py from numpy and scipy (Debian
// python3-numpy, python3-scipy; versions recorded in the file).
type reference struct {
	NumpyVersion string      `json:"numpy_version"`
	ScipyVersion string      `json:"scipy_version"`
	Rate         int         `json:"rate"`
	N            int         `json:"n"`
	Mels         int         `json:"mels"`
	FMin         float64     `json:"fmin"`
	FMax         float64     `json:"fmax"`
	FloorDB      float64     `json:"floor_db"`
	Hann         []float64   `json:"hann"`
	Frame        []int16     `json:"frame"`
	Power        []float64   `json:"power"`
	MelPointsHz  []float64   `json:"mel_points_hz"`
	MelFirst     []int       `json:"mel_first"`
	MelWeights   [][]float64 `json:"mel_weights"`
	RefEnergy    float64     `json:"ref_energy"`
	LogMel       []float64   `json:"logmel"`
}

// loadReference reads the numpy/scipy fixture.
func loadReference(t testing.TB) *reference {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "testdata", "features", "reference.json"))
	if err != nil {
		t.Fatalf("read fixture (regenerate with /usr/bin/python3 scripts/ref/make_features_fixture.py): %v", err)
	}
	var r reference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatalf("parse fixture: %v", err)
	}
	if r.N != len(r.Hann) || r.N != len(r.Frame) || r.N/2+1 != len(r.Power) || r.Mels != len(r.LogMel) {
		t.Fatalf("fixture has inconsistent lengths")
	}
	return &r
}
