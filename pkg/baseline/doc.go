// Package baseline is the enrolled healthy reference of one machine: the
// model that turns an embedding input vector into a distance from healthy
// sound, its calibration, its quality checks and its file format.
//
// # Model
//
// Enrolment standardises every dimension with the healthy mean and standard
// deviation, then whitens with the principal components of the healthy
// windows. Eigenvalues below a floor are raised to it: the floor is the
// upper edge of the Marchenko-Pastur law, (1 + sqrt(D/Neff))^2 times the
// median eigenvalue, for D dimensions and Neff independent windows (times
// ModelOptions.Floor, default 1). Eigenvalues below that edge cannot be told
// from sampling noise. The components above it, where gain drift,
// background and speed set-points live, are whitened and so discounted;
// every other direction, where a fault shows, keeps the floor's weight.
//
// The embedding of a window is e = (a, c_1/sqrt(l_1), ..., c_K/sqrt(l_K),
// r/sqrt(floor)) where c_i are the coordinates on the K kept components, r
// is the residual outside them, and a is a constant anchor. The enrolled
// mean embedding is m = (a, 0, ..., 0): centring on the healthy mean puts
// every healthy window near the anchor's axis, and the anchor keeps the mean
// from being the zero vector, so the cosine distance 1 - e.m/(|e||m|) is
// defined. It equals 1 - a/sqrt(a^2 + d^2) with d the floored Mahalanobis
// distance: 0 for a window exactly at the healthy mean, approaching 1 for a
// window far from it. The anchor is set so a typical healthy window scores
// about 0.29.
//
// # Operating points
//
// A machine with several healthy operating points (drive set-points, a
// background that comes and goes) does not sound like one cloud around one
// mean. Enrolment may cluster the healthy windows by k-means into up to
// ModelOptions.Centroids centres; the whitening is then fitted to each
// window's offset from its own centre and shared, and a window is scored
// against its nearest centre (its own mean embedding). How many centres, 1
// to the maximum, is chosen on the calibration folds by the mean held-out
// log-likelihood of the model read as a Gaussian mixture, so centres that
// only fit one recording's quirks are not kept.
//
// # Calibration
//
// Windows are grouped by recording (or blocks of a long recording) into
// folds; each fold is scored by a model fitted without it. A gamma
// distribution fitted to these held-out distances sets the threshold at the
// configured per-window false-alarm probability, which is then restated as
// expected false alarms per day under a k-of-n debounce.
//
// # File
//
// See format.go for the byte layout; files are written atomically and carry
// a CRC-32C over everything before it.
package baseline
