package main

import (
	"fmt"
	"io"
	"os"
	"time"
)

// progress prints "files done, rate, time left" on one rewritten line when
// w is a terminal, and nothing otherwise.
type progress struct {
	w     io.Writer
	on    bool
	total int
	done  int
	audio float64 // seconds of audio processed
	start time.Time
	last  time.Time
	verb  string
	// cleared is set when end erased the line since it was last drawn.
	cleared bool
}

func newProgress(w io.Writer, verb string, total int) *progress {
	on := false
	if f, ok := w.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode()&os.ModeCharDevice != 0 {
			on = true
		}
	}
	now := time.Now()
	return &progress{w: w, on: on, total: total, start: now, verb: verb}
}

// step records one finished file of the given audio duration.
func (p *progress) step(seconds float64) {
	p.done++
	p.audio += seconds
	if !p.on {
		return
	}
	now := time.Now()
	if now.Sub(p.last) < 200*time.Millisecond && p.done < p.total && !p.cleared {
		return
	}
	p.cleared = false
	p.last = now
	el := now.Sub(p.start).Seconds()
	rate := p.audio / max(el, 1e-9)
	left := el / float64(p.done) * float64(p.total-p.done)
	fmt.Fprintf(p.w, "\r%s %d/%d files, %.0fx realtime, %s left   ", p.verb, p.done, p.total, rate,
		(time.Duration(left) * time.Second).Round(time.Second))
}

// end clears the progress line; the next step draws it again, so call it
// before writing other output to the same terminal.
func (p *progress) end() {
	if p.on && p.done > 0 {
		fmt.Fprint(p.w, "\r\033[K")
		p.cleared = true
	}
}
