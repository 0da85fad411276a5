// Package pipeline drives a sound source through the analysis chain: samples
// in, analysis windows with their distance from the enrolled healthy sound
// out. Enrolment, scoring, evaluation and the live agent all run through
// Run, so there is one code path from samples to scores.
package pipeline
