package site

import (
	"bufio"
	"encoding/binary"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"net/http"
	"os"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

// MaxRange is the longest time range an export or report accepts; longer
// requests are refused (split them).
const MaxRange = 400 * 24 * time.Hour

// pageSize is how many records one read transaction returns: the store is
// never held while a client is written to.
const pageSize = 1000

// ParseRange reads an export's from and to as the pages and commands do;
// see parseRange.
func ParseRange(fromS, toS string, defFrom, defTo time.Time) (from, to time.Time, err error) {
	return parseRange(fromS, toS, defFrom, defTo, defTo)
}

// parseRange reads from and to: an RFC 3339 time, a date (UTC midnight),
// or a look-back from now such as "24h" or "7d". Empty takes the default
// (a zero default: unbounded).
func parseRange(fromS, toS string, defFrom, defTo, now time.Time) (from, to time.Time, err error) {
	parse := func(name, s string, def time.Time) (time.Time, error) {
		s = strings.TrimSpace(s)
		switch {
		case s == "":
			return def, nil
		case strings.HasSuffix(s, "d") || strings.HasSuffix(s, "h"):
			n, err := strconv.ParseFloat(s[:len(s)-1], 64)
			if err == nil && n > 0 && n <= 10000 {
				unit := time.Hour
				if strings.HasSuffix(s, "d") {
					unit = 24 * time.Hour
				}
				return now.Add(-time.Duration(n * float64(unit))), nil
			}
		}
		if t, err := time.Parse(time.RFC3339Nano, s); err == nil {
			return t.UTC(), nil
		}
		if t, err := time.Parse("2006-01-02", s); err == nil {
			return t, nil
		}
		return time.Time{}, fmt.Errorf("site: %s %q: want a date (2026-11-01), an RFC 3339 time or a look-back such as 7d", name, s)
	}
	if from, err = parse("from", fromS, defFrom); err != nil {
		return
	}
	if to, err = parse("to", toS, defTo); err != nil {
		return
	}
	if !from.IsZero() && !to.IsZero() {
		if !from.Before(to) {
			return from, to, fmt.Errorf("site: from %s is not before to %s", from.Format(time.RFC3339), to.Format(time.RFC3339))
		}
		if to.Sub(from) > MaxRange {
			return from, to, fmt.Errorf("site: %s to %s is %.0f days; at most %.0f at a time: split the export",
				from.Format("2006-01-02"), to.Format("2006-01-02"), to.Sub(from).Hours()/24, MaxRange.Hours()/24)
		}
	}
	return from, to, nil
}

// readTrend reads the trend of [from, to) in pages.
func readTrend(st Store, from, to time.Time) ([]store.TrendPoint, error) {
	var out []store.TrendPoint
	err := eachTrend(st, from, to, func(p store.TrendPoint) error { out = append(out, p); return nil })
	return out, err
}

func eachTrend(st Store, from, to time.Time, fn func(store.TrendPoint) error) error {
	return eachPage(from, to, st.Trend, func(p store.TrendPoint) time.Time { return p.Start }, fn)
}

func eachSummary(st Store, from, to time.Time, fn func(store.Summary) error) error {
	return eachPage(from, to, st.Summaries, func(m store.Summary) time.Time { return m.Start }, fn)
}

// eachPage calls fn for every record read returns in [from, to), one page
// of pageSize per read transaction; start gives a record's key time.
func eachPage[T any](from, to time.Time, read func(store.Range) ([]T, error), start func(T) time.Time, fn func(T) error) error {
	for {
		page, err := read(store.Range{From: from, To: to, Limit: pageSize})
		if err != nil {
			return err
		}
		for _, r := range page {
			if err := fn(r); err != nil {
				return err
			}
		}
		if len(page) < pageSize {
			return nil
		}
		from = start(page[len(page)-1]).Add(time.Millisecond)
	}
}

// readEvents reads the events q selects in pages, oldest first.
func readEvents(st Store, q store.EventQuery) ([]store.Event, error) {
	var out []store.Event
	err := eachEvent(st, q, func(e store.Event) error { out = append(out, e); return nil })
	return out, err
}

func eachEvent(st Store, q store.EventQuery, fn func(store.Event) error) error {
	q.Limit, q.Newest = pageSize, false
	for {
		page, err := st.Events(q)
		if err != nil {
			return err
		}
		for _, e := range page {
			if err := fn(e); err != nil {
				return err
			}
		}
		if len(page) < pageSize {
			return nil
		}
		q.AfterSeq = page[len(page)-1].Seq
	}
}

// Export kinds and formats.
var (
	exportKinds   = []string{"events", "trend", "summaries"}
	exportFormats = []string{"csv", "json"}
)

func num(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	return strconv.FormatFloat(x, 'g', 8, 64)
}

func stampMs(t time.Time) string { return t.UTC().Format("2006-01-02T15:04:05.000Z07:00") }

// Export writes the records of one kind in [from, to) as CSV (RFC 4180,
// header row) or JSON (an object with the range and a records array),
// reading the store a page at a time.
func Export(w io.Writer, st Store, asset, kind, format string, from, to time.Time) error {
	if !contains(exportKinds, kind) {
		return errBadRange(fmt.Errorf("site: export %q: want events, trend or summaries", kind))
	}
	if !contains(exportFormats, format) {
		return errBadRange(fmt.Errorf("site: format %q: want csv or json", format))
	}
	bw := bufio.NewWriterSize(w, 32<<10)
	var rec func(header []string, row []string, obj any) error
	var finish func() error
	if format == "csv" {
		cw := csv.NewWriter(bw)
		wroteHeader := false
		rec = func(header, row []string, _ any) error {
			if !wroteHeader {
				wroteHeader = true
				if err := cw.Write(header); err != nil {
					return err
				}
			}
			return cw.Write(row)
		}
		finish = func() error { cw.Flush(); return cw.Error() }
	} else {
		head, _ := json.Marshal(map[string]string{"asset": asset, "kind": kind, "from": rangeEnd(from), "to": rangeEnd(to)})
		fmt.Fprintf(bw, "%s,\"records\":[\n", head[:len(head)-1])
		n := 0
		enc := json.NewEncoder(bw)
		rec = func(_, _ []string, obj any) error {
			if n > 0 {
				bw.WriteString(",")
			}
			n++
			return enc.Encode(obj)
		}
		finish = func() error { _, err := bw.WriteString("]}\n"); return err }
	}
	var err error
	switch kind {
	case "events":
		header := []string{"seq", "time", "kind", "code", "asset", "score", "threshold", "state", "clip_id", "message", "values", "labels"}
		err = eachEvent(st, store.EventQuery{From: from, To: to}, func(e store.Event) error {
			return rec(header, []string{strconv.FormatUint(e.Seq, 10), stampMs(e.Time), string(e.Kind), e.Code, e.Asset,
				num(e.Score), num(e.Threshold), e.Labels["state"], idText(e.ClipID), e.Message, pairs(e.Values), labelPairs(e.Labels)},
				eventJSON{Seq: e.Seq, Time: stampMs(e.Time), Kind: string(e.Kind), Code: e.Code, Asset: e.Asset, Score: e.Score,
					Threshold: e.Threshold, ClipID: e.ClipID, Message: e.Message, Values: e.Values, Labels: e.Labels})
		})
	case "trend":
		header := []string{"start", "windows", "score_min", "score_mean", "score_max", "rms_mean_dbfs", "rms_max_dbfs", "running_fraction", "alarm_state"}
		err = eachTrend(st, from, to, func(p store.TrendPoint) error {
			return rec(header, []string{stampMs(p.Start), strconv.Itoa(p.Windows), num(p.ScoreMin), num(p.ScoreMean), num(p.ScoreMax),
				num(p.RMSMeanDBFS), num(p.RMSMaxDBFS), num(p.RunningFraction), p.Alarm.ISA()},
				trendJSON{Start: stampMs(p.Start), Windows: p.Windows, ScoreMin: p.ScoreMin, ScoreMean: p.ScoreMean, ScoreMax: p.ScoreMax,
					RMSMeanDBFS: p.RMSMeanDBFS, RMSMaxDBFS: p.RMSMaxDBFS, RunningFraction: p.RunningFraction, AlarmState: p.Alarm.ISA()})
		})
	case "summaries":
		header := []string{"start", "windows", "running_fraction", "score_min", "score_mean", "score_p95", "score_max", "rms_mean_dbfs",
			"rms_max_dbfs", "alarm_s", "alarms", "warnings", "overruns", "sensor_faults", "alarm_state"}
		err = eachSummary(st, from, to, func(m store.Summary) error {
			return rec(header, []string{stampMs(m.Start), strconv.Itoa(m.Windows), num(m.RunningFraction), num(m.ScoreMin), num(m.ScoreMean),
				num(m.ScoreP95), num(m.ScoreMax), num(m.RMSMeanDBFS), num(m.RMSMaxDBFS), num(m.AlarmSeconds), strconv.Itoa(m.Alarms),
				strconv.Itoa(m.Warnings), strconv.Itoa(m.Overruns), strconv.Itoa(m.SensorFaults), m.Alarm.ISA()},
				summaryJSON{Start: stampMs(m.Start), Windows: m.Windows, RunningFraction: m.RunningFraction, ScoreMin: m.ScoreMin,
					ScoreMean: m.ScoreMean, ScoreP95: m.ScoreP95, ScoreMax: m.ScoreMax, RMSMeanDBFS: m.RMSMeanDBFS, RMSMaxDBFS: m.RMSMaxDBFS,
					AlarmS: m.AlarmSeconds, Alarms: m.Alarms, Warnings: m.Warnings, Overruns: m.Overruns, SensorFaults: m.SensorFaults,
					AlarmState: m.Alarm.ISA()})
		})
	}
	if err != nil {
		return err
	}
	if err := finish(); err != nil {
		return err
	}
	return bw.Flush()
}

type eventJSON struct {
	Seq       uint64             `json:"seq"`
	Time      string             `json:"time"`
	Kind      string             `json:"kind"`
	Code      string             `json:"code"`
	Asset     string             `json:"asset,omitempty"`
	Score     float64            `json:"score"`
	Threshold float64            `json:"threshold"`
	ClipID    uint64             `json:"clip_id,omitempty"`
	Message   string             `json:"message"`
	Values    map[string]float64 `json:"values,omitempty"`
	Labels    map[string]string  `json:"labels,omitempty"`
}

type trendJSON struct {
	Start           string  `json:"start"`
	Windows         int     `json:"windows"`
	ScoreMin        float64 `json:"score_min"`
	ScoreMean       float64 `json:"score_mean"`
	ScoreMax        float64 `json:"score_max"`
	RMSMeanDBFS     float64 `json:"rms_mean_dbfs"`
	RMSMaxDBFS      float64 `json:"rms_max_dbfs"`
	RunningFraction float64 `json:"running_fraction"`
	AlarmState      string  `json:"alarm_state"`
}

type summaryJSON struct {
	Start           string  `json:"start"`
	Windows         int     `json:"windows"`
	RunningFraction float64 `json:"running_fraction"`
	ScoreMin        float64 `json:"score_min"`
	ScoreMean       float64 `json:"score_mean"`
	ScoreP95        float64 `json:"score_p95"`
	ScoreMax        float64 `json:"score_max"`
	RMSMeanDBFS     float64 `json:"rms_mean_dbfs"`
	RMSMaxDBFS      float64 `json:"rms_max_dbfs"`
	AlarmS          float64 `json:"alarm_s"`
	Alarms          int     `json:"alarms"`
	Warnings        int     `json:"warnings"`
	Overruns        int     `json:"overruns"`
	SensorFaults    int     `json:"sensor_faults"`
	AlarmState      string  `json:"alarm_state"`
}

func rangeEnd(t time.Time) string {
	if t.IsZero() {
		return ""
	}
	return stampMs(t)
}

func idText(id uint64) string {
	if id == 0 {
		return ""
	}
	return strconv.FormatUint(id, 10)
}

func pairs(m map[string]float64) string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var b strings.Builder
	for i, k := range keys {
		if i > 0 {
			b.WriteByte(';')
		}
		b.WriteString(k + "=" + num(m[k]))
	}
	return b.String()
}

func labelPairs(m map[string]string) string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	var b strings.Builder
	for i, k := range keys {
		if i > 0 {
			b.WriteByte(';')
		}
		b.WriteString(k + "=" + m[k])
	}
	return b.String()
}

func contains(xs []string, x string) bool {
	for _, s := range xs {
		if s == x {
			return true
		}
	}
	return false
}

// export serves /export?what=&format=&from=&to= as a download.
func (s *Server) export(w http.ResponseWriter, r *http.Request) {
	q := r.URL.Query()
	what, format := q.Get("what"), q.Get("format")
	if format == "" {
		format = "csv"
	}
	now := s.cfg.Now().UTC()
	from, to, err := parseRange(q.Get("from"), q.Get("to"), now.Add(-30*24*time.Hour), now.Add(time.Minute), now)
	if err == nil && (!contains(exportKinds, what) || !contains(exportFormats, format)) {
		err = fmt.Errorf("site: export what=%q format=%q: want what events, trend or summaries and format csv or json", what, format)
	}
	if err != nil {
		s.fail(w, r, http.StatusBadRequest, err)
		return
	}
	asset := s.cfg.Live().Asset
	ctype := map[string]string{"csv": "text/csv; charset=utf-8", "json": "application/json"}[format]
	w.Header().Set("Content-Type", ctype)
	w.Header().Set("Content-Disposition", fmt.Sprintf(`attachment; filename="%s-%s-%s-%s.%s"`,
		safeName(asset), what, from.Format("20060102"), to.Format("20060102"), format))
	if err := Export(w, s.cfg.Store, asset, what, format, from, to); err != nil {
		s.cfg.Logger.Error("export failed part way", "what", what, "err", err)
	}
}

// backup stages a consistent copy of the log in a temporary file, then
// sends it: the read transaction ends before the first byte goes out.
func (s *Server) backup(w http.ResponseWriter, r *http.Request) {
	f, err := os.CreateTemp(s.cfg.TempDir, "auscult-backup-*.db")
	if err != nil {
		s.fail(w, r, 500, fmt.Errorf("site: backup: %w", err))
		return
	}
	defer os.Remove(f.Name())
	defer f.Close()
	n, err := s.cfg.Store.Backup(f)
	if err != nil {
		s.fail(w, r, 500, err)
		return
	}
	if _, err := f.Seek(0, io.SeekStart); err != nil {
		s.fail(w, r, 500, err)
		return
	}
	now := s.cfg.Now().UTC()
	w.Header().Set("Content-Type", "application/octet-stream")
	w.Header().Set("Content-Length", strconv.FormatInt(n, 10))
	w.Header().Set("Content-Disposition", fmt.Sprintf(`attachment; filename="%s-log-%s.db"`,
		safeName(s.cfg.Live().Asset), now.Format("20060102T150405Z")))
	if _, err := io.Copy(w, f); err != nil {
		s.cfg.Logger.Warn("backup download broke off", "err", err)
	}
}

func safeName(s string) string {
	if s == "" {
		return "auscult"
	}
	return strings.Map(func(r rune) rune {
		if r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' {
			return r
		}
		return '_'
	}, s)
}

// decodeClipWAV reads the 16-bit mono PCM clips the agent stores.
func decodeClipWAV(b []byte) (rate int, samples []int16, err error) {
	if len(b) < 44 || string(b[0:4]) != "RIFF" || string(b[8:12]) != "WAVE" {
		return 0, nil, fmt.Errorf("site: clip is not a WAV file")
	}
	le := binary.LittleEndian
	off := 12
	for off+8 <= len(b) {
		id, size := string(b[off:off+4]), int(le.Uint32(b[off+4:]))
		body := b[off+8:]
		if size > len(body) {
			size = len(body)
		}
		switch id {
		case "fmt ":
			if size < 16 || le.Uint16(body[0:]) != 1 || le.Uint16(body[2:]) != 1 || le.Uint16(body[14:]) != 16 {
				return 0, nil, fmt.Errorf("site: clip is not 16-bit mono PCM")
			}
			rate = int(le.Uint32(body[4:]))
		case "data":
			if rate == 0 {
				return 0, nil, fmt.Errorf("site: clip has data before its format")
			}
			samples = make([]int16, size/2)
			for i := range samples {
				samples[i] = int16(le.Uint16(body[2*i:]))
			}
			return rate, samples, nil
		}
		off += 8 + size + size%2
	}
	return 0, nil, fmt.Errorf("site: clip has no data chunk")
}
