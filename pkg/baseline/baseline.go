package baseline

import (
	"encoding/json"
	"fmt"
	"time"

	"github.com/auscult/auscult/pkg/embed"
	"github.com/auscult/auscult/pkg/features"
)

// Baseline is everything needed to score a machine: the feature and window
// configuration it was enrolled with, the model, its calibration, and a
// record of the enrolment.
type Baseline struct {
	// ID is derived from the content (first 12 hex digits of its SHA-256),
	// so two enrolments of the same data share an ID.
	ID string `json:"id"`
	// Created is the enrolment time (UTC).
	Created time.Time `json:"created"`
	// Asset optionally names the machine, e.g. "P-101A".
	Asset    string          `json:"asset,omitempty"`
	Features features.Config `json:"features"`
	Embed    embed.Config    `json:"embed"`
	Options  ModelOptions    `json:"model_options"`
	Calib    Calibration     `json:"calibration"`
	Level    LevelStats      `json:"level"`
	Enrolled Enrolment       `json:"enrolment"`
	// Lines is the machine's tonal signature for the running/stopped gate
	// (pkg/gate.Lines as JSON; decode with pkg/enrol.Lines). Empty when the
	// machine showed no usable lines or the baseline predates them.
	Lines json.RawMessage `json:"machine_lines,omitempty"`
	Model *Model          `json:"-"`
}

// Enrolment records what the baseline was learnt from.
type Enrolment struct {
	Recordings int     `json:"recordings"`
	Windows    int     `json:"windows"`
	Seconds    float64 `json:"seconds"`
	Dim        int     `json:"dim"`
	Components int     `json:"components"`
	// OperatingPoints is the number of healthy centres (1: the mean alone).
	OperatingPoints int `json:"operating_points,omitempty"`
}

// Compatible reports whether audio analysed with fc can be scored against b.
func (b *Baseline) Compatible(fc features.Config) error {
	if fc != b.Features {
		return fmt.Errorf("%w: baseline %s was enrolled with %s, this run uses %s",
			ErrMismatch, b.ID, describe(b.Features), describe(fc))
	}
	return nil
}

func describe(c features.Config) string {
	return fmt.Sprintf("%d Hz, frame %d, hop %d, %d mel bands", c.Rate, c.FrameLen, c.Hop, c.Mels)
}
