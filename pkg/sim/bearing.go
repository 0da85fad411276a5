package sim

import "math"

// Bearing is the geometry of a rolling-element bearing. The two diameters may
// be in any one unit (millimetres here); only their ratio matters.
type Bearing struct {
	// Balls is the number of rolling elements n.
	Balls int
	// BallDiameter is the rolling-element diameter d, in mm.
	BallDiameter float64
	// PitchDiameter is the pitch (cage) diameter D, in mm.
	PitchDiameter float64
	// ContactAngleDeg is the contact angle theta, in degrees.
	ContactAngleDeg float64
}

// k returns (d/D) cos theta, the geometry ratio shared by all four relations.
func (b Bearing) k() float64 {
	return b.BallDiameter / b.PitchDiameter * math.Cos(b.ContactAngleDeg*math.Pi/180)
}

// FTF returns the fundamental train (cage) frequency in Hz for a shaft turning
// at shaftHz with a stationary outer race: fr/2 (1 - k).
// Source: Kim, An and Choi, "Diagnostics 101", Applied Sciences 10(20):7302,
// 2020, eq. 1.
func (b Bearing) FTF(shaftHz float64) float64 {
	return shaftHz / 2 * (1 - b.k())
}

// BPFO returns the ball-pass frequency of the outer race in Hz:
// n fr/2 (1 - k). Source: Kim, An and Choi 2020, eq. 2.
func (b Bearing) BPFO(shaftHz float64) float64 {
	return float64(b.Balls) * shaftHz / 2 * (1 - b.k())
}

// BPFI returns the ball-pass frequency of the inner race in Hz:
// n fr/2 (1 + k). Source: Kim, An and Choi 2020, eq. 3.
func (b Bearing) BPFI(shaftHz float64) float64 {
	return float64(b.Balls) * shaftHz / 2 * (1 + b.k())
}

// BSF returns the ball spin frequency in Hz: D fr/(2 d) (1 - k^2).
// Source: Kim, An and Choi 2020, eq. 4.
func (b Bearing) BSF(shaftHz float64) float64 {
	k := b.k()
	return b.PitchDiameter * shaftHz / (2 * b.BallDiameter) * (1 - k*k)
}
