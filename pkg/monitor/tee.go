package monitor

import (
	"context"
	"io"

	"github.com/auscult/auscult/pkg/audio"
)

// tee is the source the pipeline reads: it passes every block to the sensor
// checks and the evidence buffer on its way, and ends the stream when the
// context is cancelled.
type tee struct {
	ctx context.Context
	src audio.Source
	m   *Monitor
	err error // the source's failure, if it had one
}

func (t *tee) Rate() int { return t.src.Rate() }

func (t *tee) Read(p []int16) (int, error) {
	if t.ctx.Err() != nil {
		return 0, io.EOF
	}
	n, err := t.src.Read(p)
	if n > 0 {
		t.m.samples(p[:n])
	}
	if err != nil && t.ctx.Err() != nil {
		return n, io.EOF // told to stop: a read cut short is the end, not a failure
	}
	if err != nil && err != io.EOF {
		t.err = err
		return n, err
	}
	return n, err
}

// samples feeds a block to the sensor checks (closing an interval about
// once a second) and to the evidence buffer.
func (m *Monitor) samples(block []int16) {
	m.mu.Lock()
	defer m.mu.Unlock()
	m.sensor.Observe(block)
	m.sinceHz += len(block)
	pos := m.evidence.pos + int64(len(block))
	if m.sinceHz >= m.rate {
		m.sinceHz = 0
		m.sensorEv = m.sensor.Close(pos, m.sensorEv[:0])
		for _, e := range m.sensorEv {
			m.sensorEvent(e)
		}
	}
	m.clips = m.evidence.push(block, m.clips)
	for _, c := range m.clips {
		m.saveClip(c)
	}
}
