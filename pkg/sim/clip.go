package sim

import (
	"fmt"
	"strconv"
)

// Clip describes one recording of the data set; Render turns it into samples.
type Clip struct {
	// Name is the file name, "train_0001.wav" or "test_0001.wav"; test
	// names do not reveal the label.
	Name string
	// Split is "train" or "test".
	Split string
	// Label is 0 for a healthy machine and 1 for a faulty one.
	Label int
	// Fault is "" for a healthy machine, else one of Faults().
	Fault string
	// Severity is "" for a healthy machine, else one of Severities().
	Severity string
	// SNRdB is the ratio, in dB, of machine power (including any fault) to
	// all background power over the clip at the microphone (after the room
	// and the microphone's response), one of SNRSet().
	SNRdB float64
	// SetpointHz is the drive's nominal output frequency in Hz.
	SetpointHz float64
	// Nuisance lists the nuisances present, joined by "+" (for example
	// "clank+speech"), or "none"; plant ambient noise is always present.
	Nuisance string
	// Seed drives every random choice inside the clip.
	Seed uint64
}

// Fault names.
const (
	FaultBearingOuter   = "bearing_outer"
	FaultBearingInner   = "bearing_inner"
	FaultCavitation     = "cavitation"
	FaultImbalance      = "imbalance"
	FaultMisalignment   = "misalignment"
	FaultLooseness      = "looseness"
	FaultImpellerDamage = "impeller_damage"
	FaultLeak           = "leak"
	FaultDryRunning     = "dry_running"
)

// Faults returns the fault names in a fixed order.
func Faults() []string {
	return []string{FaultBearingOuter, FaultBearingInner, FaultCavitation, FaultImbalance,
		FaultMisalignment, FaultLooseness, FaultImpellerDamage, FaultLeak, FaultDryRunning}
}

// Severities returns the severity names from mildest to worst.
func Severities() []string { return []string{"mild", "moderate", "severe"} }

// SeverityDB returns the design power of a fault component relative to the
// healthy machine, in dB, measured in the fault's own third-octave bands
// (those holding 80 % of its power; see inBandRatio): mild -6 dB, moderate
// 0 dB, severe +6 dB. At mild the fault sits below the machine sound that
// masks it in its own bands, and further below the background at low SNR:
// near the edge of audibility (a design choice based on critical-band
// masking, common practice, no source for the exact values). Unknown
// severities return -200 dB.
func SeverityDB(severity string) float64 {
	switch severity {
	case "mild":
		return -6
	case "moderate":
		return 0
	case "severe":
		return 6
	}
	return -200
}

// SNRSet returns the signal-to-noise ratios, in dB, that clips are drawn from.
func SNRSet() []float64 { return []float64{10, 6, 3, 0, -3, -6} }

// LabelsCSVHeader returns the header line (without newline) matching CSVRow.
func LabelsCSVHeader() string {
	return "file,label,fault,severity,snr_db,setpoint_hz,nuisance,snr_band"
}

// CSVRow returns the clip as one CSV line (without newline) in the columns of
// LabelsCSVHeader. No field contains a comma or a quote.
func (c Clip) CSVRow() string {
	return fmt.Sprintf("%s,%d,%s,%s,%s,%s,%s,%s", c.Name, c.Label, c.Fault, c.Severity,
		strconv.FormatFloat(c.SNRdB, 'f', -1, 64), strconv.FormatFloat(c.SetpointHz, 'f', 1, 64),
		c.Nuisance, snrBand(c.SNRdB))
}

// snrBand formats an SNR as a signed band label such as "+10", "0" or "-3".
func snrBand(db float64) string {
	s := strconv.FormatFloat(db, 'f', -1, 64)
	if db > 0 {
		return "+" + s
	}
	return s
}
