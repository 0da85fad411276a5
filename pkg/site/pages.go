package site

import (
	"bytes"
	"embed"
	"errors"
	"fmt"
	"html/template"
	"net/http"
	"net/url"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

//go:embed assets/pages.html assets/style.css
var assets embed.FS

var pages = template.Must(template.New("pages").Funcs(template.FuncMap{
	"stamp": func(t time.Time) string { return t.UTC().Format("2006-01-02 15:04:05") },
	"join":  strings.Join,
	"ms":    func(d time.Duration) string { return fmt.Sprintf("%d ms", d.Milliseconds()) },
	"mins":  func(d time.Duration) string { return fmt.Sprintf("%.0f min", d.Minutes()) },
	"pct":   func(x float64) string { return fmt.Sprintf("%.0f %%", 100*x) },
	"hz":    hzText,
	"bytes": bytesText,
	"stateWords": func(s string) string {
		return map[string]string{"NORM": "normal", "UNACK": "active, not acknowledged", "ACKED": "active, acknowledged",
			"RTNUN": "cleared, not yet acknowledged", "SHLVD": "shelved"}[s]
	},
	"codeClass": func(code string) string {
		switch {
		case strings.HasPrefix(code, "alarm."):
			return "sev-alarm"
		case strings.HasPrefix(code, "warning."):
			return "sev-warning"
		}
		return ""
	},
	"bandHint": bandHint,
}).ParseFS(assets, "assets/pages.html"))

// pageData is what every template gets.
type pageData struct {
	Title, Error, Nav string
	Live              Live
	Now               time.Time
	Events            []store.Event
	Event             store.Event
	Bands             []bandRow
	Values            []kv
	ClipFound         bool
	Summaries         []store.Summary
	Stats             store.Stats
	Outbox            store.OutboxStats
	SVG               template.HTML
	RangeName         string
	Ranges            []rangeLink
	Filter            filter
	Next              string
}

type bandRow struct{ LowHz, HighHz, DeviationSD float64 }

type kv struct{ K, V string }

type rangeLink struct {
	Key, Name string
	Here      bool
}

type filter struct{ Kind, Code, From, To string }

func (s *Server) routes() {
	m := s.mux
	m.HandleFunc("GET /{$}", s.status)
	m.HandleFunc("GET /trend", s.trendPage)
	m.HandleFunc("GET /trend.svg", s.trendSVG)
	m.HandleFunc("GET /events", s.eventsPage)
	m.HandleFunc("GET /events/{seq}", s.eventPage)
	m.HandleFunc("GET /clips/{id}/audio.wav", s.clipWAV)
	m.HandleFunc("GET /clips/{id}/spectrogram.png", s.clipSpectrogram)
	m.HandleFunc("GET /summaries", s.summariesPage)
	m.HandleFunc("GET /take-home", s.takeHome)
	m.HandleFunc("GET /export", s.export)
	m.HandleFunc("GET /backup", s.backup)
	m.HandleFunc("GET /report", s.report)
	m.HandleFunc("POST /logout", s.logout)
}

// render executes a template into a buffer first, so a template error
// becomes a clean 500 instead of half a page.
func (s *Server) render(w http.ResponseWriter, code int, name string, d pageData) {
	if d.Live.Asset == "" && name != "login" {
		d.Live = s.cfg.Live()
	}
	d.Now = s.cfg.Now()
	var buf bytes.Buffer
	if err := pages.ExecuteTemplate(&buf, name, d); err != nil {
		s.cfg.Logger.Error("web page failed", "page", name, "err", err)
		http.Error(w, "site: page failed: "+err.Error(), http.StatusInternalServerError)
		return
	}
	w.Header().Set("Content-Type", "text/html; charset=utf-8")
	w.WriteHeader(code)
	w.Write(buf.Bytes())
}

// fail answers a store or input error.
func (s *Server) fail(w http.ResponseWriter, r *http.Request, code int, err error) {
	if code >= 500 {
		s.cfg.Logger.Error("web request failed", "path", r.URL.Path, "err", err)
	}
	http.Error(w, err.Error(), code)
}

func (s *Server) style(w http.ResponseWriter, r *http.Request) {
	b, _ := assets.ReadFile("assets/style.css")
	w.Header().Set("Content-Type", "text/css; charset=utf-8")
	w.Header().Set("Cache-Control", "max-age=3600")
	w.Write(b)
}

func (s *Server) logout(w http.ResponseWriter, r *http.Request) {
	http.SetCookie(w, &http.Cookie{Name: sessionCookie, Value: "", Path: "/", MaxAge: -1, HttpOnly: true, SameSite: http.SameSiteStrictMode})
	http.Redirect(w, r, "/login", http.StatusSeeOther)
}

func (s *Server) status(w http.ResponseWriter, r *http.Request) {
	d := pageData{Title: "Status", Nav: "status", Live: s.cfg.Live()}
	var err error
	if d.Stats, err = s.cfg.Store.Stats(); err != nil {
		s.fail(w, r, 500, err)
		return
	}
	if d.Outbox, err = s.cfg.Store.OutboxStats(); err != nil {
		s.fail(w, r, 500, err)
		return
	}
	if d.Events, err = s.cfg.Store.Events(store.EventQuery{Kinds: []store.EventKind{store.EventAlarm}, Newest: true, Limit: 10}); err != nil {
		s.fail(w, r, 500, err)
		return
	}
	s.render(w, http.StatusOK, "status", d)
}

// trendRanges are the chart's periods.
var trendRanges = []struct {
	key, name string
	d         time.Duration
}{{"24h", "last 24 hours", 24 * time.Hour}, {"7d", "last 7 days", 7 * 24 * time.Hour}, {"30d", "last 30 days", 30 * 24 * time.Hour}}

// chart draws the trend SVG for the range key.
func (s *Server) chart(key string) ([]byte, string, error) {
	idx := 0
	for i, t := range trendRanges {
		if t.key == key {
			idx = i
		}
	}
	if key != "" && trendRanges[idx].key != key {
		return nil, "", errBadRange(fmt.Errorf("range %q: want 24h, 7d or 30d", key))
	}
	tr := trendRanges[idx]
	to := s.cfg.Now().UTC()
	from := to.Add(-tr.d)
	pts, err := readTrend(s.cfg.Store, from, to)
	if err != nil {
		return nil, "", err
	}
	evs, err := readEvents(s.cfg.Store, store.EventQuery{From: from, To: to, Kinds: []store.EventKind{store.EventAlarm}})
	if err != nil {
		return nil, "", err
	}
	var marks []AlarmMark
	for _, e := range evs {
		if strings.HasSuffix(e.Code, ".raised") {
			sev := strings.TrimSuffix(e.Code, ".raised")
			marks = append(marks, AlarmMark{Time: e.Time, Severity: sev, Label: fmt.Sprintf("%s #%d", sev, e.Seq)})
		}
	}
	live := s.cfg.Live()
	c := TrendChart{From: from, To: to, Points: pts, Alarms: marks, Threshold: live.Threshold, WarnThreshold: live.WarnThreshold,
		Title: fmt.Sprintf("%s, %s", live.Asset, tr.name)}
	var buf bytes.Buffer
	if err := c.WriteSVG(&buf); err != nil {
		return nil, "", err
	}
	return buf.Bytes(), tr.name, nil
}

type badRange struct{ error }

func errBadRange(err error) error { return badRange{err} }

func statusOf(err error) int {
	var b badRange
	if errors.As(err, &b) {
		return http.StatusBadRequest
	}
	if errors.Is(err, store.ErrNotFound) {
		return http.StatusNotFound
	}
	return http.StatusInternalServerError
}

func (s *Server) trendPage(w http.ResponseWriter, r *http.Request) {
	key := r.URL.Query().Get("range")
	svg, name, err := s.chart(key)
	if err != nil {
		s.fail(w, r, statusOf(err), err)
		return
	}
	if key == "" {
		key = "24h"
	}
	d := pageData{Title: "Trend", Nav: "trend", SVG: template.HTML(svg), RangeName: strings.TrimPrefix(name, "last ")}
	for _, t := range trendRanges {
		d.Ranges = append(d.Ranges, rangeLink{Key: t.key, Name: t.name, Here: t.key == key})
	}
	s.render(w, http.StatusOK, "trend", d)
}

func (s *Server) trendSVG(w http.ResponseWriter, r *http.Request) {
	svg, _, err := s.chart(r.URL.Query().Get("range"))
	if err != nil {
		s.fail(w, r, statusOf(err), err)
		return
	}
	w.Header().Set("Content-Type", "image/svg+xml")
	w.Write(svg)
}

// eventsPageSize is how many events a page of the history shows.
const eventsPageSize = 100

func (s *Server) eventsPage(w http.ResponseWriter, r *http.Request) {
	q := r.URL.Query()
	f := filter{Kind: q.Get("kind"), Code: q.Get("code"), From: q.Get("from"), To: q.Get("to")}
	from, to, err := parseRange(f.From, f.To, time.Time{}, time.Time{}, s.cfg.Now())
	if err != nil {
		s.fail(w, r, http.StatusBadRequest, err)
		return
	}
	eq := store.EventQuery{From: from, To: to, Newest: true}
	switch f.Kind {
	case "":
	case "alarm", "diagnostic", "state":
		eq.Kinds = []store.EventKind{store.EventKind(f.Kind)}
	default:
		s.fail(w, r, http.StatusBadRequest, fmt.Errorf("site: kind %q: want alarm, diagnostic or state", f.Kind))
		return
	}
	if b := q.Get("before"); b != "" {
		if eq.BeforeSeq, err = strconv.ParseUint(b, 10, 64); err != nil {
			s.fail(w, r, http.StatusBadRequest, fmt.Errorf("site: before %q: want an event number", b))
			return
		}
	}
	// Scan newest first in pages until a page of matches is full.
	var out []store.Event
	for len(out) < eventsPageSize {
		eq.Limit = 1000
		page, err := s.cfg.Store.Events(eq)
		if err != nil {
			s.fail(w, r, 500, err)
			return
		}
		for _, e := range page {
			if f.Code == "" || strings.Contains(e.Code, f.Code) {
				out = append(out, e)
				if len(out) == eventsPageSize {
					break
				}
			}
		}
		if len(page) < eq.Limit {
			break
		}
		eq.BeforeSeq = page[len(page)-1].Seq
	}
	d := pageData{Title: "Events", Nav: "events", Events: out, Filter: f}
	if len(out) == eventsPageSize {
		v := url.Values{"before": {fmt.Sprint(out[len(out)-1].Seq)}}
		for k, x := range map[string]string{"kind": f.Kind, "code": f.Code, "from": f.From, "to": f.To} {
			if x != "" {
				v.Set(k, x)
			}
		}
		d.Next = "/events?" + v.Encode()
	}
	s.render(w, http.StatusOK, "events", d)
}

func pathID(r *http.Request, name string) (uint64, error) {
	v := r.PathValue(name)
	n, err := strconv.ParseUint(v, 10, 64)
	if err != nil || n == 0 {
		return 0, fmt.Errorf("site: %s %q: want a positive whole number", name, v)
	}
	return n, nil
}

func (s *Server) eventPage(w http.ResponseWriter, r *http.Request) {
	seq, err := pathID(r, "seq")
	if err != nil {
		s.fail(w, r, http.StatusNotFound, err)
		return
	}
	e, err := s.cfg.Store.Event(seq)
	if err != nil {
		s.fail(w, r, statusOf(err), err)
		return
	}
	d := pageData{Title: fmt.Sprintf("Event %d", seq), Nav: "events", Event: e, Bands: eventBands(e)}
	if e.ClipID != 0 {
		_, cerr := s.cfg.Store.Clip(e.ClipID)
		d.ClipFound = cerr == nil
	}
	keys := make([]string, 0, len(e.Values))
	for k := range e.Values {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		d.Values = append(d.Values, kv{k, strconv.FormatFloat(e.Values[k], 'g', 6, 64)})
	}
	s.render(w, http.StatusOK, "event", d)
}

// eventBands reads the deviating bands an alarm event carries.
func eventBands(e store.Event) []bandRow {
	var out []bandRow
	for i := 1; i <= 3; i++ {
		n := strconv.Itoa(i)
		hi, ok := e.Values["band"+n+"_hi_hz"]
		if !ok {
			break
		}
		out = append(out, bandRow{LowHz: e.Values["band"+n+"_lo_hz"], HighHz: hi, DeviationSD: e.Values["band"+n+"_dev_sd"]})
	}
	return out
}

func (s *Server) clipFor(w http.ResponseWriter, r *http.Request) (store.Clip, bool) {
	id, err := pathID(r, "id")
	if err != nil {
		s.fail(w, r, http.StatusNotFound, err)
		return store.Clip{}, false
	}
	c, err := s.cfg.Store.Clip(id)
	if err != nil {
		s.fail(w, r, statusOf(err), err)
		return store.Clip{}, false
	}
	return c, true
}

func (s *Server) clipWAV(w http.ResponseWriter, r *http.Request) {
	c, ok := s.clipFor(w, r)
	if !ok {
		return
	}
	w.Header().Set("Content-Type", "audio/wav")
	w.Header().Set("Cache-Control", "private, max-age=86400")
	http.ServeContent(w, r, fmt.Sprintf("clip-%d.wav", c.ID), c.Start, bytes.NewReader(c.WAV))
}

func (s *Server) clipSpectrogram(w http.ResponseWriter, r *http.Request) {
	c, ok := s.clipFor(w, r)
	if !ok {
		return
	}
	rate, samples, err := decodeClipWAV(c.WAV)
	if err != nil {
		s.fail(w, r, 500, err)
		return
	}
	sp := Spectrogram{Rate: rate, Samples: samples, EventAt: -1}
	if c.EventSeq != 0 {
		if e, err := s.cfg.Store.Event(c.EventSeq); err == nil {
			sp.EventAt = e.Time.Sub(c.Start)
			for i, b := range eventBands(e) {
				sp.Marks = append(sp.Marks, BandMark{LowHz: b.LowHz, HighHz: b.HighHz, Label: fmt.Sprintf("band %d", i+1)})
			}
		}
	}
	var buf bytes.Buffer
	if err := sp.WritePNG(&buf); err != nil {
		s.fail(w, r, 500, err)
		return
	}
	w.Header().Set("Content-Type", "image/png")
	w.Header().Set("Cache-Control", "private, max-age=86400")
	w.Write(buf.Bytes())
}

func (s *Server) summariesPage(w http.ResponseWriter, r *http.Request) {
	q := r.URL.Query()
	now := s.cfg.Now()
	from, to, err := parseRange(q.Get("from"), q.Get("to"), now.Add(-30*24*time.Hour), now.Add(time.Minute), now)
	if err != nil {
		s.fail(w, r, http.StatusBadRequest, err)
		return
	}
	sums, err := s.cfg.Store.Summaries(store.Range{From: from, To: to, Limit: 2000})
	if err != nil {
		s.fail(w, r, 500, err)
		return
	}
	for i, j := 0, len(sums)-1; i < j; i, j = i+1, j-1 {
		sums[i], sums[j] = sums[j], sums[i] // newest first
	}
	s.render(w, http.StatusOK, "summaries", pageData{Title: "Summaries", Nav: "summaries", Summaries: sums})
}

func (s *Server) takeHome(w http.ResponseWriter, r *http.Request) {
	now := s.cfg.Now().UTC()
	s.render(w, http.StatusOK, "take-home", pageData{Title: "Take home", Nav: "take-home",
		Filter: filter{From: now.Add(-30 * 24 * time.Hour).Format("2006-01-02"), To: now.Add(24 * time.Hour).Format("2006-01-02")}})
}

func hzText(f float64) string {
	if f >= 1000 {
		return fmt.Sprintf("%.2f kHz", f/1000)
	}
	return fmt.Sprintf("%.0f Hz", f)
}

func bytesText(n int64) string {
	switch {
	case n >= 1<<30:
		return fmt.Sprintf("%.1f GiB", float64(n)/(1<<30))
	case n >= 1<<20:
		return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20))
	case n >= 1<<10:
		return fmt.Sprintf("%.0f KiB", float64(n)/(1<<10))
	}
	return fmt.Sprintf("%d B", n)
}

// bandHint says what a band usually points at; common practice for pumps,
// no single source.
func bandHint(b bandRow) string {
	switch {
	case b.HighHz <= 300:
		return "shaft-rate region: imbalance, misalignment, looseness"
	case b.HighHz <= 1200:
		return "blade-pass and its harmonics: impeller, flow"
	case b.LowHz >= 2000:
		return "high frequency: bearings, cavitation, leaks"
	}
	return "mid band: bearings, flow noise"
}
