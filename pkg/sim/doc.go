// Package sim synthesises the sound of a variable-speed centrifugal pump skid
// for training and testing auscult, and labels every clip it makes.
//
// The fictional plant is the Obrinvale raw-water lift station; its pumps carry
// asset tags such as "P-204B". Each seed describes a different pump: the number
// of motor poles, the line frequency, the impeller vane count, the bearing
// geometry, the drive set-points, the hall, the microphone and the mix of
// component levels all follow from it, so seeds 1, 2 and 3 are three machines.
//
// The machine is built from published relations, each cited where it is used:
// induction-motor synchronous speed and slip, pump vane-pass frequency, the
// rolling-bearing defect frequencies, and the pump affinity laws. A room
// response (direct path, early reflections and an exponentially decaying
// noise tail) places the machine and, separately, the nuisances in a
// reverberant hall. Plant ambient noise, a neighbouring machine that starts and
// stops, clanks, beepers and speech-like babble form the background, scaled to
// a signal-to-noise ratio drawn from {+10, +6, +3, 0, -3, -6} dB.
//
// Plan lays out a data set (healthy training clips, then healthy and faulty
// test clips shuffled together), Render turns one Clip into int16 samples and
// Stream renders an endless, seamless recording for a live agent. Set-points
// and SNRs are balanced across training, healthy test and faulty test clips,
// and nuisances occur with the same odds in all of them, so neither the
// conditions nor the loudness give the label away: a mild fault moves the
// clip level by a few hundredths of a dB, against a +-3 dB microphone gain
// offset per clip and the affinity-law level change between set-points.
//
// Levels: the SNR is machine (including any fault) power over all background
// power, measured over the clip at the microphone, after the room and the
// microphone's low-frequency roll-off. Fault severity is fault power over
// healthy machine power at the source: mild -24 dB, moderate -16 dB, severe
// -8 dB (see SeverityDB).
//
// Units: frequencies in Hz, levels in dB, times in seconds, lengths of bearing
// parts in millimetres, amplitudes as fractions of int16 full scale (1.0 is
// 32767) until Render quantises them.
//
// The package is pure: it performs no file or network I/O and keeps no global
// mutable state. Everything is deterministic from the seeds (math/rand/v2 PCG
// sources), so the same Options always yield the same clips, bit for bit.
//
// Caveats: the physics is a plausible sketch, not a validated vibro-acoustic
// model. Fault severities are set by the radiated power of the fault component
// relative to the healthy machine at the source, within the fault's own
// third-octave bands, before the room and the microphone; the microphone's low-frequency roll-off then hides much of the
// shaft-rate content, as a real microphone would, so low-frequency faults
// (imbalance, misalignment) are genuinely hard at the mild severity. The
// machine's acoustic power is assumed proportional to hydraulic power, so its
// level follows 30 log10 of the speed ratio (an assumption built on the
// affinity laws, not a law itself).
package sim
