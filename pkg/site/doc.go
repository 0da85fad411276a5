// Package site is the agent's local web server for site visits: a status
// page, the score trend of the last day, week or month drawn as SVG on the
// server, the alarm and diagnostic history with each alarm's evidence clip
// (playable, with a spectrogram), the summaries, CSV and JSON exports, a
// consistent backup of the log, and a one-file HTML report for the visit
// record.
//
// It is off unless a listen address is configured. Every page and API
// needs the token (an Authorization: Bearer header, or the login form,
// which sets a cookie derived from the token); the token is compared in
// constant time. /healthz answers without it and says nothing else. All
// assets are embedded: the pages work with no internet, on a phone or a
// laptop.
//
// The store is read in short transactions, one page of records at a time,
// and never while writing to a client, so a slow client cannot hold up the
// agent's writes; a backup is first copied to a temporary file and then
// sent.
package site
