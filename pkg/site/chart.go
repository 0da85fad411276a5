package site

import (
	"encoding/xml"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
	"time"
	"unicode/utf8"

	"github.com/auscult/auscult/pkg/store"
)

// ErrBadChart is returned (wrapped) by TrendChart.WriteSVG when the chart
// description cannot be drawn: an empty or reversed time axis, a size out
// of range, a threshold that is not a score, an unknown alarm severity.
var ErrBadChart = errors.New("site: invalid trend chart")

// TrendChart describes one chart of the minute trend: three panels stacked
// on one time axis, the anomaly score (0 to 2, cosine distance to the
// baseline), the RMS level in dBFS and the running fraction (0 to 1), with
// the raised alarms and warnings marked across all three.
type TrendChart struct {
	// From and To bound the time axis, [From, To), in UTC. To must be
	// after From, by at most 20 years. Points and alarm marks outside are
	// left out.
	From, To time.Time
	// Points is the minute trend as the store returns it. Any order is
	// accepted; the chart does not depend on it. Minutes missing from the
	// log (the agent was off) are drawn as gaps, and so are the score
	// fields of minutes with no scored windows (Windows == 0).
	Points []store.TrendPoint
	// Alarms are the raised alarms and warnings to mark on the time axis.
	Alarms []AlarmMark
	// Threshold is the alarm threshold on the score (cosine distance, 0 to
	// 2), drawn as a dashed line; 0 draws none.
	Threshold float64
	// WarnThreshold is the warning threshold on the score (cosine
	// distance, 0 to 2), drawn as a differently dashed line; 0 draws none.
	WarnThreshold float64
	// Width and Height are the size of the whole SVG in pixels (user
	// units); zero means 960 and 540. Each must be 0 or from 320 x 240 to
	// 8192 x 8192.
	Width, Height int
	// Title is drawn above the panels and is the SVG's accessible title,
	// for example "P-492B, last 24 hours"; empty gives the accessible title
	// "Minute trend". Any text is accepted; it is escaped.
	Title string
}

// AlarmMark is one alarm or warning raise to mark on a TrendChart's time
// axis with a vertical line across all panels.
type AlarmMark struct {
	// Time is when the alarm or warning was raised (UTC).
	Time time.Time
	// Severity is "alarm" (solid line, filled triangle) or "warning"
	// (dashed line, open diamond); case is ignored.
	Severity string
	// Label is drawn at the top of the line where there is room, for
	// example "alarm #3", and is always in the mark's tooltip. Any text is
	// accepted; it is escaped and cut to 32 characters in the drawing.
	Label string
}

// Chart sizes and layout, in SVG user units (pixels).
const (
	chartDefaultWidth  = 960
	chartDefaultHeight = 540
	chartMinWidth      = 320
	chartMinHeight     = 240
	chartMaxSide       = 8192
	chartMarginLeft    = 78
	chartMarginRight   = 20
	chartPanelsTop     = 60 // title, then the alarm markers and labels
	chartMarginBottom  = 44 // two lines of time labels
	chartPanelGap      = 12
	chartMarkerY       = 50 // centre of the alarm markers
	chartLabelMaxRunes = 32
	chartMinTickSpace  = 64 // least pixels between time ticks
	chartMaxTimeTicks  = 9
	chartFlushBytes    = 32 << 10
	chartMaxSpan       = 20 * 366 * 24 * time.Hour
)

// Panel indexes, top to bottom.
const (
	chartScore = iota
	chartLevel
	chartRunning
	chartPanels
)

// Palette: alarm a dark crimson, warning a light amber, so that the two
// differ in lightness as well as hue; each also has its own dash and
// marker shape, so nothing depends on colour alone.
const (
	chartAlarmColour   = "#a3123a"
	chartWarningColour = "#d98a00"
	chartAlarmDash     = ""        // solid
	chartWarningText   = "#8a5600" // darker amber for text on white
	chartWarningDash   = "5 3"     // dashed
)

// chartStyle is the one style block; every rule is scoped to #trend so
// that it cannot leak into a page that inlines the SVG.
const chartStyle = `<style type="text/css"><![CDATA[
#trend text{font-family:sans-serif;font-size:11px;fill:#333}
#trend .t-title{font-size:15px;font-weight:bold;fill:#1b1b1b}
#trend .t-cap{font-size:12px;fill:#1b1b1b}
#trend .t-frame{fill:#fcfcfc;stroke:#7a7a7a;stroke-width:1}
#trend .t-grid{stroke:#e2e2e2;stroke-width:1}
#trend .t-tick{stroke:#7a7a7a;stroke-width:1}
#trend .t-band{fill:#c4d6ea;stroke:none}
#trend .t-mean{fill:none;stroke:#1d4f82;stroke-width:1.3;stroke-linejoin:round}
#trend .t-lmean{fill:none;stroke:#276b4f;stroke-width:1.3;stroke-linejoin:round}
#trend .t-lmax{fill:none;stroke:#86b9a2;stroke-width:0.8;stroke-linejoin:round}
#trend .t-run{fill:#b9c0cf;stroke:#5c6a85;stroke-width:0.8}
#trend .t-none{font-size:14px;fill:#666}
#trend .t-halo{stroke:#fff;stroke-width:3px;stroke-linejoin:round;paint-order:stroke}
]]></style>
`

// chartPanel is one panel's rectangle (user units) and value range.
type chartPanel struct {
	top, bottom float64
	lo, hi      float64
	step        float64 // between y ticks
}

// y maps value v to the panel's y coordinate, clamped to the panel.
func (p chartPanel) y(v float64) float64 {
	f := (v - p.lo) / (p.hi - p.lo)
	f = min(max(f, 0), 1)
	return p.bottom - f*(p.bottom-p.top)
}

// chartLayout is the geometry of one chart.
type chartLayout struct {
	w, h        int
	left, right float64 // the plot's x range
	from, to    time.Time
	spanNs      float64
	panels      [chartPanels]chartPanel
	nb          int     // buckets on the time axis
	bucketW     float64 // width of a bucket, user units
}

// x maps t to the x coordinate (not clamped).
func (l *chartLayout) x(t time.Time) float64 {
	return l.left + float64(t.Sub(l.from))/l.spanNs*(l.right-l.left)
}

// bucketX is the x coordinate of the centre of bucket i.
func (l *chartLayout) bucketX(i int) float64 {
	return l.left + (float64(i)+0.5)*l.bucketW
}

// chartBucket sums the trend points that fall in one slice of the time
// axis.
type chartBucket struct {
	n          int32   // points
	windows    int64   // scored windows
	sMin, sMax float64 // score extremes over scored points
	sSum       float64 // sum of ScoreMean * Windows
	power      float64 // sum of 10^(RMSMeanDBFS/10)
	lMax       float64 // dBFS
	run        float64 // sum of RunningFraction
}

func (b *chartBucket) scored() bool { return b.windows > 0 }

// scoreMean is the bucket's mean score weighted by windows.
func (b *chartBucket) scoreMean() float64 { return b.sSum / float64(b.windows) }

// levelMean is the bucket's mean level in dBFS, the mean of the minutes'
// mean-square levels (the way the agent averages windows into a minute).
func (b *chartBucket) levelMean() float64 {
	if b.power <= 0 {
		return -120
	}
	return 10 * math.Log10(b.power/float64(b.n))
}

func (b *chartBucket) running() float64 { return b.run / float64(b.n) }

// WriteSVG draws the chart as one self-contained SVG 1.1 document in UTF-8
// (no external fonts, stylesheets or scripts; one <style> block scoped to
// the root's id "trend"; no XML declaration, so that the same bytes can be
// served as image/svg+xml or inlined into an HTML page) and writes it to w.
//
// The time axis is cut into at most two buckets per pixel and never less
// than a minute each: a 24-hour chart shows every minute, a 30-day chart
// merges about 25 minutes into each bucket (score: minimum of the minima,
// maximum of the maxima, mean weighted by Windows; level: mean of the
// minutes' mean squares and maximum of the maxima; running fraction: mean
// over the minutes). A bucket without points breaks every line and band, so
// a time the agent was off shows as a gap. Without any point in [From, To)
// the panels say "no data in this period".
//
// The root element has id="trend", role="img" and a <title> holding Title;
// the panels are groups of class "score", "level" and "running", and each
// alarm mark is a group of class "alarm-mark". It returns an error
// wrapping ErrBadChart for an invalid description (nothing is written
// then), or the first error from w.
func (c TrendChart) WriteSVG(w io.Writer) error {
	l, err := c.layout()
	if err != nil {
		return err
	}
	marks, err := c.marks()
	if err != nil {
		return err
	}
	buckets, hasData := c.bucket(l)
	c.scaleY(l, buckets)

	o := &chartOut{w: w, b: make([]byte, 0, chartFlushBytes+4096)}
	o.s(`<svg xmlns="http://www.w3.org/2000/svg" version="1.1" id="trend" role="img" width="`)
	o.i(l.w)
	o.s(`" height="`)
	o.i(l.h)
	o.s(`" viewBox="0 0 `)
	o.i(l.w)
	o.s(" ")
	o.i(l.h)
	o.s(`">` + "\n<title>")
	if c.Title != "" {
		o.text(c.Title)
	} else {
		o.s("Minute trend")
	}
	o.s("</title>\n<desc>")
	o.text(fmt.Sprintf("Minute trend from %s to %s UTC: anomaly score, RMS level in dBFS and running fraction; %d alarm or warning marks.",
		l.from.Format("2006-01-02 15:04"), l.to.Format("2006-01-02 15:04"), len(marks)))
	o.s("</desc>\n")
	o.s(chartStyle)
	o.s(`<rect x="0" y="0" width="`)
	o.i(l.w)
	o.s(`" height="`)
	o.i(l.h)
	o.s(`" fill="#ffffff"/>` + "\n")
	o.s(`<text class="t-title" x="`)
	o.n(l.left)
	o.s(`" y="24">`)
	o.text(c.Title)
	o.s("</text>\n")

	ticks := chartTimeTicks(l.from, l.to, l.right-l.left)
	c.writeScore(o, l, buckets, ticks)
	c.writeLevel(o, l, buckets, ticks)
	c.writeRunning(o, l, buckets, ticks)
	chartWriteTimeLabels(o, l, ticks)
	if !hasData {
		p := l.panels
		o.s(`<text class="t-none" text-anchor="middle" x="`)
		o.n((l.left + l.right) / 2)
		o.s(`" y="`)
		o.n((p[chartScore].top+p[chartScore].bottom)/2 + 5)
		o.s(`">no data in this period</text>` + "\n")
	}
	chartWriteMarks(o, l, marks)
	o.s("</svg>\n")
	o.flush()
	return o.err
}

// layout checks the chart's size and time axis and places the panels.
func (c TrendChart) layout() (*chartLayout, error) {
	w, h := c.Width, c.Height
	if w == 0 {
		w = chartDefaultWidth
	}
	if h == 0 {
		h = chartDefaultHeight
	}
	if w < chartMinWidth || h < chartMinHeight || w > chartMaxSide || h > chartMaxSide {
		return nil, fmt.Errorf("%w: size %d x %d, want 0 or %d x %d to %d x %d", ErrBadChart,
			c.Width, c.Height, chartMinWidth, chartMinHeight, chartMaxSide, chartMaxSide)
	}
	if c.From.IsZero() || !c.To.After(c.From) || c.To.Sub(c.From) > chartMaxSpan {
		return nil, fmt.Errorf("%w: time axis from %v to %v, want a span of up to 20 years", ErrBadChart, c.From, c.To)
	}
	for _, t := range []struct {
		name string
		v    float64
	}{{"threshold", c.Threshold}, {"warning threshold", c.WarnThreshold}} {
		if !(t.v >= 0 && t.v <= 2) {
			return nil, fmt.Errorf("%w: %s %v, want a score from 0 to 2", ErrBadChart, t.name, t.v)
		}
	}
	l := &chartLayout{w: w, h: h, left: chartMarginLeft, right: float64(w - chartMarginRight),
		from: c.From.UTC(), to: c.To.UTC()}
	l.spanNs = float64(l.to.Sub(l.from))
	avail := float64(h-chartPanelsTop-chartMarginBottom) - 2*chartPanelGap
	top := float64(chartPanelsTop)
	for i, share := range [chartPanels]float64{0.48, 0.29, 0.23} {
		l.panels[i].top = top
		l.panels[i].bottom = top + math.Round(avail*share)
		top = l.panels[i].bottom + chartPanelGap
	}
	plotW := int(l.right - l.left)
	minutes := int(math.Ceil(l.spanNs / float64(time.Minute)))
	l.nb = max(1, min(2*plotW, minutes))
	l.bucketW = (l.right - l.left) / float64(l.nb)
	return l, nil
}

// marks checks the alarm marks and returns those on the time axis, in time
// order.
func (c TrendChart) marks() ([]AlarmMark, error) {
	var out []AlarmMark
	for i, m := range c.Alarms {
		switch strings.ToLower(m.Severity) {
		case "alarm", "warning":
		default:
			return nil, fmt.Errorf("%w: alarm mark %d: severity %q, want \"alarm\" or \"warning\"", ErrBadChart, i, m.Severity)
		}
		if m.Time.Before(c.From) || !m.Time.Before(c.To) {
			continue
		}
		out = append(out, m)
	}
	slices.SortStableFunc(out, func(a, b AlarmMark) int { return a.Time.Compare(b.Time) })
	return out, nil
}

// bucket sums the points into l.nb buckets; hasData is false when no
// point falls on the time axis. Points with a non-finite field are skipped.
func (c TrendChart) bucket(l *chartLayout) (b []chartBucket, hasData bool) {
	b = make([]chartBucket, l.nb)
	perNs := float64(l.nb) / l.spanNs
	for i := range c.Points {
		p := &c.Points[i]
		if p.Start.Before(l.from) || !p.Start.Before(l.to) {
			continue
		}
		if !chartFinite(p.ScoreMin, p.ScoreMean, p.ScoreMax, p.RMSMeanDBFS, p.RMSMaxDBFS, p.RunningFraction) {
			continue
		}
		k := min(int(float64(p.Start.Sub(l.from))*perNs), l.nb-1)
		q := &b[k]
		if q.n == 0 {
			q.sMin, q.sMax, q.lMax = math.Inf(1), math.Inf(-1), math.Inf(-1)
		}
		q.n++
		hasData = true
		q.power += math.Pow(10, p.RMSMeanDBFS/10)
		q.lMax = max(q.lMax, p.RMSMaxDBFS)
		q.run += min(max(p.RunningFraction, 0), 1)
		if p.Windows > 0 {
			q.windows += int64(p.Windows)
			q.sSum += p.ScoreMean * float64(p.Windows)
			q.sMin = min(q.sMin, p.ScoreMin)
			q.sMax = max(q.sMax, p.ScoreMax)
		}
	}
	return b, hasData
}

func chartFinite(v ...float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// scaleY sets the value ranges of the panels from the data and thresholds.
func (c TrendChart) scaleY(l *chartLayout, b []chartBucket) {
	sTop := max(c.Threshold, c.WarnThreshold)
	lLo, lHi := math.Inf(1), math.Inf(-1)
	for i := range b {
		q := &b[i]
		if q.scored() {
			sTop = max(sTop, q.sMax)
		}
		if q.n > 0 {
			lLo = min(lLo, q.levelMean())
			lHi = max(lHi, q.lMax)
		}
	}
	if sTop <= 0 {
		sTop = 1
	}
	step := chartNiceStep(sTop / 4)
	hi := math.Ceil(sTop*1.05/step) * step
	if sTop <= 2 {
		hi = min(hi, 2)
	}
	l.panels[chartScore].lo, l.panels[chartScore].hi, l.panels[chartScore].step = 0, hi, step

	if lLo > lHi {
		lLo, lHi = -100, 0
	}
	step = chartNiceStep(max(lHi-lLo, 20) / 4)
	lo := math.Floor(lLo/step) * step
	hi = math.Ceil(lHi/step) * step
	if hi-lo < step {
		hi = lo + step
	}
	l.panels[chartLevel].lo, l.panels[chartLevel].hi, l.panels[chartLevel].step = lo, hi, step
	l.panels[chartRunning].lo, l.panels[chartRunning].hi, l.panels[chartRunning].step = 0, 1, 0.5
}

// chartNiceStep returns 1, 2 or 5 times a power of ten, the smallest not
// below raw.
func chartNiceStep(raw float64) float64 {
	if raw <= 0 || math.IsNaN(raw) || math.IsInf(raw, 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw*(1-1e-9) {
			return m * p
		}
	}
	return 10 * p
}

// chartDecimals is the number of decimals that labels at this step need.
func chartDecimals(step float64) int {
	return max(0, int(math.Ceil(-math.Log10(step)-1e-9)))
}

// writePanelFrame starts panel i's group: frame, time grid and y ticks.
// unit is appended to each tick label; scale multiplies tick values.
func writePanelFrame(o *chartOut, l *chartLayout, i int, class, caption string, scale float64, unit string, ticks []chartTick) {
	p := l.panels[i]
	step := p.step
	o.s(`<g class="`)
	o.s(class)
	o.s(`">` + "\n")
	o.s(`<rect class="t-frame" x="`)
	o.n(l.left)
	o.s(`" y="`)
	o.n(p.top)
	o.s(`" width="`)
	o.n(l.right - l.left)
	o.s(`" height="`)
	o.n(p.bottom - p.top)
	o.s(`"/>` + "\n")
	for _, t := range ticks {
		x := l.x(t.t)
		o.s(`<line class="t-grid" x1="`)
		o.n(x)
		o.s(`" y1="`)
		o.n(p.top)
		o.s(`" x2="`)
		o.n(x)
		o.s(`" y2="`)
		o.n(p.bottom)
		o.s(`"/>` + "\n")
	}
	dec := chartDecimals(step * scale)
	n := int(math.Round((p.hi - p.lo) / step))
	for k := 0; k <= n; k++ {
		v := p.lo + float64(k)*step
		y := p.y(v)
		o.s(`<g class="t-yt"><line class="t-tick" x1="`)
		o.n(l.left - 5)
		o.s(`" y1="`)
		o.n(y)
		o.s(`" x2="`)
		o.n(l.left)
		o.s(`" y2="`)
		o.n(y)
		o.s(`"/><text text-anchor="end" x="`)
		o.n(l.left - 8)
		o.s(`" y="`)
		o.n(y + 4)
		o.s(`">`)
		o.text(chartNumLabel(v*scale, dec) + unit)
		o.s("</text></g>\n")
	}
	mid := (p.top + p.bottom) / 2
	o.s(`<text class="t-cap" text-anchor="middle" transform="translate(16 `)
	o.n(mid)
	o.s(`) rotate(-90)">`)
	o.text(caption)
	o.s("</text>\n")
}

// chartNumLabel formats v with dec decimals and a true minus sign.
func chartNumLabel(v float64, dec int) string {
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if strings.Trim(s, "-0.") == "" {
		return strings.TrimPrefix(s, "-")
	}
	if strings.HasPrefix(s, "-") {
		return "\u2212" + s[1:]
	}
	return s
}

func (c TrendChart) writeScore(o *chartOut, l *chartLayout, b []chartBucket, ticks []chartTick) {
	p := l.panels[chartScore]
	writePanelFrame(o, l, chartScore, "score", "score (cosine distance)", 1, "", ticks)
	present := func(i int) bool { return b[i].scored() }

	// Envelope: per run, forward along the maxima and back along the minima.
	o.s(`<path class="t-band" d="`)
	chartRuns(l.nb, present, func(i0, i1 int) {
		if i0 == i1 {
			x, h := l.bucketX(i0), max(l.bucketW/2, 0.75)
			o.s("M")
			o.n(x - h)
			o.sp()
			o.n(p.y(b[i0].sMax))
			o.sp()
			o.n(x + h)
			o.sp()
			o.n(p.y(b[i0].sMax))
			o.sp()
			o.n(x + h)
			o.sp()
			o.n(p.y(b[i0].sMin))
			o.sp()
			o.n(x - h)
			o.sp()
			o.n(p.y(b[i0].sMin))
			o.s("Z")
			return
		}
		o.s("M")
		for i := i0; i <= i1; i++ {
			if i > i0 {
				o.sp()
			}
			o.n(l.bucketX(i))
			o.sp()
			o.n(p.y(b[i].sMax))
		}
		for i := i1; i >= i0; i-- {
			o.sp()
			o.n(l.bucketX(i))
			o.sp()
			o.n(p.y(b[i].sMin))
		}
		o.s("Z")
	})
	o.s(`"/>` + "\n")
	chartWriteLine(o, l, "t-mean", present, func(i int) float64 { return p.y(b[i].scoreMean()) })

	for _, t := range []struct {
		v            float64
		class, label string
		colour, dash string
		text         string
	}{
		{c.WarnThreshold, "t-thr-warning", "warning ", chartWarningColour, "2 3", chartWarningText},
		{c.Threshold, "t-thr-alarm", "alarm ", chartAlarmColour, "7 3", chartAlarmColour},
	} {
		if t.v <= 0 {
			continue
		}
		y := p.y(t.v)
		o.s(`<line class="`)
		o.s(t.class)
		o.s(`" x1="`)
		o.n(l.left)
		o.s(`" y1="`)
		o.n(y)
		o.s(`" x2="`)
		o.n(l.right)
		o.s(`" y2="`)
		o.n(y)
		o.s(`" stroke="`)
		o.s(t.colour)
		o.s(`" stroke-width="1.5" stroke-dasharray="`)
		o.s(t.dash)
		o.s(`"/>` + "\n")
		o.s(`<text class="t-halo" text-anchor="end" x="`)
		o.n(l.right - 4)
		o.s(`" y="`)
		o.n(y - 4)
		o.s(`" style="fill:`)
		o.s(t.text)
		o.s(`">`)
		o.text(t.label + strconv.FormatFloat(t.v, 'f', 3, 64))
		o.s("</text>\n")
	}
	if !slices.ContainsFunc(b, func(q chartBucket) bool { return q.scored() }) && slices.ContainsFunc(b, func(q chartBucket) bool { return q.n > 0 }) {
		o.s(`<text class="t-none" text-anchor="middle" x="`)
		o.n((l.left + l.right) / 2)
		o.s(`" y="`)
		o.n((p.top+p.bottom)/2 + 5)
		o.s(`">not scored in this period (machine stopped)</text>` + "\n")
	}
	o.s("</g>\n")
}

func (c TrendChart) writeLevel(o *chartOut, l *chartLayout, b []chartBucket, ticks []chartTick) {
	p := l.panels[chartLevel]
	writePanelFrame(o, l, chartLevel, "level", "RMS level", 1, " dBFS", ticks)
	present := func(i int) bool { return b[i].n > 0 }
	chartWriteLine(o, l, "t-lmax", present, func(i int) float64 { return p.y(b[i].lMax) })
	chartWriteLine(o, l, "t-lmean", present, func(i int) float64 { return p.y(b[i].levelMean()) })
	// Legend, top right inside the panel.
	x := l.right - 150
	y := p.top + 12
	for _, e := range []struct{ class, label string }{{"t-lmean", "mean"}, {"t-lmax", "maximum"}} {
		o.s(`<path class="`)
		o.s(e.class)
		o.s(`" d="M`)
		o.n(x)
		o.sp()
		o.n(y - 4)
		o.s("h18")
		o.s(`"/><text x="`)
		o.n(x + 22)
		o.s(`" y="`)
		o.n(y)
		o.s(`">`)
		o.s(e.label)
		o.s("</text>\n")
		x += 64
	}
	o.s("</g>\n")
}

func (c TrendChart) writeRunning(o *chartOut, l *chartLayout, b []chartBucket, ticks []chartTick) {
	p := l.panels[chartRunning]
	writePanelFrame(o, l, chartRunning, "running", "running", 100, "%", ticks)
	// A step area: each bucket is a flat top over its own width.
	o.s(`<path class="t-run" d="`)
	chartRuns(l.nb, func(i int) bool { return b[i].n > 0 }, func(i0, i1 int) {
		o.s("M")
		o.n(l.left + float64(i0)*l.bucketW)
		o.sp()
		o.n(p.bottom)
		for i := i0; i <= i1; i++ {
			o.s("V")
			o.n(p.y(b[i].running()))
			o.s("H")
			o.n(l.left + float64(i+1)*l.bucketW)
		}
		o.s("V")
		o.n(p.bottom)
		o.s("Z")
	})
	o.s(`"/>` + "\n</g>\n")
}

// chartWriteLine writes one path of class class through the present
// buckets, with a new subpath after every absent one. A lone bucket is a
// short level stroke.
func chartWriteLine(o *chartOut, l *chartLayout, class string, present func(int) bool, y func(int) float64) {
	o.s(`<path class="`)
	o.s(class)
	o.s(`" d="`)
	chartRuns(l.nb, present, func(i0, i1 int) {
		o.s("M")
		if i0 == i1 {
			x, h := l.bucketX(i0), max(l.bucketW/2, 0.75)
			o.n(x - h)
			o.sp()
			o.n(y(i0))
			o.sp()
			o.n(x + h)
			o.sp()
			o.n(y(i0))
			return
		}
		for i := i0; i <= i1; i++ {
			if i > i0 {
				o.sp()
			}
			o.n(l.bucketX(i))
			o.sp()
			o.n(y(i))
		}
	})
	o.s(`"/>` + "\n")
}

// chartRuns calls fn for each maximal run [i0, i1] of indexes below n for
// which present is true.
func chartRuns(n int, present func(int) bool, fn func(i0, i1 int)) {
	for i := 0; i < n; {
		if !present(i) {
			i++
			continue
		}
		j := i
		for j+1 < n && present(j+1) {
			j++
		}
		fn(i, j)
		i = j + 1
	}
}

// chartTick is one time tick and its labels.
type chartTick struct {
	t            time.Time
	line1, line2 string
}

// chartTimeTicks chooses the tick times for the axis [from, to]: the finest
// of 1, 2, 3, 6 and 12 hours, 1 and 2 days, the 1st, 6th, 11th, 16th, 21st
// and 26th of each month, the 1st, 11th and 21st, and the first of every
// 1, 2, 3, 6 or 12 months that gives at most 9 ticks and at least 64
// pixels between them. Sub-day ticks are labelled HH:MM with the date
// below where it changes; day ticks with the date and the year below where
// it changes. Everything is UTC.
func chartTimeTicks(from, to time.Time, plotW float64) []chartTick {
	maxTicks := max(2, min(chartMaxTimeTicks, int(plotW/chartMinTickSpace)))
	type gen func(yield func(time.Time) bool)
	every := func(d time.Duration) gen {
		return func(yield func(time.Time) bool) {
			for t := from.Truncate(d); !t.After(to); t = t.Add(d) {
				if !t.Before(from) && !yield(t) {
					return
				}
			}
		}
	}
	days := func(keep func(day int) bool) gen {
		return func(yield func(time.Time) bool) {
			d0 := time.Date(from.Year(), from.Month(), from.Day(), 0, 0, 0, 0, time.UTC)
			for t := d0; !t.After(to); t = t.AddDate(0, 0, 1) {
				if !t.Before(from) && keep(t.Day()) && !yield(t) {
					return
				}
			}
		}
	}
	months := func(k int) gen {
		return func(yield func(time.Time) bool) {
			t := time.Date(from.Year(), from.Month(), 1, 0, 0, 0, 0, time.UTC)
			for ; !t.After(to); t = t.AddDate(0, 1, 0) {
				if (int(t.Month())-1)%k == 0 && !t.Before(from) && !yield(t) {
					return
				}
			}
		}
	}
	type cand struct {
		g      gen
		subDay bool
	}
	cands := []cand{
		{every(time.Hour), true}, {every(2 * time.Hour), true}, {every(3 * time.Hour), true},
		{every(6 * time.Hour), true}, {every(12 * time.Hour), true},
		{every(24 * time.Hour), false}, {every(48 * time.Hour), false},
		{days(func(d int) bool { return d <= 26 && (d-1)%5 == 0 }), false},
		{days(func(d int) bool { return d == 1 || d == 11 || d == 21 }), false},
		{months(1), false}, {months(2), false}, {months(3), false}, {months(6), false}, {months(12), false},
	}
	chosen := cands[len(cands)-1]
	for _, c := range cands {
		n := 0
		for range c.g {
			if n++; n > maxTicks {
				break
			}
		}
		if n <= maxTicks {
			chosen = c
			break
		}
	}
	var out []chartTick
	prev := time.Time{}
	for t := range chosen.g {
		var k chartTick
		k.t = t
		if chosen.subDay {
			k.line1 = t.Format("15:04")
			if prev.IsZero() || t.YearDay() != prev.YearDay() || t.Year() != prev.Year() {
				k.line2 = t.Format("Jan 2")
			}
		} else {
			k.line1 = t.Format("Jan 2")
			if prev.IsZero() || t.Year() != prev.Year() {
				k.line2 = t.Format("2006")
			}
		}
		prev = t
		out = append(out, k)
	}
	return out
}

// chartWriteTimeLabels writes the time ticks and labels under the bottom
// panel, and the axis caption.
func chartWriteTimeLabels(o *chartOut, l *chartLayout, ticks []chartTick) {
	bottom := l.panels[chartRunning].bottom
	o.s(`<g class="t-time">` + "\n")
	for _, t := range ticks {
		x := l.x(t.t)
		o.s(`<line class="t-tick" x1="`)
		o.n(x)
		o.s(`" y1="`)
		o.n(bottom)
		o.s(`" x2="`)
		o.n(x)
		o.s(`" y2="`)
		o.n(bottom + 5)
		o.s(`"/><text text-anchor="middle" x="`)
		o.n(x)
		o.s(`" y="`)
		o.n(bottom + 17)
		o.s(`">`)
		o.text(t.line1)
		o.s("</text>")
		if t.line2 != "" {
			o.s(`<text text-anchor="middle" x="`)
			o.n(x)
			o.s(`" y="`)
			o.n(bottom + 31)
			o.s(`">`)
			o.text(t.line2)
			o.s("</text>")
		}
		o.s("\n")
	}
	o.s(`<text x="4" y="`)
	o.n(bottom + 17)
	o.s(`">UTC</text>` + "\n</g>\n")
}

// chartWriteMarks writes the alarm marks (in time order) as vertical lines
// across all panels with a marker and, where it does not overlap the one
// before, a label.
func chartWriteMarks(o *chartOut, l *chartLayout, marks []AlarmMark) {
	bottom := l.panels[chartRunning].bottom
	labelEnd := math.Inf(-1)
	const charW = 6.2 // estimated width of a character at 11px, user units
	for _, m := range marks {
		x := l.x(m.Time)
		alarm := strings.EqualFold(m.Severity, "alarm")
		colour, text, dash := chartWarningColour, chartWarningText, chartWarningDash
		if alarm {
			colour, text, dash = chartAlarmColour, chartAlarmColour, chartAlarmDash
		}
		o.s(`<g class="alarm-mark"><title>`)
		o.text(m.Label + ", " + strings.ToLower(m.Severity) + " raised " + m.Time.UTC().Format("2006-01-02 15:04:05") + " UTC")
		o.s(`</title><line x1="`)
		o.n(x)
		o.s(`" y1="`)
		o.n(chartMarkerY + 5)
		o.s(`" x2="`)
		o.n(x)
		o.s(`" y2="`)
		o.n(bottom)
		o.s(`" stroke="`)
		o.s(colour)
		o.s(`" stroke-width="1.5"`)
		if dash != "" {
			o.s(` stroke-dasharray="`)
			o.s(dash)
			o.s(`"`)
		}
		o.s(`/><path d="`)
		if alarm { // filled triangle pointing down
			o.s("M")
			o.n(x - 6)
			o.sp()
			o.n(chartMarkerY - 5)
			o.s("h12l-6 10Z")
			o.s(`" fill="`)
			o.s(colour)
			o.s(`" stroke="`)
			o.s(colour)
		} else { // open diamond
			o.s("M")
			o.n(x)
			o.sp()
			o.n(chartMarkerY - 6)
			o.s("l6 6l-6 6l-6-6Z")
			o.s(`" fill="#ffffff" stroke="`)
			o.s(colour)
			o.s(`" stroke-width="2`)
		}
		o.s(`"/>`)
		label := chartCut(m.Label, chartLabelMaxRunes)
		wd := charW * float64(utf8.RuneCountInString(label))
		lx := x + 9 // right of the marker, or left of it near the right edge
		if lx+wd > float64(l.w)-2 {
			lx = max(x-9-wd, 2)
		}
		if label != "" && lx > labelEnd+6 {
			o.s(`<text class="t-halo" x="`)
			o.n(lx)
			o.s(`" y="`)
			o.n(chartMarkerY + 4)
			o.s(`" style="fill:`)
			o.s(text)
			o.s(`">`)
			o.text(label)
			o.s("</text>")
			labelEnd = lx + wd
		}
		o.s("</g>\n")
	}
}

// chartCut shortens s to at most n runes, ending with an ellipsis when cut.
func chartCut(s string, n int) string {
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	r := []rune(s)
	return string(r[:n-1]) + "\u2026"
}

// chartOut buffers the SVG text and remembers the first write error.
type chartOut struct {
	w   io.Writer
	b   []byte
	err error
}

// Write appends p to the buffer (for xml.EscapeText).
func (o *chartOut) Write(p []byte) (int, error) {
	o.b = append(o.b, p...)
	return len(p), nil
}

func (o *chartOut) s(str string) {
	o.b = append(o.b, str...)
	if len(o.b) >= chartFlushBytes {
		o.flush()
	}
}

func (o *chartOut) sp() { o.b = append(o.b, ' ') }

func (o *chartOut) i(v int) { o.b = strconv.AppendInt(o.b, int64(v), 10) }

// n appends v rounded to 0.1 user unit, without a trailing ".0".
func (o *chartOut) n(v float64) {
	r := math.Round(v*10) / 10
	if r == 0 {
		r = 0 // no "-0"
	}
	o.b = strconv.AppendFloat(o.b, r, 'f', -1, 64)
}

// text appends str escaped as XML character data (encoding/xml.EscapeText:
// markup characters become references, invalid UTF-8 and characters XML
// forbids become U+FFFD).
func (o *chartOut) text(str string) {
	_ = xml.EscapeText(o, []byte(str))
}

func (o *chartOut) flush() {
	if o.err == nil && len(o.b) > 0 {
		_, o.err = o.w.Write(o.b)
	}
	o.b = o.b[:0]
}
