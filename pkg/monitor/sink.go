package monitor

import "github.com/auscult/auscult/pkg/store"

// Sink receives what the monitor produces. *store.Store implements it.
// AppendEvent must make the event durable before it returns; trend points and
// summaries may be buffered.
type Sink interface {
	AppendEvent(e store.Event) (seq uint64, err error)
	AddTrend(p store.TrendPoint) error
	AddSummary(s store.Summary) error
	PutClip(c store.Clip) (id uint64, err error)
	// ReserveClipID hands out the id the evidence clip of a raise will be
	// stored under, so the raise can name it before the clip is complete.
	ReserveClipID() (uint64, error)
}

var _ Sink = (*store.Store)(nil)
