// Package ring is the hand-over point between the capture goroutine and the
// analysis pipeline: a fixed-size, single-producer single-consumer ring
// buffer of int16 samples that never blocks the producer and counts every
// sample it has to drop.
//
// # Concepts
//
// One goroutine (the producer) calls Write and Close; one other goroutine
// (the consumer) calls Read, ReadWait and NextGap. Stats, Cap and Len may be
// called from anywhere. The hot path uses only atomic loads and stores and
// one non-blocking channel send; it takes no lock and does not allocate
// after New.
//
// Write never waits. When the consumer has fallen behind and the buffer is
// full, Write keeps the samples that fit and drops the rest of the block
// (the newest samples): the samples already buffered are older and the
// consumer is about to read them, and a single-producer single-consumer
// buffer cannot overwrite them without a lock.
//
// # Positions and gaps
//
// All positions count samples, not bytes or blocks, from 0 at New:
//
//   - the producer position counts every sample offered to Write, kept or
//     dropped (the device's running sample counter);
//   - the delivered position counts the samples that entered the buffer,
//     which is the consumer's read position, since nothing else reaches it.
//
// A run of consecutive dropped samples is one gap (one overrun), however
// many Write calls it spans. A Gap records both positions of its first
// dropped sample and the run's length, so the consumer can log "gap of N
// samples at sample S" and knows after which of its own samples the
// discontinuity lies. A gap is queued when it ends (the next Write that
// keeps a sample, or Close) and always before any sample that follows it
// becomes readable. The gap queue is bounded too; a gap that finds it full
// is counted in Stats.GapsLost (its samples still count in Stats.Lost).
//
// # End of stream
//
// Close, called by the producer, ends the stream: the consumer still reads
// every buffered sample, then Read and ReadWait return io.EOF.
package ring
