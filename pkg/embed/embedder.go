package embed

import (
	"fmt"
	"math"

	"github.com/auscult/auscult/pkg/features"
)

// Window is one analysis window's result. Vec is valid only during the emit
// call that delivers it; copy it to keep it.
type Window struct {
	// Index counts analysis windows from 0 in the stream.
	Index int64
	// Start and End are the window's sample positions [Start, End).
	Start, End int64
	// Vec holds the pooled statistics, Dim() values (dB and dB-like units).
	Vec []float32
	// LevelDBFS is the window's RMS level in dBFS, full-scale sine = 0 dBFS
	// (AES17 convention).
	LevelDBFS float64
	// ClipFraction is the share of samples at or beyond full scale
	// (|x| >= 32767).
	ClipFraction float64
}

// Embedder consumes a sample stream and emits analysis windows. It is not
// safe for concurrent use; one Embedder serves one stream.
type Embedder struct {
	fc  features.Config
	cfg Config

	mel     *features.Framer
	ext     *features.Extractor
	row     []float32
	onFrame func([]int16)

	long     *features.Framer
	longFFT  *features.FFT
	longWin  []float32
	longBuf  []float32
	longPow  []float32
	fineBank *features.Bank
	onLong   func([]int16)

	nMel, nStd, nLow, nFine, dim int
	// offsets of the parts in a vector
	offMean, offStd, offLow, offFine int
	rowSum                           float64   // sum of all log-mel values in the sub-window, when sum is not kept
	rows                             []float32 // the sub-window's log-mel rows, frames x Mels (for the low quantile)
	lowCol                           []float32

	// per sub-window accumulators
	sum, sumSq  []float64
	frames      int
	fineReady   bool
	fineVals    []float32
	subPower    float64 // mean square of the pending sub-window, full scale = 1
	subClipped  int
	subSamples  int
	subIndex    int64 // sub-windows completed
	levelSubs   []float64
	clipSubs    []float64
	subs        [][]float32 // ring of the last Window sub-window vectors
	sortScratch []float32
	out         Window
	emit        func(*Window)
}

// New builds an Embedder for the feature configuration fc and window
// configuration cfg. All tables are built here; Push does not allocate.
func New(fc features.Config, cfg Config) (*Embedder, error) {
	if err := fc.Validate(); err != nil {
		return nil, err
	}
	if err := cfg.Validate(fc.Hop); err != nil {
		return nil, err
	}
	ext, err := features.NewExtractor(fc)
	if err != nil {
		return nil, err
	}
	e := &Embedder{fc: fc, cfg: cfg, ext: ext,
		mel: features.NewFramer(fc.FrameLen, fc.Hop), row: make([]float32, fc.Mels)}
	if cfg.Mean {
		e.nMel = fc.Mels
	}
	if cfg.Std {
		e.nStd = fc.Mels
	}
	if cfg.Low {
		e.nLow = fc.Mels
		e.rows = make([]float32, cfg.SubHops*fc.Mels)
		e.lowCol = make([]float32, cfg.SubHops)
	}
	subLen := cfg.SubHops * fc.Hop
	e.long = features.NewFramer(subLen, subLen)
	if e.longFFT, err = features.NewFFT(subLen); err != nil {
		return nil, err
	}
	e.longWin = features.Hann(subLen)
	e.longBuf = make([]float32, subLen)
	e.longPow = make([]float32, subLen/2+1)
	if cfg.Fine {
		fmax := math.Min(cfg.FineFMax, float64(fc.Rate)/2)
		e.fineBank, err = features.NewLogBank(fc.Rate, subLen, cfg.FineFMin, fmax, cfg.FineBandsPerOctave)
		if err != nil {
			return nil, fmt.Errorf("embed: fine view: %w", err)
		}
		e.nFine = e.fineBank.Len()
		e.fineVals = make([]float32, e.nFine)
	}
	e.offMean, e.offStd = 0, e.nMel
	e.offLow = e.offStd + e.nStd
	e.offFine = e.offLow + e.nLow
	e.dim = e.offFine + e.nFine
	if e.dim == 0 {
		return nil, fmt.Errorf("embed: no embedding parts selected")
	}
	e.sum = make([]float64, fc.Mels)
	e.sumSq = make([]float64, fc.Mels)
	e.subs = make([][]float32, cfg.Window)
	for i := range e.subs {
		e.subs[i] = make([]float32, e.dim)
	}
	e.levelSubs = make([]float64, cfg.Window)
	e.clipSubs = make([]float64, cfg.Window)
	e.sortScratch = make([]float32, cfg.Window)
	e.out.Vec = make([]float32, e.dim)
	e.onFrame = e.frame
	e.onLong = e.longFrame
	return e, nil
}

// Dim is the length of every Window.Vec.
func (e *Embedder) Dim() int { return e.dim }

// Config returns the window configuration.
func (e *Embedder) Config() Config { return e.cfg }

// FeatureConfig returns the feature configuration.
func (e *Embedder) FeatureConfig() features.Config { return e.fc }

// SubWindowSamples is the sub-window length in samples.
func (e *Embedder) SubWindowSamples() int { return e.cfg.SubHops * e.fc.Hop }

// StepSamples is the distance between consecutive windows in samples.
func (e *Embedder) StepSamples() int { return e.cfg.Step * e.SubWindowSamples() }

// WindowSamples is the length of one analysis window in samples.
func (e *Embedder) WindowSamples() int { return e.cfg.Window * e.SubWindowSamples() }

// Push feeds samples; emit is called for every analysis window that p
// completes, in order. emit must not keep w or w.Vec after it returns.
func (e *Embedder) Push(p []int16, emit func(w *Window)) {
	e.emit = emit
	for len(p) > 0 {
		// Small chunks keep the long-FFT sub-window and the framed
		// sub-window in step: at most one finished long frame waits.
		n := min(len(p), e.fc.Hop)
		e.long.Push(p[:n], e.onLong)
		e.mel.Push(p[:n], e.onFrame)
		p = p[n:]
	}
	e.emit = nil
}

func (e *Embedder) frame(f []int16) {
	if e.nLow > 0 {
		e.row = e.rows[e.frames*e.fc.Mels : (e.frames+1)*e.fc.Mels]
	}
	e.ext.Rows(f, e.row)
	if e.nMel > 0 || e.nStd > 0 {
		for b, v := range e.row {
			x := float64(v)
			e.sum[b] += x
			e.sumSq[b] += x * x
		}
	} else {
		var s float32
		for _, v := range e.row {
			s += v
		}
		e.rowSum += float64(s)
	}
	e.frames++
	if e.frames == e.cfg.SubHops {
		e.closeSub()
	}
}

func (e *Embedder) longFrame(f []int16) {
	var sq float64
	clipped := 0
	for i, s := range f {
		x := float32(s) * (1.0 / 32768)
		sq += float64(x) * float64(x)
		if s >= 32767 || s <= -32767 {
			clipped++
		}
		e.longBuf[i] = x * e.longWin[i]
	}
	e.subPower = sq / float64(len(f))
	e.subClipped = clipped
	e.subSamples = len(f)
	if e.fineBank != nil {
		e.longFFT.Power(e.longBuf, e.longPow)
		e.fineBank.Apply(e.longPow, e.fineVals)
		// Reference: a full-scale sine under a periodic Hann window has a
		// peak power of (N/4)^2 spread over 1.5 bins of energy.
		n := float64(len(f))
		ref := float32(1 / (n * n / 16 * 1.5))
		for i, v := range e.fineVals {
			e.fineVals[i] = max(features.DB(v*ref), e.fc.FloorDB)
		}
	}
	e.fineReady = true
}

func (e *Embedder) closeSub() {
	slot := e.subs[e.subIndex%int64(e.cfg.Window)]
	inv := 1 / float64(e.frames)
	level := e.rowSum * inv
	e.rowSum = 0
	for b := 0; b < e.fc.Mels; b++ {
		m := e.sum[b] * inv
		level += m
		if e.nMel > 0 {
			slot[e.offMean+b] = float32(m)
		}
		if e.nStd > 0 {
			v := e.sumSq[b]*inv - m*m
			slot[e.offStd+b] = float32(math.Sqrt(max(v, 0)))
		}
		if e.nLow > 0 {
			k := int(e.cfg.LowQuantile*float64(e.frames-1) + 0.5)
			slot[e.offLow+b] = kthSmallest(e.rows[b:], e.fc.Mels, e.frames, k, e.lowCol)
		}
		e.sum[b], e.sumSq[b] = 0, 0
	}
	level /= float64(e.fc.Mels)
	if e.cfg.LevelRMS {
		level = 10 * math.Log10(max(e.subPower, 1e-12))
	}
	if !e.cfg.LevelNorm {
		level = 0
	}
	for b := 0; b < e.nMel; b++ {
		slot[e.offMean+b] -= float32(level)
	}
	for b := 0; b < e.nLow; b++ {
		slot[e.offLow+b] -= float32(level)
	}
	for i, v := range e.fineVals {
		slot[e.offFine+i] = v - float32(level)
	}
	ring := e.subIndex % int64(e.cfg.Window)
	e.levelSubs[ring] = e.subPower
	e.clipSubs[ring] = float64(e.subClipped) / float64(max(e.subSamples, 1))
	e.frames = 0
	e.fineReady = false
	e.subIndex++
	done := e.subIndex
	w := int64(e.cfg.Window)
	if done >= w && (done-w)%int64(e.cfg.Step) == 0 {
		e.emitWindow(done-w, e.cfg.Window)
	}
}

// Flush ends the stream. A stream too short for one full analysis window
// but holding at least one whole sub-window gets one shorter window, so a
// short recording still gets a score; otherwise Flush emits nothing. The
// partial sub-window at the end is dropped. The Embedder is then reset.
func (e *Embedder) Flush(emit func(w *Window)) {
	if n := e.subIndex; n > 0 && n < int64(e.cfg.Window) {
		e.emit = emit
		e.emitWindow(0, int(n))
		e.emit = nil
	}
	e.Reset()
}

// Reset forgets the stream so the Embedder can start a new one.
func (e *Embedder) Reset() {
	e.mel.Reset()
	e.long.Reset()
	clear(e.sum)
	clear(e.sumSq)
	e.rowSum = 0
	e.frames, e.subIndex, e.fineReady = 0, 0, false
}

// emitWindow pools the count sub-windows starting at firstSub; all of them
// are in the ring.
func (e *Embedder) emitWindow(firstSub int64, count int) {
	vals := e.sortScratch[:count]
	trim := min(e.cfg.Trim, (count-1)/2)
	keep := count - 2*trim
	ring := int64(e.cfg.Window)
	for d := 0; d < e.dim; d++ {
		for i := range count {
			vals[i] = e.subs[(firstSub+int64(i))%ring][d]
		}
		insertionSort(vals)
		var s float32
		for _, v := range vals[trim : trim+keep] {
			s += v
		}
		e.out.Vec[d] = s / float32(keep)
	}
	var p, c float64
	for i := range count {
		k := (firstSub + int64(i)) % ring
		p += e.levelSubs[k]
		c += e.clipSubs[k]
	}
	p /= float64(count)
	c /= float64(count)
	sub := int64(e.SubWindowSamples())
	e.out.Index = firstSub / int64(e.cfg.Step)
	e.out.Start = firstSub * sub
	e.out.End = e.out.Start + int64(count)*sub
	// AES17: a full-scale sine (mean square 0.5) reads 0 dBFS.
	e.out.LevelDBFS = 10 * math.Log10(max(2*p, 1e-20))
	e.out.ClipFraction = c
	if e.emit != nil {
		e.emit(&e.out)
	}
}

func insertionSort(v []float32) {
	for i := 1; i < len(v); i++ {
		x := v[i]
		j := i - 1
		for j >= 0 && v[j] > x {
			v[j+1] = v[j]
			j--
		}
		v[j+1] = x
	}
}

// kthSmallest returns the k-th smallest (from 0) of n values spaced stride
// apart in x, keeping the k+1 smallest seen so far sorted in buf (len > k):
// for a low quantile most values are rejected with one comparison.
func kthSmallest(x []float32, stride, n, k int, buf []float32) float32 {
	keep := buf[:0]
	for i := 0; i < n; i++ {
		v := x[i*stride]
		if len(keep) == k+1 {
			if v >= keep[k] {
				continue
			}
			keep = keep[:k]
		}
		j := len(keep)
		keep = append(keep, v)
		for j > 0 && keep[j-1] > v {
			keep[j] = keep[j-1]
			j--
		}
		keep[j] = v
	}
	return keep[k]
}
