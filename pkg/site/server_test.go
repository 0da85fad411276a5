package site

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"net"
	"net/http"
	"net/http/httptest"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

const testToken = "obrinvale-visit-token-7f3a"

var t0 = time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)

// wavTone is a 16-bit mono WAV file of a tone, for clips.
func wavTone(rate int, seconds, hz float64) []byte {
	n := int(float64(rate) * seconds)
	var b bytes.Buffer
	le := binary.LittleEndian
	b.WriteString("RIFF")
	binary.Write(&b, le, uint32(36+2*n))
	b.WriteString("WAVEfmt ")
	for _, v := range []any{uint32(16), uint16(1), uint16(1), uint32(rate), uint32(2 * rate), uint16(2), uint16(16)} {
		binary.Write(&b, le, v)
	}
	b.WriteString("data")
	binary.Write(&b, le, uint32(2*n))
	for i := range n {
		binary.Write(&b, le, int16(8000*math.Sin(2*math.Pi*hz*float64(i)/float64(rate))))
	}
	return b.Bytes()
}

// fillStore writes a day of trend, a raised and cleared alarm with its
// clip, a diagnostic and two summaries into a real bbolt log.
func fillStore(t testing.TB) *store.Store {
	t.Helper()
	st, err := store.Open(filepath.Join(t.TempDir(), "obrinvale.db"), store.Options{FlushInterval: -1})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	for i := range 24 * 60 {
		at := t0.Add(time.Duration(i) * time.Minute)
		score := 0.2 + 0.05*math.Sin(float64(i)/50)
		if i >= 600 && i < 620 {
			score = 0.9
		}
		if i >= 300 && i < 420 {
			continue // the agent was off
		}
		st.AddTrend(store.TrendPoint{Start: at, Windows: 29, ScoreMin: score - 0.05, ScoreMean: score, ScoreMax: score + 0.05,
			RMSMeanDBFS: -31, RMSMaxDBFS: -27, RunningFraction: 1})
	}
	for h := range 2 {
		st.AddSummary(store.Summary{Start: t0.Add(time.Duration(h) * time.Hour), Windows: 1700, RunningFraction: 1, ScoreMin: 0.1,
			ScoreMean: 0.2, ScoreP95: 0.3, ScoreMax: 0.4, RMSMeanDBFS: -31, RMSMaxDBFS: -27})
	}
	if err := st.Flush(); err != nil {
		t.Fatal(err)
	}
	clip, _ := st.ReserveClipID()
	raise, err := st.AppendEvent(store.Event{Time: t0.Add(600 * time.Minute), Kind: store.EventAlarm, Code: "alarm.raised", Asset: "P-492B",
		Score: 0.91, Threshold: 0.6, Message: "alarm raised (state UNACK): <3 of 5> windows", ClipID: clip,
		Values: map[string]float64{"band1_lo_hz": 900, "band1_hi_hz": 1100, "band1_dev_sd": 6.5, "over_windows": 3, "of_windows": 5},
		Labels: map[string]string{"state": "UNACK", "change": "raised", "severity": "alarm"}})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.PutClip(store.Clip{ID: clip, EventSeq: raise, Start: t0.Add(600*time.Minute - 10*time.Second), Asset: "P-492B",
		WAV: wavTone(16000, 20, 1000)}); err != nil {
		t.Fatal(err)
	}
	st.AppendEvent(store.Event{Time: t0.Add(621 * time.Minute), Kind: store.EventAlarm, Code: "alarm.cleared", Asset: "P-492B",
		Score: 0.3, Threshold: 0.6, Message: "alarm cleared", Labels: map[string]string{"state": "RTNUN"}})
	st.AppendEvent(store.Event{Time: t0.Add(700 * time.Minute), Kind: store.EventDiagnostic, Code: "sensor.clipping.active", Asset: "P-492B",
		Message: "microphone clipping active", Values: map[string]float64{"value": 0.02, "limit": 0.01}})
	return st
}

func testServer(t testing.TB, st Store) (*Server, *httptest.Server) {
	t.Helper()
	s, err := New(Config{Store: st, Token: testToken, TempDir: t.TempDir(), Now: func() time.Time { return t0.Add(24 * time.Hour) },
		Live: func() Live {
			return Live{Asset: "P-492B", Site: "obrinvale", Machine: "running", Score: 0.21, Threshold: 0.6, WarnThreshold: 0.5,
				Alarm: "RTNUN", Severity: "none", BaselineID: "b1c2d3e4f5a6", Version: "test", Started: t0}
		}})
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(s)
	t.Cleanup(ts.Close)
	return s, ts
}

func get(t testing.TB, ts *httptest.Server, path string, hdr map[string]string) (*http.Response, string) {
	t.Helper()
	req, _ := http.NewRequest(http.MethodGet, ts.URL+path, nil)
	for k, v := range hdr {
		req.Header.Set(k, v)
	}
	c := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	resp, err := c.Do(req)
	if err != nil {
		t.Fatal(err)
	}
	defer resp.Body.Close()
	b, _ := io.ReadAll(resp.Body)
	return resp, string(b)
}

var bearer = map[string]string{"Authorization": "Bearer " + testToken}

var allPaths = []string{"/", "/trend", "/trend?range=7d", "/trend.svg", "/events", "/events/1", "/clips/1/audio.wav",
	"/clips/1/spectrogram.png", "/summaries", "/take-home", "/export?what=events", "/backup", "/report"}

// Without the token every page answers 401 (with the sign-in form), a
// wrong token too; /healthz says only "ok".
func TestTokenRequired(t *testing.T) {
	_, ts := testServer(t, fillStore(t))
	for _, p := range allPaths {
		for name, hdr := range map[string]map[string]string{"none": nil, "wrong": {"Authorization": "Bearer " + testToken + "x"},
			"short": {"Authorization": "Bearer obrinvale"}, "cookie": {"Cookie": sessionCookie + "=" + testToken}} {
			resp, body := get(t, ts, p, hdr)
			if resp.StatusCode != http.StatusUnauthorized || !strings.Contains(body, `name="token"`) {
				t.Errorf("%s with %s token: %d", p, name, resp.StatusCode)
			}
		}
		if resp, _ := get(t, ts, p, bearer); resp.StatusCode != http.StatusOK {
			t.Errorf("%s with the token: %d", p, resp.StatusCode)
		}
	}
	resp, body := get(t, ts, "/healthz", nil)
	if resp.StatusCode != 200 || body != "ok\n" {
		t.Errorf("healthz: %d %q", resp.StatusCode, body)
	}
}

// The login form sets a cookie that is not the token and opens the pages.
func TestLoginForm(t *testing.T) {
	_, ts := testServer(t, fillStore(t))
	c := &http.Client{CheckRedirect: func(*http.Request, []*http.Request) error { return http.ErrUseLastResponse }}
	resp, err := c.PostForm(ts.URL+"/login", url.Values{"token": {"guess"}})
	if err != nil || resp.StatusCode != http.StatusUnauthorized {
		t.Fatalf("wrong token: %v %v", resp.StatusCode, err)
	}
	resp, err = c.PostForm(ts.URL+"/login", url.Values{"token": {testToken}})
	if err != nil || resp.StatusCode != http.StatusSeeOther {
		t.Fatalf("right token: %v %v", resp.StatusCode, err)
	}
	var cookie *http.Cookie
	for _, k := range resp.Cookies() {
		if k.Name == sessionCookie {
			cookie = k
		}
	}
	if cookie == nil || strings.Contains(cookie.Value, testToken) || !cookie.HttpOnly || cookie.SameSite != http.SameSiteStrictMode {
		t.Fatalf("session cookie %+v", cookie)
	}
	if resp, body := get(t, ts, "/", map[string]string{"Cookie": cookie.Name + "=" + cookie.Value}); resp.StatusCode != 200 ||
		!strings.Contains(body, "b1c2d3e4f5a6") {
		t.Errorf("status with the cookie: %d", resp.StatusCode)
	}
	big := strings.Repeat("x", 20000)
	if resp, _ := c.PostForm(ts.URL+"/login", url.Values{"token": {big}}); resp.StatusCode != http.StatusBadRequest {
		t.Errorf("oversized login body: %d", resp.StatusCode)
	}
}

// No path reaches a file on disk or an unknown route; ids are numbers.
func TestNoTraversal(t *testing.T) {
	_, ts := testServer(t, fillStore(t))
	for _, p := range []string{"/../../etc/passwd", "/clips/..%2f..%2fetc%2fpasswd/audio.wav", "/clips/1%2f..%2f..%2fetc/audio.wav",
		"/events/-1", "/events/1e3", "/assets/", "/assets/pages.html", "/style.css/../../etc/passwd", "/clips/", "/events/99999"} {
		resp, body := get(t, ts, p, bearer)
		if resp.StatusCode == http.StatusOK || strings.Contains(body, "root:") || strings.Contains(body, "{{define") {
			t.Errorf("%s: %d %.80q", p, resp.StatusCode, body)
		}
	}
}

// Exports are valid CSV (RFC 4180, read with encoding/csv) and JSON and
// hold what the store holds; huge or inverted ranges are refused.
func TestExport(t *testing.T) {
	st := fillStore(t)
	_, ts := testServer(t, st)
	q := "&from=2026-11-30&to=2026-12-03"
	resp, body := get(t, ts, "/export?what=trend&format=csv"+q, bearer)
	rows, err := csv.NewReader(strings.NewReader(body)).ReadAll()
	if resp.StatusCode != 200 || err != nil || len(rows) != 1+24*60-120 || rows[0][0] != "start" {
		t.Fatalf("trend CSV: %d, %v, %d rows", resp.StatusCode, err, len(rows))
	}
	if !strings.Contains(resp.Header.Get("Content-Disposition"), "P-492B-trend-") {
		t.Errorf("download name %q", resp.Header.Get("Content-Disposition"))
	}
	_, body = get(t, ts, "/export?what=events&format=csv"+q, bearer)
	rows, err = csv.NewReader(strings.NewReader(body)).ReadAll()
	if err != nil || len(rows) != 4 || rows[1][3] != "alarm.raised" || !strings.Contains(rows[1][9], "<3 of 5>") || rows[1][8] != "1" {
		t.Errorf("events CSV (%v): %q", err, rows)
	}
	_, body = get(t, ts, "/export?what=summaries&format=json"+q, bearer)
	var doc struct {
		Asset   string            `json:"asset"`
		Records []json.RawMessage `json:"records"`
	}
	if err := json.Unmarshal([]byte(body), &doc); err != nil || doc.Asset != "P-492B" || len(doc.Records) != 2 {
		t.Errorf("summaries JSON (%v): %.300s", err, body)
	}
	for _, bad := range []string{"what=everything", "what=events&format=xml", "what=events&from=2020-01-01&to=2026-01-01",
		"what=events&from=2026-12-02&to=2026-12-01", "what=events&from=yesterday"} {
		if resp, body := get(t, ts, "/export?"+bad, bearer); resp.StatusCode != http.StatusBadRequest || len(body) < 10 {
			t.Errorf("%s: %d %q", bad, resp.StatusCode, body)
		}
	}
}

// The backup opens as a log with the same records.
func TestBackupDownload(t *testing.T) {
	st := fillStore(t)
	_, ts := testServer(t, st)
	resp, body := get(t, ts, "/backup", bearer)
	if resp.StatusCode != 200 {
		t.Fatal(resp.Status)
	}
	path := filepath.Join(t.TempDir(), "copy.db")
	if err := writeFile(path, []byte(body)); err != nil {
		t.Fatal(err)
	}
	cp, err := store.Open(path, store.Options{ReadOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	defer cp.Close()
	a, _ := st.Stats()
	b, _ := cp.Stats()
	if a.Events != b.Events || a.Trend != b.Trend || a.Clips != b.Clips {
		t.Errorf("copy holds %+v, original %+v", b, a)
	}
}

// A client that stops reading mid-download does not hold the store: the
// agent's writes, including ones that grow the file, go on.
func TestSlowClientDoesNotHoldTheStore(t *testing.T) {
	st := fillStore(t)
	_, ts := testServer(t, st)
	for _, path := range []string{"/export?what=trend&format=json&from=2026-11-01&to=2026-12-05", "/backup"} {
		conn, err := net.Dial("tcp", ts.Listener.Addr().String())
		if err != nil {
			t.Fatal(err)
		}
		fmt.Fprintf(conn, "GET %s HTTP/1.1\r\nHost: x\r\nAuthorization: Bearer %s\r\n\r\n", path, testToken)
		br := bufio.NewReaderSize(conn, 16)
		br.ReadString('\n') // the status line, then stop reading
		done := make(chan error, 1)
		go func() {
			// 40 clips of 1.3 MB: the file must grow, which needs every
			// read transaction closed.
			for i := range 40 {
				if _, err := st.PutClip(store.Clip{Start: t0.Add(time.Duration(i) * time.Minute), WAV: wavTone(16000, 40, 440)}); err != nil {
					done <- err
					return
				}
			}
			done <- nil
		}()
		select {
		case err := <-done:
			if err != nil {
				t.Fatal(err)
			}
		case <-time.After(60 * time.Second):
			t.Fatalf("%s: the store's writes stalled behind a client that stopped reading", path)
		}
		conn.Close()
	}
}

// Pages show what the log holds: the status, the alarm row with its clip,
// the event page with its audio element, spectrogram and bands.
func TestPages(t *testing.T) {
	_, ts := testServer(t, fillStore(t))
	_, body := get(t, ts, "/", bearer)
	for _, want := range []string{`id="alarm"`, "RTNUN", "b1c2d3e4f5a6", "alarm.raised", `data-seq="1"`} {
		if !strings.Contains(body, want) {
			t.Errorf("status page lacks %q", want)
		}
	}
	_, body = get(t, ts, "/events/1", bearer)
	for _, want := range []string{`<audio id="clip"`, `src="/clips/1/audio.wav"`, `id="spectrogram"`, "900 Hz", "1.10 kHz", "&lt;3 of 5&gt;"} {
		if !strings.Contains(body, want) {
			t.Errorf("event page lacks %q", want)
		}
	}
	resp, wav := get(t, ts, "/clips/1/audio.wav", bearer)
	if resp.Header.Get("Content-Type") != "audio/wav" || !strings.HasPrefix(wav, "RIFF") {
		t.Errorf("clip: %s %q", resp.Header.Get("Content-Type"), wav[:min(4, len(wav))])
	}
	resp, png := get(t, ts, "/clips/1/spectrogram.png", bearer)
	if resp.Header.Get("Content-Type") != "image/png" || !strings.HasPrefix(png, "\x89PNG") {
		t.Errorf("spectrogram: %s", resp.Header.Get("Content-Type"))
	}
	_, body = get(t, ts, "/events?kind=diagnostic", bearer)
	if !strings.Contains(body, "sensor.clipping.active") || strings.Contains(body, "alarm.raised") {
		t.Error("the kind filter does not filter")
	}
	_, body = get(t, ts, "/trend?range=24h", bearer)
	if !strings.Contains(body, `<svg`) || !strings.Contains(body, "alarm-mark") {
		t.Error("trend page lacks the chart or its alarm mark")
	}
	if resp, _ := get(t, ts, "/trend?range=1y", bearer); resp.StatusCode != http.StatusBadRequest {
		t.Errorf("unknown range: %d", resp.StatusCode)
	}
	resp, body = get(t, ts, "/report?from=2026-11-30&to=2026-12-02", bearer)
	if resp.StatusCode != 200 || !strings.Contains(body, "<style>") || strings.Contains(body, `href="/style.css"`) ||
		!strings.Contains(body, "<svg") {
		t.Errorf("report is not self-contained: %d", resp.StatusCode)
	}
}

func writeFile(path string, b []byte) error { return os.WriteFile(path, b, 0o600) }
