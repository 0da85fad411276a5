// Package monitor is the live listening loop: it drives the analysis pipeline
// over an endless source and turns its windows into what a plant needs, an
// alarm state, events, a minute trend, periodic summaries and evidence clips,
// all handed to a Sink (the local log, and through it the message outbox).
//
// One Run call owns the loop. Samples pass a tee on their way into the
// pipeline, where the sensor-health checks and the evidence buffer see every
// block; each analysis window is then gated (is the machine running, is the
// sensor healthy), scored against the baseline, and fed to the alarm tracker.
// Nothing in the per-window path allocates except when an event is made.
//
// Time: a Clock maps a sample position to the UTC time stamped on what the
// window produced. Live capture uses the wall clock; a replayed recording uses
// its own sample count from a start time, so an hour of audio replayed in a
// minute still yields sixty minute-trend points.
//
// Operator actions (acknowledge, shelve, unshelve) may come from any
// goroutine; they are serialised with the window processing by a mutex.
package monitor
