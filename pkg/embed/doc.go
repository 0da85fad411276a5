// Package embed turns a stream of samples into one embedding input vector per
// analysis window: pooled statistics of log spectra that the baseline package
// then standardises, whitens and compares with the enrolled healthy mean.
//
// The stream is cut into sub-windows of SubHops feature hops (1.024 s at the
// defaults). For each sub-window the package can keep four parts (Config
// says which; the defaults are marked):
//
//   - low (default): a low quantile over frames (the 10th percentile) of
//     every log-mel band, in dB: the steady floor of the machine's sound,
//     which speech, beeps and clanks in some frames do not move;
//   - fine (default): one long FFT over the whole sub-window (about 1 Hz
//     per bin at 16 kHz) pooled into bands of constant relative width,
//     where shaft-rate harmonics and vane-pass lines stay separate;
//   - mean: the mean over frames of every log-mel band (dB);
//   - std: the standard deviation over frames of every log-mel band (dB).
//
// docs/evaluation.md measures what each adds. The mean log-mel level of
// the sub-window is subtracted from the low, mean and fine parts, so a
// microphone gain change of a few dB moves nothing. An
// analysis window is Window consecutive sub-windows, advanced by Step; each
// dimension is the trimmed mean over its sub-windows (Trim values dropped at
// each end), so one clank or one spoken word inside a window barely moves it.
//
// Time comes from the sample counter only: Window.Start and Window.End are
// sample positions in the stream, and results do not depend on how the
// stream was cut into blocks.
package embed
