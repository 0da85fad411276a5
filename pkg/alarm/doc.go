// Package alarm is the alarm state machine of one monitored machine: it
// turns the score of every analysis window into debounced, annunciated
// alarm events that an operator can acknowledge and shelve.
//
// The package is pure: no I/O, no goroutines and no clock of its own.
// Every call takes the time now as an argument, so tests run in virtual
// time and a replayed recording gives the same events as the live stream.
// A Tracker is not safe for concurrent use: one goroutine owns it (the
// scoring loop) and operator commands reach it through that owner.
//
// # Levels and debounce
//
// There are two levels, warning and alarm, each with a threshold on the
// score (cosine distance to the enrolled healthy mean, 0..1, from the
// baseline calibration). A running window is over a level when
// Score >= threshold. Each level is debounced on its own:
//
//   - on-delay: the level's condition becomes present when K of the last N
//     running windows were over (default 3 of 5);
//   - clear level: while present, only a score below ClearFraction ×
//     threshold (default 0.9) counts towards clearing, so a score hovering
//     between the clear level and the threshold keeps the condition;
//   - off-delay: the condition clears at the first running window that
//     comes at least OffDelay (default 20 s, time, not windows) after the
//     first window of an unbroken run of windows below the clear level.
//
// After a level clears, its window history is emptied, so it returns only
// after K fresh over windows. The alarm level's condition implies the
// warning level's (the warning condition is forced present whenever the
// alarm condition is), so the present severity is simply the higher of the
// present levels.
//
// # Stopped windows
//
// A window with Running false (the gate says the machine is stopped or the
// sensor is unhealthy), or with a NaN or infinite score, is skipped: it is
// neither over nor under, it does not enter the K-of-N history, and it
// interrupts an off-delay run, which starts again once the machine runs.
// So an active alarm stays exactly as it is while the machine is stopped,
// and it clears only on OffDelay of running evidence. There is no separate
// out-of-service state: stopping is not an operator action, and
// Snapshot.Running tells a display that the last window was skipped.
//
// # Severity
//
// ANSI/ISA-18.2 treats a high and a high-high limit as two alarms; this
// package folds them into one alarm with a severity. A warning that meets
// the alarm condition emits SeverityChanged (escalation) and, if it was
// acknowledged, becomes unacknowledged again: a worse condition needs a new
// acknowledgement (common practice, no source). An alarm whose alarm
// condition clears while the warning condition holds emits SeverityChanged
// back to warning (de-escalation) and keeps its acknowledgement state. A
// condition that appears at alarm severity directly is raised as an alarm
// with no warning first.
//
// # Annunciation states
//
// The state names are those of the ANSI/ISA-18.2 alarm state transition
// diagram (from memory): NORM, UNACK, ACKED, RTNUN and SHLVD. Without
// latching, a raised alarm (UNACK) whose condition clears before it is
// acknowledged returns to normal unacknowledged (RTNUN); an acknowledged
// one (ACKED) returns to NORM. With Config.Latch, a raised alarm stays
// annunciated after its condition clears (UNACK or ACKED with
// Snapshot.Severity none) until an operator acknowledges it after the
// return; that acknowledgement resets it to NORM. A condition that returns
// in RTNUN or while latched is raised again as a new occurrence.
//
// # Shelving
//
// Shelve removes the alarm from annunciation for a bounded time (at most
// Config.MaxShelve, default 8 h). While shelved, both levels keep being
// tracked but no Raised, Cleared or SeverityChanged events are emitted,
// and acknowledging is refused. The shelve ends with Unshelve or by itself
// at the first Observe at or after its end (Unshelved with reason
// "expired"). A condition present when the shelve ends is annunciated at
// once as a new occurrence (Raised, state UNACK) carrying the evidence of
// the window where it arose; otherwise the state is NORM. Shelving an
// already shelved alarm replaces the end time.
//
// # Events
//
// Events are plain values (no pointers) appended to a caller-provided
// slice, so the per-window path does not allocate. Each Raised increments
// Occurrence; every later event carries the occurrence number of the
// latest raise, so the event log can tie clear, acknowledge and severity
// changes to it. Raised and escalating SeverityChanged events carry the
// most deviating frequency bands and the sample index of the window where
// the condition reached that severity; other events repeat those of the
// current occurrence.
package alarm
