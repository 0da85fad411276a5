package main

import (
	"fmt"
	"io"
	"net"
	"net/http"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/auscult/auscult/pkg/site/browsertest"
)

// webConfig writes an agent config that reads stdin, flushes its log every
// second and serves the site-visit pages on a free loopback port.
func webConfig(t *testing.T, baselinePath string) (cfg, logPath, url, token string) {
	t.Helper()
	cfg, logPath = writeConfig(t, baselinePath, "  kind: stdin")
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	addr := l.Addr().String()
	l.Close()
	token = "obrinvale-skid7-visit-9c41e2"
	tokenFile := filepath.Join(filepath.Dir(cfg), "web-token")
	os.WriteFile(tokenFile, []byte(token+"\n"), 0o600)
	text := strings.Replace(string(readFile(t, cfg)), "log:\n", "log:\n  flush_s: 1\n", 1)
	text += fmt.Sprintf("web:\n  listen: %s\n  token_file: %s\n", addr, tokenFile)
	os.WriteFile(cfg, []byte(text), 0o644)
	return cfg, logPath, "http://" + addr, token
}

// screenshotDir keeps the test's screenshots after it ends, for a person
// to look at; the test log names them.
func screenshotDir(t *testing.T) string {
	dir := filepath.Join(os.TempDir(), "auscult-screenshots")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	return dir
}

// The site-visit pages of an agent that heard a fault, in headless
// Chromium (Debian's chromium package): sign in with the form, the status
// page, the trend chart with the alarm marked, the alarm row in the events,
// the evidence clip playing in an <audio> element with its spectrogram;
// screenshots on a phone and a laptop that are not blank.
func TestSitePagesInChromium(t *testing.T) {
	agentBinary(t)
	s := simulateSkid(t)
	br := browsertest.Start(t)
	cfg, logPath, base, token := webConfig(t, s.baseline)
	// The sound (5.5 minutes, fed at 20x) is stamped as if it began ten
	// minutes ago, so the last day's trend holds it.
	f := startFedArgs(t, cfg, skidScript(t, 2), true, "--clock", "samples", "--clock-start", "10m")
	f.p.waitFor(t, "site-visit pages up", 20*time.Second)
	f.p.waitFor(t, "evidence clip stored", 90*time.Second)
	select {
	case <-f.stopped: // all the sound written; the agent waits for more
	case <-time.After(90 * time.Second):
		t.Fatal("feeding the sound took over 90 s")
	}
	time.Sleep(2 * time.Second) // the last windows and a flush
	shots := screenshotDir(t)

	// A phone, signing in with the form.
	phone := br.Page(t, 390, 844, nil)
	if err := phone.Navigate(base + "/"); err != nil {
		t.Fatal(err)
	}
	if phone.Status() != http.StatusUnauthorized {
		t.Errorf("status page without the token: %d, want 401", phone.Status())
	}
	if err := phone.SetValue("#token", token); err != nil {
		t.Fatal(err)
	}
	if err := phone.Click("#signin"); err != nil {
		t.Fatal(err)
	}
	if phone.Status() != http.StatusOK {
		t.Fatalf("after signing in: %d", phone.Status())
	}
	if txt, err := phone.Text("#alarm"); err != nil || !slices.ContainsFunc([]string{"NORM", "UNACK", "ACKED", "RTNUN", "SHLVD"},
		func(s string) bool { return strings.HasPrefix(txt, s) }) {
		t.Errorf("alarm tile %q, %v", txt, err)
	}
	if n, _ := phone.Count("#events tr.kind-alarm"); n == 0 {
		t.Error("no alarm row on the status page")
	}
	phoneShot := filepath.Join(shots, "status-phone.png")
	checkShot(t, phone, phoneShot)

	// A laptop with the bearer header: trend, events, the alarm's page.
	laptop := br.Page(t, 1366, 900, map[string]string{"Authorization": "Bearer " + token})
	if err := laptop.Navigate(base + "/trend?range=24h"); err != nil || laptop.Status() != 200 {
		t.Fatalf("trend: %v %d", err, laptop.Status())
	}
	var box struct{ W, H float64 }
	if err := laptop.Eval(`(() => { const r = document.querySelector("svg#trend").getBoundingClientRect(); return {W: r.width, H: r.height}; })()`, &box); err != nil || box.W < 600 || box.H < 200 {
		t.Errorf("trend chart laid out at %+v (%v)", box, err)
	}
	if n, _ := laptop.Count("svg#trend .alarm-mark"); n == 0 {
		t.Error("the trend chart marks no alarm")
	}
	var noData bool
	laptop.Eval(`document.querySelector("svg#trend").textContent.includes("no data in this period")`, &noData)
	if n, _ := laptop.Count("svg#trend .score path, svg#trend .score polyline"); n == 0 || noData {
		t.Error("the score panel draws nothing")
	}
	checkShot(t, laptop, filepath.Join(shots, "trend-laptop.png"))

	if err := laptop.Navigate(base + "/events?kind=alarm"); err != nil {
		t.Fatal(err)
	}
	rows, _ := laptop.Count("#events tr.kind-alarm")
	raised, _ := laptop.Count(`#events tr.kind-alarm td.sev-alarm, #events tr.kind-alarm td.sev-warning`)
	if rows == 0 || raised == 0 {
		t.Fatalf("events page: %d alarm rows", rows)
	}
	var href string
	laptop.Eval(`[...document.querySelectorAll("#events tr.kind-alarm")].find(r => r.textContent.includes("clip")).querySelector("a").getAttribute("href")`, &href)
	if !strings.HasPrefix(href, "/events/") {
		t.Fatalf("no alarm row with a clip: %q", href)
	}
	if err := laptop.Navigate(base + href); err != nil {
		t.Fatal(err)
	}
	dur, err := laptop.AudioDuration("#clip", 10*time.Second)
	if err != nil || dur < 15 || dur > 21 {
		t.Errorf("evidence clip plays for %.2f s (%v), want about 20 s", dur, err)
	}
	var imgW int
	laptop.Eval(`new Promise(ok => { const i = document.querySelector("#spectrogram"); if (i.complete) ok(i.naturalWidth); else i.onload = () => ok(i.naturalWidth); })`, &imgW)
	if imgW < 300 {
		t.Errorf("spectrogram image %d px wide", imgW)
	}
	if n, _ := laptop.Count("#bands tbody tr"); n == 0 {
		t.Error("the alarm page lists no deviating band")
	}
	checkShot(t, laptop, filepath.Join(shots, "alarm-laptop.png"))
	for _, p := range []*browsertest.Page{phone, laptop} {
		for _, e := range p.ConsoleErrors() {
			if strings.Contains(e, "status of 401") && strings.HasSuffix(e, "("+base+"/)") {
				continue // the phone's first look, before signing in
			}
			t.Errorf("console error: %s", e)
		}
	}

	// The export and report links work from the running agent.
	resp, err := httpGet(base+"/export?what=events&format=csv&from=2d", token)
	if err != nil || !strings.Contains(resp, "alarm.raised") && !strings.Contains(resp, "warning.raised") {
		t.Errorf("export from the running agent: %v\n%.300s", err, resp)
	}
	t.Logf("Chromium %s; screenshots in %s", br.Version(), shots)
	checkTakeHome(t, f, logPath, base, filepath.Join(filepath.Dir(cfg), "web-token"))
}

// checkTakeHome: export, backup and report against the running agent's
// address; the locked log file gets a clear message; after the agent
// stops, the same commands read the file.
func checkTakeHome(t *testing.T, f *feeder, logPath, base, tokenFile string) {
	t.Helper()
	dir := t.TempDir()
	r := cli(t, "export", "--db", logPath, "--what", "events")
	wantFail(t, r, 1, "in use by a running agent", "--url")
	r = mustRun(t, "export", "--url", base, "--token-file", tokenFile, "--what", "events", "--from", "2d")
	rows := readCSV(t, r.stdout)
	if len(rows) < 3 || rows[0][0] != "seq" {
		t.Errorf("export --url: %d rows", len(rows))
	}
	r = cli(t, "export", "--url", base, "--token-env", "AUSCULT_NO_SUCH_TOKEN")
	wantFail(t, r, 1, "AUSCULT_NO_SUCH_TOKEN is not set")
	bad := filepath.Join(dir, "bad-token")
	os.WriteFile(bad, []byte("not-the-token-at-all\n"), 0o600)
	wantFail(t, cli(t, "export", "--url", base, "--token-file", bad), 1, "refused the token")
	copyPath := filepath.Join(dir, "visit.db")
	r = mustRun(t, "backup", "--url", base, "--token-file", tokenFile, "--out", copyPath)
	if !strings.Contains(r.stdout, "events") {
		t.Errorf("backup said %q", r.stdout)
	}
	mustRun(t, "report", "--url", base, "--token-file", tokenFile, "--from", "1d", "--out", filepath.Join(dir, "visit.html"))
	if html := string(readFile(t, filepath.Join(dir, "visit.html"))); !strings.Contains(html, "<svg") || strings.Contains(html, "src=\"http") {
		t.Error("report from the agent is not one self-contained file")
	}
	f.p.cmd.Process.Signal(syscall.SIGTERM)
	<-f.p.done
	for _, db := range []string{logPath, copyPath} {
		r = mustRun(t, "export", "--db", db, "--what", "trend", "--format", "json", "--from", "2d")
		if !strings.Contains(r.stdout, `"records":[`) || !strings.Contains(r.stdout, `"score_mean"`) {
			t.Errorf("export --db %s: %.200s", db, r.stdout)
		}
		mustRun(t, "report", "--db", db, "--from", "1d", "--out", filepath.Join(dir, "offline.html"))
	}
	wantFail(t, cli(t, "export", "--db", logPath, "--from", "2019-01-01", "--to", "2026-01-01"), 2, "at most 400")
	wantFail(t, cli(t, "export", "--what", "events"), 2, "--url")
}

// checkShot saves a full-page screenshot and fails if it is blank.
func checkShot(t *testing.T, p *browsertest.Page, path string) {
	t.Helper()
	if err := p.Screenshot(path); err != nil {
		t.Fatal(err)
	}
	colours, dominant, err := browsertest.NotBlank(path)
	if err != nil || colours < 50 || dominant > 0.95 {
		t.Errorf("screenshot %s looks blank: %d colours, %.0f %% one colour (%v)", path, colours, 100*dominant, err)
	}
	t.Logf("screenshot %s: %d colours, the commonest %.0f %%", path, colours, 100*dominant)
}

func httpGet(url, token string) (string, error) {
	req, _ := http.NewRequest(http.MethodGet, url, nil)
	req.Header.Set("Authorization", "Bearer "+token)
	resp, err := http.DefaultClient.Do(req)
	if err != nil {
		return "", err
	}
	defer resp.Body.Close()
	b, err := io.ReadAll(resp.Body)
	if resp.StatusCode != 200 {
		return string(b), fmt.Errorf("%s", resp.Status)
	}
	return string(b), err
}
