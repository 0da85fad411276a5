package sim

import (
	"fmt"
	"math"
	"sort"
)

// Machine describes the pump skid chosen by a seed. All of it follows from
// Seed; the fields are exported for labelling and for checks, and Render reads
// them, so a Machine must come from NewMachine.
type Machine struct {
	// Seed is the seed NewMachine was called with.
	Seed int64
	// Site is the (fictional) plant.
	Site string
	// Asset is the pump's asset tag, e.g. "P-204B".
	Asset string
	// LineHz is the mains frequency, 50 or 60 Hz.
	LineHz float64
	// Poles is the number of motor poles, 2 or 4.
	Poles int
	// Slip is the motor's running slip, a fraction between 0.01 and 0.03.
	Slip float64
	// Vanes is the number of impeller vanes, 5 to 7.
	Vanes int
	// FanBlades is the number of blades of the motor's cooling fan.
	FanBlades int
	// Bearing is the geometry of the pump's drive-end bearing.
	Bearing Bearing
	// Setpoints are the variable-speed drive's output frequencies in Hz,
	// ascending, between 60 % and 100 % of LineHz.
	Setpoints []float64
	// CarrierHz is the drive's PWM switching frequency in Hz.
	CarrierHz float64
	// ResonanceHz is the structural resonance, in Hz, that bearing impacts
	// excite (2 kHz to 6 kHz).
	ResonanceHz float64
	// RT60 is the hall's reverberation time in seconds (0.6 to 1.5).
	RT60 float64
	// MachineDRRdB is the direct-to-reverberant ratio, in dB, at the
	// microphone for sound coming from the pump.
	MachineDRRdB float64
	// MicHighPassHz is the corner, in Hz, of the microphone's second-order
	// low-frequency roll-off (30 to 40 Hz).
	MicHighPassHz float64
	// TurbulenceCornerHz is the corner, in Hz, above which flow noise rolls
	// off at full speed; it scales with speed.
	TurbulenceCornerHz float64
	// Mix gives each healthy component's share of the machine's sound power,
	// in dB relative to the total (the shares sum to 0 dB).
	Mix Mix
	// VaneAM is the healthy amplitude-modulation depth (a fraction) of the
	// vane-pass tone at shaft rate.
	VaneAM float64
}

// Mix is the share of each healthy component in the machine's sound power,
// in dB relative to the whole machine.
type Mix struct {
	// Turbulence is the flow noise (pink, rolling off above a few kHz), dB.
	Turbulence float64
	// VanePass is the vane-pass tone with its harmonics and sidebands, dB.
	VanePass float64
	// Shaft is the 1x and 2x shaft-rate tones, dB.
	Shaft float64
	// FanTonal is the cooling fan's blade-pass tones, dB.
	FanTonal float64
	// FanBroadband is the cooling fan's broadband noise, dB.
	FanBroadband float64
	// Hum is the motor's magnetic hum at 2, 4 and 6 times the drive
	// frequency, dB.
	Hum float64
	// Carrier is the drive's PWM whine around CarrierHz, dB.
	Carrier float64
	// BearingNoise is the healthy bearings' faint noise near ResonanceHz, dB.
	BearingNoise float64
}

var siteNames = []string{"Obrinvale raw-water lift station", "Obrinvale booster hall", "Obrinvale clearwater pump house"}

// NewMachine returns the pump skid described by seed. Different seeds give
// different machines: poles, line frequency, vanes, bearing geometry,
// set-points, hall, microphone and component mix all vary.
func NewMachine(seed int64) Machine {
	r := newRand(uint64(seed), streamMachine)
	m := Machine{Seed: seed}
	m.Site = siteNames[r.IntN(len(siteNames))]
	m.Asset = fmt.Sprintf("P-%d%02d%c", 1+r.IntN(4), r.IntN(100), 'A'+rune(r.IntN(3)))
	m.LineHz = []float64{50, 60}[r.IntN(2)]
	m.Poles = []int{2, 4}[r.IntN(2)]
	m.Slip = math.Round(uniform(r, 0.01, 0.03)*1e4) / 1e4
	m.Vanes = 5 + r.IntN(3)
	// Cooling-fan blades (10 to 13) avoid the vane-pass orders and their
	// first sidebands, so fan tones never sit on fault sidebands.
	var blades []int
	for b := 10; b <= 13; b++ {
		if b < 2*m.Vanes-1 || b > 2*m.Vanes+1 {
			blades = append(blades, b)
		}
	}
	m.FanBlades = blades[r.IntN(len(blades))]
	balls := 7 + r.IntN(6)
	pitch := math.Round(uniform(r, 30, 80)*10) / 10
	ratio := uniform(r, 0.15, 0.25)
	angle := 0.0
	if r.IntN(3) == 0 {
		angle = math.Round(uniform(r, 5, 15))
	}
	m.Bearing = Bearing{Balls: balls, BallDiameter: math.Round(pitch*ratio*1000) / 1000, PitchDiameter: pitch, ContactAngleDeg: angle}
	// Three set-points: low, middle and high thirds of 60..100 % of line.
	bands := [][2]float64{{0.60, 0.70}, {0.75, 0.85}, {0.90, 1.00}}
	for _, b := range bands {
		m.Setpoints = append(m.Setpoints, math.Round(uniform(r, b[0], b[1])*m.LineHz*10)/10)
	}
	sort.Float64s(m.Setpoints)
	m.CarrierHz = []float64{2000, 2500, 3000, 4000, 5000}[r.IntN(5)]
	m.ResonanceHz = math.Round(uniform(r, 2000, 6000))
	m.RT60 = math.Round(uniform(r, 0.6, 1.5)*100) / 100
	m.MachineDRRdB = math.Round(uniform(r, 0, 6)*10) / 10
	m.MicHighPassHz = math.Round(uniform(r, 30, 40))
	m.TurbulenceCornerHz = math.Round(uniform(r, 2000, 4500))
	m.VaneAM = math.Round(uniform(r, 0.02, 0.06)*1000) / 1000
	shares := []float64{
		uniform(r, 0.25, 0.45), // turbulence
		uniform(r, 0.15, 0.35), // vane pass
		uniform(r, 0.02, 0.06), // shaft 1x, 2x
		uniform(r, 0.03, 0.10), // fan tonal
		uniform(r, 0.05, 0.15), // fan broadband
		uniform(r, 0.05, 0.15), // hum
		uniform(r, 0.01, 0.05), // carrier
		uniform(r, 0.01, 0.03), // bearing noise
	}
	var sum float64
	for _, s := range shares {
		sum += s
	}
	db := func(i int) float64 { return math.Round(100*10*math.Log10(shares[i]/sum)) / 100 }
	m.Mix = Mix{Turbulence: db(0), VanePass: db(1), Shaft: db(2), FanTonal: db(3), FanBroadband: db(4), Hum: db(5), Carrier: db(6), BearingNoise: db(7)}
	return m
}

// ShaftHz returns the pump's shaft rate in Hz at drive frequency driveHz.
func (m Machine) ShaftHz(driveHz float64) float64 { return ShaftHz(driveHz, m.Poles, m.Slip) }

// VanePassHz returns the vane-pass frequency in Hz at drive frequency driveHz.
func (m Machine) VanePassHz(driveHz float64) float64 { return VanePassHz(m.Vanes, m.ShaftHz(driveHz)) }
