// Package gate tells, apart from the anomaly score, whether the machine is
// running and whether the sensor is healthy, so a stopped pump neither
// alarms nor pollutes a baseline and a dead or clipping microphone raises a
// diagnostic, never an anomaly alarm.
//
// # Sensor health
//
// A Sensor watches every raw int16 block (Observe) and judges an interval
// each time the agent closes one (Close, typically once a second). Each
// diagnostic (Kind) is judged on the interval and debounced on its own:
// raised after it has persisted for SensorConfig.RaiseSeconds, cleared
// after it has been gone for ClearSeconds, each change an event. The
// diagnostics are digital silence (peak of a few LSB at most), clipping
// (share of samples at full scale), DC offset (mean beyond 5 % of full
// scale), a stuck value (one value repeated for 0.1 s) and few levels (at
// most 4 distinct values: square patterns, stuck bits). KindNoData is for
// the capture layer, which alone can see missing data. While any diagnostic
// is raised, Healthy is false and the agent treats windows as unusable.
//
// # Running or stopped
//
// A Machine gate judges each analysis window (embed.Window) on two cues:
//
//   - level: the window's RMS level against the healthy range enrolled in
//     the baseline, mean +- max(6 dB, 3 standard deviations);
//   - lines: the machine's tonal lines in the fine view (shaft rate,
//     vane pass, hum, fan tones). At enrolment a LineLearner finds the
//     fine-view bands that stand out of their neighbours while the machine
//     runs, and keeps a few templates of their prominence (one per running
//     condition, such as a speed set-point; see Lines). A window's match
//     is how much of the best-fitting template's line prominence it still
//     shows, in [0, 1]. Prominence is relative to neighbouring bands, so
//     neither gain nor level normalisation moves it.
//
// A window is evidence of a stop when the lines are gone (match below
// MachineConfig.StopMatch times the enrolled 10th percentile) and it is not
// louder than the healthy range, or when it is far below the healthy range
// and the lines are not clearly present; it is evidence of running when
// the lines are clearly present (match at or above RunMatch times that
// percentile); otherwise it says nothing. The state (Unknown at start,
// Running, Stopped) changes only after StopWindows, RunWindows or
// StartWindows windows of evidence with none of the other kind between
// them; every change is a MachineEvent. A gain drift of a few dB moves
// neither cue, and a microphone that lost sensitivity still shows the
// lines. A machine without lines (empty Lines) is judged by level alone.
//
// # What it cannot tell
//
//   - At low signal-to-noise ratio the lines sink into the background.
//     On the project's simulator (pumps 1 to 8, TestMachineSweep), stop and
//     restart were found within 10 windows (mostly 5, about 10 s) at every
//     SNR from +10 to 0 dB, with no false change through gain drift,
//     set-point changes and severe faults; at -3 dB one stop in eight was
//     missed, at -6 dB half were, and once a severe fault read as a stop.
//     A stopped machine that still reads as running is scored as usual: its
//     anomaly score rises with the SNR the machine had (of the stopped
//     windows, 54 to 96 % crossed the alarm threshold at +10 dB, 0 to 21 % at
//     0 dB), so the alarm logic may see it; at -6 dB the enrolled "healthy"
//     sound is mostly background and a stopped machine scores as healthy,
//     so it neither alarms nor is noticed.
//   - A running machine whose lines vanish (a set-point or speed never
//     seen at enrolment, a belt that slips off, a drive that loses speed
//     control) reads as stopped when it is not louder than the healthy
//     range. Enrol every running condition; the agent should publish a
//     stop it did not expect, because it can hide a fault.
//   - Another machine whose tones fall in the same bands can keep a
//     stopped machine reading as running; the template match counts a
//     foreign line at most at its template share, and a few of them are
//     needed to reach the running threshold.
//   - Without lines the level alone decides, so a stop is seen only when
//     the machine dominates the background by more than the healthy range.
//
// # Units and time
//
// Levels in dBFS (AES17: a full-scale sine is 0 dBFS), level differences
// and prominences in dB, positions in samples of the stream; the package
// never reads a clock. It is pure: no I/O, no goroutines, no global mutable
// state, and after construction Observe, Close and Update do not allocate
// (given event slices with spare capacity).
package gate
