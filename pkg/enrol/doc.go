// Package enrol learns a machine's healthy baseline from recordings or from
// a live stream: it runs the analysis pipeline over each healthy source with a
// window at every sub-window, checks the data is fit to learn from (length,
// silence, clipping, stationarity), fits and calibrates the model, and learns
// the machine's tonal lines for the running/stopped gate. The offline enroll
// command, the live enrolment and the tests all use it, so there is one way
// to make a baseline.
package enrol
