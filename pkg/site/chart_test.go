package site

import (
	"bytes"
	"encoding/xml"
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

// chartT0 is the start of the test day, midnight UTC.
var chartT0 = time.Date(2025, 3, 12, 0, 0, 0, 0, time.UTC)

// xnode is a generic XML element, for reading the SVG back.
type xnode struct {
	XMLName  xml.Name
	Attrs    []xml.Attr `xml:",any,attr"`
	Children []xnode    `xml:",any"`
	Text     string     `xml:",chardata"`
}

func (n *xnode) attr(name string) string {
	for _, a := range n.Attrs {
		if a.Name.Local == name {
			return a.Value
		}
	}
	return ""
}

func (n *xnode) num(t *testing.T, name string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(n.attr(name), 64)
	if err != nil {
		t.Fatalf("<%s %s=%q>: %v", n.XMLName.Local, name, n.attr(name), err)
	}
	return v
}

// all returns the elements under n (n included) for which keep is true,
// in document order.
func (n *xnode) all(keep func(*xnode) bool) []*xnode {
	var out []*xnode
	var walk func(*xnode)
	walk = func(m *xnode) {
		if keep(m) {
			out = append(out, m)
		}
		for i := range m.Children {
			walk(&m.Children[i])
		}
	}
	walk(n)
	return out
}

func byClass(class string) func(*xnode) bool {
	return func(n *xnode) bool { return n.attr("class") == class }
}

// parseSVG checks that b is well-formed XML with an <svg> root and returns
// the tree. The decoder is strict: it rejects undefined entities, unclosed
// elements and invalid characters.
func parseSVG(t *testing.T, b []byte) *xnode {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(b))
	d.Strict = true
	var root xnode
	if err := d.Decode(&root); err != nil {
		t.Fatalf("SVG is not well-formed XML: %v\n%.2000s", err, b)
	}
	for { // only whitespace may follow the root
		tok, err := d.Token()
		if err != nil {
			break
		}
		if cd, ok := tok.(xml.CharData); !ok || len(bytes.TrimSpace(cd)) > 0 {
			t.Fatalf("content after the root element: %#v", tok)
		}
	}
	if root.XMLName.Local != "svg" || root.XMLName.Space != "http://www.w3.org/2000/svg" {
		t.Fatalf("root is %v, want svg in the SVG namespace", root.XMLName)
	}
	return &root
}

func renderChart(t testing.TB, c TrendChart) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := c.WriteSVG(&b); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

// chartPoints makes one point a minute over [from, to), skipping the
// minutes for which skip is true, with a gently varying score and level.
func chartPoints(from, to time.Time, skip func(time.Time) bool) []store.TrendPoint {
	var out []store.TrendPoint
	r := rand.New(rand.NewPCG(1, 2))
	for t := from; t.Before(to); t = t.Add(time.Minute) {
		if skip != nil && skip(t) {
			continue
		}
		h := float64(t.Sub(from)) / float64(time.Hour)
		m := 0.12 + 0.05*math.Sin(h/3) + 0.02*r.Float64()
		out = append(out, store.TrendPoint{
			Start: t, Windows: 58, ScoreMin: m - 0.04, ScoreMean: m, ScoreMax: m + 0.06 + 0.03*r.Float64(),
			RMSMeanDBFS: -42 + 3*math.Sin(h) + r.Float64(), RMSMaxDBFS: -36 + 3*math.Sin(h) + 2*r.Float64(),
			RunningFraction: 1,
		})
	}
	return out
}

func TestChartStructureAndAlarmMarks(t *testing.T) {
	c := TrendChart{
		From: chartT0, To: chartT0.Add(24 * time.Hour),
		Points:    chartPoints(chartT0, chartT0.Add(24*time.Hour), nil),
		Threshold: 0.35, WarnThreshold: 0.25,
		Title: "P-492B, last 24 hours",
		Alarms: []AlarmMark{
			{Time: chartT0.Add(5 * time.Hour), Severity: "warning", Label: "warning #2"},
			{Time: chartT0.Add(9 * time.Hour), Severity: "alarm", Label: "alarm #3"},
			{Time: chartT0.Add(9*time.Hour + 10*time.Minute), Severity: "Alarm", Label: "alarm #4"},
			{Time: chartT0.Add(-time.Hour), Severity: "alarm", Label: "before the axis"},
			{Time: chartT0.Add(24 * time.Hour), Severity: "alarm", Label: "at To, outside"},
		},
	}
	root := parseSVG(t, renderChart(t, c))
	for name, want := range map[string]string{"id": "trend", "role": "img", "viewBox": "0 0 960 540", "width": "960", "height": "540", "version": "1.1"} {
		if got := root.attr(name); got != want {
			t.Errorf("svg %s=%q, want %q", name, got, want)
		}
	}
	if len(root.Children) == 0 || root.Children[0].XMLName.Local != "title" || root.Children[0].Text != c.Title {
		t.Errorf("the first child of <svg> is not <title>%s</title>", c.Title)
	}
	for _, class := range []string{"score", "level", "running"} {
		if n := len(root.all(byClass(class))); n != 1 {
			t.Errorf("%d elements of class %q, want 1", n, class)
		}
	}
	marks := root.all(byClass("alarm-mark"))
	if len(marks) != 3 {
		t.Fatalf("%d alarm marks, want 3 (two outside [From, To))", len(marks))
	}
	// Alarm and warning differ in colour and in dash, and the marks are in
	// time order at the right x.
	l, _ := c.layout()
	style := map[string]string{}
	for i, m := range marks {
		line := m.all(func(n *xnode) bool { return n.XMLName.Local == "line" })[0]
		sev := []string{"warning", "alarm", "alarm"}[i]
		style[sev] = line.attr("stroke") + "|" + line.attr("stroke-dasharray")
		want := l.x(c.Alarms[i].Time)
		if x := line.num(t, "x1"); math.Abs(x-want) > 0.06 {
			t.Errorf("mark %d at x %v, want %v", i, x, want)
		}
		if line.num(t, "y2") != l.panels[chartRunning].bottom || line.num(t, "y1") > l.panels[chartScore].top {
			t.Errorf("mark %d does not cross all panels: y %v to %v", i, line.attr("y1"), line.attr("y2"))
		}
		if title := m.Children[0]; title.XMLName.Local != "title" || !strings.HasPrefix(title.Text, c.Alarms[i].Label) {
			t.Errorf("mark %d tooltip %q", i, title.Text)
		}
	}
	if style["alarm"] == style["warning"] || strings.Split(style["alarm"], "|")[0] == strings.Split(style["warning"], "|")[0] ||
		strings.Split(style["alarm"], "|")[1] == strings.Split(style["warning"], "|")[1] {
		t.Errorf("alarm and warning look alike: %v", style)
	}
	// The second alarm is 10 minutes (6 px) after the first: its label is
	// left out, not drawn on top.
	if n := len(marks[2].all(func(n *xnode) bool { return n.XMLName.Local == "text" })); n != 0 {
		t.Errorf("overlapping label drawn")
	}
	if n := len(marks[1].all(func(n *xnode) bool { return n.XMLName.Local == "text" && n.Text == "alarm #3" })); n != 1 {
		t.Errorf("label of the first alarm missing")
	}
}

// yTicks returns the y of each tick label of the panel element.
func yTicks(t *testing.T, panel *xnode) map[string]float64 {
	t.Helper()
	out := map[string]float64{}
	for _, g := range panel.all(byClass("t-yt")) {
		var y float64
		var label string
		for i := range g.Children {
			switch ch := &g.Children[i]; ch.XMLName.Local {
			case "line":
				y = ch.num(t, "y1")
			case "text":
				label = ch.Text
			}
		}
		out[label] = y
	}
	return out
}

func TestChartThresholdOnScale(t *testing.T) {
	c := TrendChart{
		From: chartT0, To: chartT0.Add(24 * time.Hour),
		Points:    chartPoints(chartT0, chartT0.Add(24*time.Hour), nil),
		Threshold: 0.5, WarnThreshold: 0.3,
	}
	root := parseSVG(t, renderChart(t, c))
	score := root.all(byClass("score"))[0]
	ticks := yTicks(t, score)
	frame := score.all(byClass("t-frame"))[0]
	bottom := frame.num(t, "y") + frame.num(t, "height")
	top := frame.num(t, "y")
	// The axis must run from 0 at the bottom to its largest tick at the top.
	vTop, yZero, yTop := math.Inf(-1), math.NaN(), math.NaN()
	for label, y := range ticks {
		v, err := strconv.ParseFloat(label, 64)
		if err != nil {
			t.Fatalf("tick label %q: %v", label, err)
		}
		if v == 0 {
			yZero = y
		}
		if v > vTop {
			vTop, yTop = v, y
		}
	}
	if yZero != bottom || yTop != top || len(ticks) < 3 {
		t.Fatalf("ticks %v do not span the frame %v..%v", ticks, top, bottom)
	}
	l, _ := c.layout()
	c.scaleY(l, mustBucket(c, l))
	for _, th := range []struct {
		class string
		v     float64
	}{{"t-thr-alarm", 0.5}, {"t-thr-warning", 0.3}} {
		lines := score.all(byClass(th.class))
		if len(lines) != 1 {
			t.Fatalf("%d %s lines", len(lines), th.class)
		}
		y1, y2 := lines[0].num(t, "y1"), lines[0].num(t, "y2")
		fromTicks := bottom + (top-bottom)*th.v/vTop
		fromLayout := l.panels[chartScore].y(th.v)
		if y1 != y2 || math.Abs(y1-fromTicks) > 0.06 || math.Abs(y1-fromLayout) > 0.06 {
			t.Errorf("%s at y %v..%v, want %v (from the drawn ticks) = %v (from the layout)", th.class, y1, y2, fromTicks, fromLayout)
		}
		if lines[0].attr("stroke-dasharray") == "" {
			t.Errorf("%s is not dashed", th.class)
		}
	}
	// The label of a threshold names it.
	found := score.all(func(n *xnode) bool { return n.XMLName.Local == "text" && n.Text == "alarm 0.500" })
	if len(found) != 1 {
		t.Errorf("threshold label \"alarm 0.500\" missing")
	}
	// Units on the other panels' ticks.
	for label := range yTicks(t, root.all(byClass("level"))[0]) {
		if !strings.HasSuffix(label, " dBFS") {
			t.Errorf("level tick %q without unit", label)
		}
	}
	run := yTicks(t, root.all(byClass("running"))[0])
	if _, ok := run["100%"]; !ok || len(run) != 3 {
		t.Errorf("running ticks %v, want 0%%, 50%%, 100%%", run)
	}
}

func mustBucket(c TrendChart, l *chartLayout) []chartBucket {
	b, _ := c.bucket(l)
	return b
}

// pathSegments parses the path data d (M, L, H, V, h and Z, absolute
// coordinates otherwise, implicit lineto after a moveto) and returns its
// straight segments as x1, y1, x2, y2 and the number of subpaths.
func pathSegments(t *testing.T, d string) (segs [][4]float64, subpaths int) {
	t.Helper()
	var toks []string
	cur := ""
	flush := func() {
		if cur != "" {
			toks = append(toks, cur)
			cur = ""
		}
	}
	for _, r := range d {
		switch {
		case strings.ContainsRune("MLHVhZ", r):
			flush()
			toks = append(toks, string(r))
		case r == ' ' || r == ',':
			flush()
		default:
			cur += string(r)
		}
	}
	flush()
	num := func(i int) float64 {
		v, err := strconv.ParseFloat(toks[i], 64)
		if err != nil {
			t.Fatalf("path %q: token %d: %v", d, i, err)
		}
		return v
	}
	var x, y, x0, y0 float64
	cmd := ""
	for i := 0; i < len(toks); {
		switch toks[i] {
		case "M", "L", "H", "V", "h", "Z":
			cmd = toks[i]
			i++
			if cmd == "Z" {
				segs = append(segs, [4]float64{x, y, x0, y0})
				x, y = x0, y0
				continue
			}
			if cmd == "M" {
				x, y = num(i), num(i+1)
				x0, y0 = x, y
				subpaths++
				i += 2
				cmd = "L"
			}
			continue
		}
		nx, ny := x, y
		switch cmd {
		case "L":
			nx, ny = num(i), num(i+1)
			i += 2
		case "H":
			nx = num(i)
			i++
		case "h":
			nx = x + num(i)
			i++
		case "V":
			ny = num(i)
			i++
		default:
			t.Fatalf("path %q: number after %q", d, cmd)
		}
		segs = append(segs, [4]float64{x, y, nx, ny})
		x, y = nx, ny
	}
	return segs, subpaths
}

// dataPath returns the data path of class class in the panel (the longest,
// so that the legend swatch is not taken).
func dataPath(root *xnode, class string) string {
	best := ""
	for _, n := range root.all(byClass(class)) {
		if d := n.attr("d"); len(d) > len(best) {
			best = d
		}
	}
	return best
}

func TestChartGapsBreakPaths(t *testing.T) {
	gapFrom, gapTo := chartT0.Add(10*time.Hour), chartT0.Add(12*time.Hour)
	c := TrendChart{
		From: chartT0, To: chartT0.Add(24 * time.Hour), Threshold: 0.4,
		Points: chartPoints(chartT0, chartT0.Add(24*time.Hour), func(t time.Time) bool {
			return !t.Before(gapFrom) && t.Before(gapTo)
		}),
	}
	l, _ := c.layout()
	gx0, gx1 := l.x(gapFrom), l.x(gapTo)
	root := parseSVG(t, renderChart(t, c))
	for _, class := range []string{"t-band", "t-mean", "t-lmean", "t-lmax", "t-run"} {
		segs, sub := pathSegments(t, dataPath(root, class))
		if sub != 2 {
			t.Errorf("%s: %d subpaths, want 2 (one each side of the gap)", class, sub)
		}
		for _, s := range segs {
			lo, hi := min(s[0], s[2]), max(s[0], s[2])
			if lo < gx0+1 && hi > gx1-1 {
				t.Errorf("%s: segment %v crosses the gap %v..%v", class, s, gx0, gx1)
			}
		}
	}

	// Without the gap, one subpath each; a control, so that the check
	// above can tell.
	c.Points = chartPoints(chartT0, chartT0.Add(24*time.Hour), nil)
	root = parseSVG(t, renderChart(t, c))
	for _, class := range []string{"t-mean", "t-lmean", "t-run"} {
		if _, sub := pathSegments(t, dataPath(root, class)); sub != 1 {
			t.Errorf("no gap: %s has %d subpaths, want 1", class, sub)
		}
	}

	// Minutes with no scored windows (machine stopped) break the score,
	// not the level.
	for i := range c.Points {
		if h := c.Points[i].Start.Hour(); h >= 3 && h < 5 {
			p := &c.Points[i]
			p.Windows, p.ScoreMin, p.ScoreMean, p.ScoreMax, p.RunningFraction = 0, 0, 0, 0, 0
		}
	}
	root = parseSVG(t, renderChart(t, c))
	if _, sub := pathSegments(t, dataPath(root, "t-mean")); sub != 2 {
		t.Errorf("stopped machine: score has %d subpaths, want 2", sub)
	}
	if _, sub := pathSegments(t, dataPath(root, "t-lmean")); sub != 1 {
		t.Errorf("stopped machine: level has %d subpaths, want 1", sub)
	}
}

func TestChartOrderDoesNotMatter(t *testing.T) {
	c := TrendChart{From: chartT0, To: chartT0.Add(7 * 24 * time.Hour), Threshold: 0.3,
		Points: chartPoints(chartT0, chartT0.Add(7*24*time.Hour), func(t time.Time) bool { return t.Day() == 14 })}
	sorted := renderChart(t, c)
	shuffled := append([]store.TrendPoint(nil), c.Points...)
	r := rand.New(rand.NewPCG(3, 4))
	r.Shuffle(len(shuffled), func(i, j int) { shuffled[i], shuffled[j] = shuffled[j], shuffled[i] })
	c.Points = shuffled
	if got := renderChart(t, c); !bytes.Equal(got, sorted) {
		t.Error("shuffled points draw a different chart")
	}
}

func TestChartDownsampling(t *testing.T) {
	c := TrendChart{From: chartT0, To: chartT0.Add(30 * 24 * time.Hour)}
	l, err := c.layout()
	if err != nil {
		t.Fatal(err)
	}
	plotW := l.right - l.left
	if l.nb > int(2*plotW) || l.nb < int(plotW) {
		t.Fatalf("%d buckets for %v pixels", l.nb, plotW)
	}
	perBucket := 30 * 24 * time.Hour / time.Duration(l.nb)
	at := chartT0.Add(100*perBucket + time.Minute) // early in bucket 100
	c.Points = []store.TrendPoint{
		{Start: at, Windows: 10, ScoreMin: 0.1, ScoreMean: 0.2, ScoreMax: 0.3, RMSMeanDBFS: -40, RMSMaxDBFS: -30, RunningFraction: 1},
		{Start: at.Add(time.Minute), Windows: 30, ScoreMin: 0.3, ScoreMean: 0.6, ScoreMax: 0.9, RMSMeanDBFS: -50, RMSMaxDBFS: -20, RunningFraction: 0.5},
		// Not scored: counts for level and running only.
		{Start: at.Add(2 * time.Minute), Windows: 0, RMSMeanDBFS: -60, RMSMaxDBFS: -55},
	}
	b, _ := c.bucket(l)
	q := b[100]
	near := func(a, b float64) bool { return math.Abs(a-b) < 1e-9 }
	wantLevel := 10 * math.Log10((1e-4+1e-5+1e-6)/3)
	if q.n != 3 || !near(q.sMin, 0.1) || !near(q.sMax, 0.9) || !near(q.scoreMean(), 0.5) ||
		!near(q.lMax, -20) || !near(q.levelMean(), wantLevel) || !near(q.running(), 0.5) {
		t.Errorf("bucket: n %d score %v/%v/%v level %v/%v running %v; want 3, 0.1/0.5/0.9, %v/-20, 0.5",
			q.n, q.sMin, q.scoreMean(), q.sMax, q.levelMean(), q.lMax, q.running(), wantLevel)
	}
	for i := range b {
		if i != 100 && b[i].n != 0 {
			t.Errorf("bucket %d holds %d points", i, b[i].n)
		}
	}
}

func TestChartThirtyDaysSize(t *testing.T) {
	from := chartT0
	to := from.Add(30 * 24 * time.Hour)
	c := TrendChart{From: from, To: to, Threshold: 0.35, WarnThreshold: 0.25,
		Title:  "P-492B, last 30 days",
		Points: chartPoints(from, to, nil)}
	if len(c.Points) != 43200 {
		t.Fatalf("%d points", len(c.Points))
	}
	for i := 0; i < 30; i++ {
		c.Alarms = append(c.Alarms, AlarmMark{Time: from.Add(time.Duration(i) * 23 * time.Hour), Severity: []string{"alarm", "warning"}[i%2], Label: "alarm #" + strconv.Itoa(i)})
	}
	start := time.Now()
	b := renderChart(t, c)
	took := time.Since(start)
	t.Logf("30 days, 43200 points, 30 marks: %d bytes in %v", len(b), took)
	if len(b) > 300<<10 {
		t.Errorf("SVG is %d bytes, want at most 300 KiB", len(b))
	}
	root := parseSVG(t, b)
	l, _ := c.layout()
	for _, class := range []string{"t-mean", "t-lmean", "t-lmax"} {
		segs, _ := pathSegments(t, dataPath(root, class))
		if limit := 2 * int(l.right-l.left); len(segs) > limit {
			t.Errorf("%s: %d segments for %v pixels", class, len(segs), l.right-l.left)
		}
	}
	if n := len(root.all(byClass("alarm-mark"))); n != 30 {
		t.Errorf("%d alarm marks, want 30", n)
	}
}

func TestChartEmpty(t *testing.T) {
	for name, pts := range map[string][]store.TrendPoint{
		"none":         nil,
		"out of range": chartPoints(chartT0.Add(-48*time.Hour), chartT0.Add(-24*time.Hour), nil),
	} {
		b := renderChart(t, TrendChart{From: chartT0, To: chartT0.Add(24 * time.Hour), Points: pts, Threshold: 0.4, Title: "P-492B"})
		root := parseSVG(t, b)
		if n := len(root.all(func(n *xnode) bool { return n.Text == "no data in this period" })); n != 1 {
			t.Errorf("%s: %d \"no data in this period\" texts, want 1", name, n)
		}
		if n := len(root.all(byClass("score"))); n != 1 {
			t.Errorf("%s: no score panel", name)
		}
	}
	// With data the text is absent: the check above can fail.
	b := renderChart(t, TrendChart{From: chartT0, To: chartT0.Add(24 * time.Hour), Points: chartPoints(chartT0, chartT0.Add(time.Hour), nil)})
	if bytes.Contains(b, []byte("no data in this period")) {
		t.Error("\"no data\" with data")
	}
}

func TestChartEscapesText(t *testing.T) {
	title := "</title><script>alert(\"x\")</script> & ]]> \x00 \xff obrinvale"
	c := TrendChart{From: chartT0, To: chartT0.Add(24 * time.Hour), Title: title,
		Points: chartPoints(chartT0, chartT0.Add(2*time.Hour), nil),
		Alarms: []AlarmMark{{Time: chartT0.Add(time.Hour), Severity: "alarm", Label: "<b onload='x'>#3</b>"}}}
	b := renderChart(t, c)
	root := parseSVG(t, b)
	if n := len(root.all(func(n *xnode) bool { return n.XMLName.Local == "script" || n.XMLName.Local == "b" })); n != 0 {
		t.Fatalf("%d injected elements", n)
	}
	want := "</title><script>alert(\"x\")</script> & ]]> \uFFFD \uFFFD obrinvale"
	if got := root.Children[0].Text; got != want {
		t.Errorf("<title> text %q, want %q", got, want)
	}
	if n := len(root.all(func(n *xnode) bool { return n.XMLName.Local == "text" && n.Text == want })); n != 1 {
		t.Errorf("visible title missing")
	}
	if n := len(root.all(func(n *xnode) bool { return n.Text == "<b onload='x'>#3</b>" })); n != 1 {
		t.Errorf("alarm label not kept as text")
	}
}

func TestChartTimeTicks(t *testing.T) {
	from := time.Date(2025, 3, 12, 13, 47, 10, 0, time.UTC)
	for _, tc := range []struct {
		span  time.Duration
		want1 []string
		want2 []string
	}{
		{24 * time.Hour,
			[]string{"15:00", "18:00", "21:00", "00:00", "03:00", "06:00", "09:00", "12:00"},
			[]string{"Mar 12", "", "", "Mar 13", "", "", "", ""}},
		{7 * 24 * time.Hour,
			[]string{"Mar 13", "Mar 14", "Mar 15", "Mar 16", "Mar 17", "Mar 18", "Mar 19"},
			[]string{"2025", "", "", "", "", "", ""}},
		{30 * 24 * time.Hour,
			[]string{"Mar 16", "Mar 21", "Mar 26", "Apr 1", "Apr 6", "Apr 11"},
			[]string{"2025", "", "", "", "", ""}},
	} {
		ticks := chartTimeTicks(from, from.Add(tc.span), 960-chartMarginLeft-chartMarginRight)
		var l1, l2 []string
		for _, k := range ticks {
			l1 = append(l1, k.line1)
			l2 = append(l2, k.line2)
		}
		if strings.Join(l1, ",") != strings.Join(tc.want1, ",") || strings.Join(l2, ",") != strings.Join(tc.want2, ",") {
			t.Errorf("%v: ticks %q / %q, want %q / %q", tc.span, l1, l2, tc.want1, tc.want2)
		}
	}
}

func TestChartRejectsBadInput(t *testing.T) {
	ok := TrendChart{From: chartT0, To: chartT0.Add(time.Hour)}
	for name, mod := range map[string]func(*TrendChart){
		"reversed":      func(c *TrendChart) { c.To = c.From.Add(-time.Hour) },
		"empty axis":    func(c *TrendChart) { c.To = c.From },
		"centuries":     func(c *TrendChart) { c.To = c.From.AddDate(100, 0, 0) },
		"no from":       func(c *TrendChart) { c.From = time.Time{} },
		"narrow":        func(c *TrendChart) { c.Width = 100 },
		"negative":      func(c *TrendChart) { c.Height = -1 },
		"huge":          func(c *TrendChart) { c.Width = 100000 },
		"NaN threshold": func(c *TrendChart) { c.Threshold = math.NaN() },
		"threshold 3":   func(c *TrendChart) { c.WarnThreshold = 3 },
		"severity": func(c *TrendChart) {
			c.Alarms = []AlarmMark{{Time: c.From, Severity: "critical"}}
		},
	} {
		c := ok
		mod(&c)
		var b bytes.Buffer
		if err := c.WriteSVG(&b); !errors.Is(err, ErrBadChart) || b.Len() != 0 {
			t.Errorf("%s: err %v, %d bytes written", name, err, b.Len())
		}
	}
	if err := ok.WriteSVG(failWriter{}); err == nil || errors.Is(err, ErrBadChart) {
		t.Errorf("write error not returned: %v", err)
	}
	// A non-default size is honoured.
	ok.Width, ok.Height = 400, 300
	if root := parseSVG(t, renderChart(t, ok)); root.attr("viewBox") != "0 0 400 300" {
		t.Errorf("viewBox %q", root.attr("viewBox"))
	}
}

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }

func BenchmarkChart30Days(b *testing.B) {
	c := TrendChart{From: chartT0, To: chartT0.Add(30 * 24 * time.Hour), Threshold: 0.35,
		Points: chartPoints(chartT0, chartT0.Add(30*24*time.Hour), nil)}
	var buf bytes.Buffer
	b.ReportAllocs()
	for b.Loop() {
		buf.Reset()
		if err := c.WriteSVG(&buf); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(buf.Len()), "bytes")
}
