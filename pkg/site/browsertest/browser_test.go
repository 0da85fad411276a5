package browsertest

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"math"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

const (
	testToken   = "field-visit-7f3c2a"
	testCookie  = "auscult_session"
	testSession = "sess-51b8"
	testUser    = "tech"
	testPass    = "pump-house-3"
)

// TestBrowser drives one real Chromium through the test site: one browser,
// a fresh tab for every subtest.
func TestBrowser(t *testing.T) {
	srv := httptest.NewServer(testSite(t))
	t.Cleanup(srv.Close)

	start := time.Now()
	b := Start(t)
	t.Logf("%s (%s) started in %v", b.Version(), b.Path(), time.Since(start).Round(time.Millisecond))
	bearer := map[string]string{"Authorization": "Bearer " + testToken}

	t.Run("BearerHeader", func(t *testing.T) {
		p := b.Page(t, 390, 844, bearer)
		if err := p.Navigate(srv.URL + "/"); err != nil {
			t.Fatal(err)
		}
		if got := p.Status(); got != http.StatusOK {
			t.Fatalf("Status() = %d, want 200", got)
		}
		if err := p.WaitVisible("#reading", 5*time.Second); err != nil {
			t.Fatal(err)
		}
		text, err := p.Text("h1")
		if err != nil {
			t.Fatal(err)
		}
		if text != "Pump house 3" {
			t.Errorf("Text(h1) = %q", text)
		}
		var width int
		if err := p.Eval(`window.innerWidth`, &width); err != nil {
			t.Fatal(err)
		}
		if width != 390 {
			t.Errorf("window.innerWidth = %d, want 390", width)
		}
		if errs := p.ConsoleErrors(); len(errs) != 0 {
			t.Errorf("ConsoleErrors() on a good page = %q", errs)
		}
	})

	t.Run("NoHeaderIs401", func(t *testing.T) {
		p := b.Page(t, 1366, 900, nil)
		if err := p.Navigate(srv.URL + "/"); err != nil {
			t.Fatal(err)
		}
		if got := p.Status(); got != http.StatusUnauthorized {
			t.Fatalf("Status() = %d, want 401", got)
		}
		text, err := p.Text("body")
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(text, "sign in") {
			t.Errorf("body of the 401 page = %q", text)
		}
		if n, err := p.Count("svg"); err != nil || n != 0 {
			t.Errorf("Count(svg) on the 401 page = %d, %v", n, err)
		}
	})

	t.Run("FormLogin", func(t *testing.T) {
		p := b.Page(t, 1366, 900, nil)
		if err := p.Navigate(srv.URL + "/login"); err != nil {
			t.Fatal(err)
		}
		if got := p.Status(); got != http.StatusOK {
			t.Fatalf("login page Status() = %d", got)
		}
		if err := p.SetValue("#user", testUser); err != nil {
			t.Fatal(err)
		}
		if err := p.SetValue("#pass", testPass); err != nil {
			t.Fatal(err)
		}
		if err := p.Click("#go"); err != nil {
			t.Fatal(err)
		}
		if err := p.WaitVisible("#reading", 5*time.Second); err != nil {
			t.Fatal(err)
		}
		if got := p.Status(); got != http.StatusOK {
			t.Errorf("Status() after the login = %d, want 200", got)
		}
		var path string
		if err := p.Eval(`location.pathname`, &path); err != nil {
			t.Fatal(err)
		}
		if path != "/" {
			t.Errorf("after the login the tab is at %q, want /", path)
		}
		// The cookie alone lets the media request through too.
		d, err := p.AudioDuration("#clip", 5*time.Second)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(d-1) > 0.05 {
			t.Errorf("AudioDuration with the cookie = %v", d)
		}
	})

	t.Run("WrongPassword", func(t *testing.T) {
		p := b.Page(t, 390, 844, nil)
		if err := p.Navigate(srv.URL + "/login"); err != nil {
			t.Fatal(err)
		}
		if err := p.SetValue("#user", testUser); err != nil {
			t.Fatal(err)
		}
		if err := p.SetValue("#pass", "guess"); err != nil {
			t.Fatal(err)
		}
		if err := p.Click("#go"); err != nil {
			t.Fatal(err)
		}
		if got := p.Status(); got != http.StatusUnauthorized {
			t.Errorf("Status() after a wrong password = %d, want 401", got)
		}
	})

	t.Run("SVGAudioScreenshot", func(t *testing.T) {
		p := b.Page(t, 390, 844, bearer)
		if err := p.Navigate(srv.URL + "/"); err != nil {
			t.Fatal(err)
		}
		n, err := p.Count("svg#spark")
		if err != nil {
			t.Fatal(err)
		}
		if n != 1 {
			t.Errorf("Count(svg#spark) = %d, want 1", n)
		}
		if n, _ := p.Count("svg#spark polyline"); n != 1 {
			t.Errorf("Count(svg#spark polyline) = %d, want 1", n)
		}
		var box struct{ W, H float64 }
		if err := p.Eval(`(() => { const r = document.querySelector("#spark").getBoundingClientRect(); return {W: r.width, H: r.height}; })()`, &box); err != nil {
			t.Fatal(err)
		}
		if box.W < 100 || box.H < 20 {
			t.Errorf("the SVG is laid out at %vx%v", box.W, box.H)
		}

		d, err := p.AudioDuration("#clip", 5*time.Second)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(d-1) > 0.05 {
			t.Errorf("AudioDuration = %v, want about 1 s", d)
		}

		shot := filepath.Join(t.TempDir(), "phone.png")
		if err := p.Screenshot(shot); err != nil {
			t.Fatal(err)
		}
		colours, dominant, err := NotBlank(shot)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("screenshot: %d colours, the most common covers %.1f %%", colours, 100*dominant)
		if colours <= 1 || dominant >= 0.99 {
			t.Errorf("the screenshot looks blank: %d colours, dominant %.3f", colours, dominant)
		}
		if size := pngSize(t, shot); size.X != 390 || size.Y < 844 {
			t.Errorf("screenshot is %dx%d, want 390 wide and at least 844 high", size.X, size.Y)
		}
		if errs := p.ConsoleErrors(); len(errs) != 0 {
			t.Errorf("ConsoleErrors() = %q", errs)
		}
	})

	t.Run("FullPageScreenshot", func(t *testing.T) {
		p := b.Page(t, 390, 844, bearer)
		if err := p.Navigate(srv.URL + "/tall"); err != nil {
			t.Fatal(err)
		}
		shot := filepath.Join(t.TempDir(), "tall.png")
		if err := p.Screenshot(shot); err != nil {
			t.Fatal(err)
		}
		if size := pngSize(t, shot); size.X != 390 || size.Y != 2400 {
			t.Errorf("screenshot of a 2400 px page is %dx%d, want 390x2400", size.X, size.Y)
		}
		colours, dominant, err := NotBlank(shot)
		if err != nil {
			t.Fatal(err)
		}
		// Two bands of equal height: the lower one is only there when the
		// shot reaches beyond the viewport.
		if colours != 2 || math.Abs(dominant-0.5) > 0.01 {
			t.Errorf("tall page: %d colours, dominant %.3f; want 2 and 0.5", colours, dominant)
		}
	})

	t.Run("ScriptError", func(t *testing.T) {
		p := b.Page(t, 1366, 900, bearer)
		if err := p.Navigate(srv.URL + "/broken"); err != nil {
			t.Fatal(err)
		}
		if got := p.Status(); got != http.StatusOK {
			t.Fatalf("Status() = %d", got)
		}
		errs := p.ConsoleErrors()
		if len(errs) == 0 {
			t.Fatal("ConsoleErrors() is empty for a page with a script error")
		}
		t.Logf("ConsoleErrors():\n%s", strings.Join(errs, "\n"))
		joined := strings.Join(errs, "\n")
		if !strings.Contains(joined, "startTrend") {
			t.Errorf("ConsoleErrors() does not name the missing function: %q", errs)
		}
		if !strings.Contains(joined, "sensor offline") {
			t.Errorf("ConsoleErrors() misses the console.error call: %q", errs)
		}
	})

	t.Run("EvalErrors", func(t *testing.T) {
		p := b.Page(t, 390, 844, bearer)
		if err := p.Navigate(srv.URL + "/"); err != nil {
			t.Fatal(err)
		}
		var n int
		if err := p.Eval(`new Promise(r => setTimeout(() => r(41 + 1), 20))`, &n); err != nil || n != 42 {
			t.Errorf("Eval of a promise = %d, %v", n, err)
		}
		if err := p.Eval(`(() => { throw new Error("boom") })()`, nil); err == nil {
			t.Error("Eval of a throwing script returned no error")
		}
		if _, err := p.Text("#missing"); err == nil {
			t.Error("Text of a missing element returned no error")
		}
		if _, err := p.AudioDuration("#missing", time.Second); err == nil {
			t.Error("AudioDuration of a missing element returned no error")
		}
		if err := p.WaitVisible("#missing", 200*time.Millisecond); err == nil {
			t.Error("WaitVisible of a missing element returned no error")
		}
		// A click that opens nothing returns after the grace time.
		if err := p.Click("h1"); err != nil {
			t.Error(err)
		}
		if got := p.Status(); got != http.StatusOK {
			t.Errorf("Status() after a click on a heading = %d", got)
		}
	})

	t.Run("BrokenAudio", func(t *testing.T) {
		p := b.Page(t, 390, 844, bearer)
		if err := p.Navigate(srv.URL + "/noaudio"); err != nil {
			t.Fatal(err)
		}
		start := time.Now()
		_, err := p.AudioDuration("audio", 5*time.Second)
		if err == nil {
			t.Fatal("AudioDuration of a 404 source returned no error")
		}
		if time.Since(start) > 3*time.Second {
			t.Errorf("the media error took %v to report", time.Since(start))
		}
		t.Logf("expected error: %v", err)
	})
}

// fakeTB records Skip and Fatal instead of stopping the goroutine, so that
// the test can see which one Start chose.
type fakeTB struct {
	testing.TB
	skipped, failed bool
}

func (f *fakeTB) Helper()               {}
func (f *fakeTB) Skipf(string, ...any)  { f.skipped = true }
func (f *fakeTB) Fatalf(string, ...any) { f.failed = true }

func TestMissingBrowser(t *testing.T) {
	saved := execNames
	execNames = []string{"auscult-no-such-browser"}
	t.Cleanup(func() { execNames = saved })

	for _, tc := range []struct {
		ci         string
		skip, fail bool
	}{
		{ci: "", skip: true},
		{ci: "false", skip: true},
		{ci: "true", fail: true},
	} {
		t.Setenv("CI", tc.ci)
		f := &fakeTB{TB: t}
		if b := Start(f); b != nil {
			t.Fatalf("CI=%q: Start returned a browser", tc.ci)
		}
		if f.skipped != tc.skip || f.failed != tc.fail {
			t.Errorf("CI=%q: skipped=%v failed=%v, want skipped=%v failed=%v",
				tc.ci, f.skipped, f.failed, tc.skip, tc.fail)
		}
	}
}

func TestNotBlank(t *testing.T) {
	dir := t.TempDir()
	write := func(name string, img image.Image) string {
		path := filepath.Join(dir, name)
		var buf bytes.Buffer
		if err := png.Encode(&buf, img); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return path
	}
	blank := image.NewRGBA(image.Rect(0, 0, 40, 30))
	for i := range blank.Pix {
		blank.Pix[i] = 0xff
	}
	c, d, err := NotBlank(write("blank.png", blank))
	if err != nil || c != 1 || d != 1 {
		t.Errorf("blank: %d colours, dominant %v, %v; want 1, 1", c, d, err)
	}

	marked := image.NewRGBA(image.Rect(0, 0, 40, 30))
	copy(marked.Pix, blank.Pix)
	for x := range 10 {
		marked.Set(x, 0, color.RGBA{R: 200, A: 255})
	}
	c, d, err = NotBlank(write("marked.png", marked))
	if err != nil || c != 2 || math.Abs(d-1190.0/1200) > 1e-9 {
		t.Errorf("marked: %d colours, dominant %v, %v; want 2, %v", c, d, err, 1190.0/1200)
	}

	if _, _, err := NotBlank(filepath.Join(dir, "missing.png")); err == nil {
		t.Error("NotBlank of a missing file returned no error")
	}
}

func pngSize(t *testing.T, path string) image.Point {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cfg, err := png.DecodeConfig(f)
	if err != nil {
		t.Fatal(err)
	}
	return image.Pt(cfg.Width, cfg.Height)
}

// testSite is a small stand-in for the agent's site: pages behind a bearer
// token or a session cookie, a login form, a WAV clip and a broken page.
func testSite(t *testing.T) http.Handler {
	wav := toneWAV(440, 16000, time.Second)
	mux := http.NewServeMux()

	authed := func(h http.HandlerFunc) http.HandlerFunc {
		return func(w http.ResponseWriter, r *http.Request) {
			c, err := r.Cookie(testCookie)
			if r.Header.Get("Authorization") != "Bearer "+testToken && (err != nil || c.Value != testSession) {
				w.Header().Set("Content-Type", "text/html; charset=utf-8")
				w.WriteHeader(http.StatusUnauthorized)
				fmt.Fprint(w, `<!doctype html><title>401</title><p>Please sign in.</p>`)
				return
			}
			h(w, r)
		}
	}
	html := func(w http.ResponseWriter, body string) {
		w.Header().Set("Content-Type", "text/html; charset=utf-8")
		fmt.Fprint(w, body)
	}

	mux.HandleFunc("GET /{$}", authed(func(w http.ResponseWriter, r *http.Request) {
		html(w, homePage)
	}))
	mux.HandleFunc("GET /clip.wav", authed(func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Content-Type", "audio/wav")
		http.ServeContent(w, r, "clip.wav", time.Time{}, bytes.NewReader(wav))
	}))
	mux.HandleFunc("GET /broken", authed(func(w http.ResponseWriter, r *http.Request) {
		html(w, brokenPage)
	}))
	mux.HandleFunc("GET /noaudio", authed(func(w http.ResponseWriter, r *http.Request) {
		html(w, `<!doctype html><title>no clip</title><audio src="/missing.wav" preload="metadata"></audio>`)
	}))
	mux.HandleFunc("GET /tall", authed(func(w http.ResponseWriter, r *http.Request) {
		html(w, `<!doctype html><style>body{margin:0} div{height:1200px}</style>`+
			`<div style="background:#1d5c7a"></div><div style="background:#d98e04"></div>`)
	}))
	mux.HandleFunc("GET /login", func(w http.ResponseWriter, r *http.Request) {
		html(w, loginPage)
	})
	mux.HandleFunc("POST /login", func(w http.ResponseWriter, r *http.Request) {
		if r.PostFormValue("user") != testUser || r.PostFormValue("pass") != testPass {
			w.Header().Set("Content-Type", "text/html; charset=utf-8")
			w.WriteHeader(http.StatusUnauthorized)
			fmt.Fprint(w, `<!doctype html><title>401</title><p>Wrong user or password.</p>`)
			return
		}
		http.SetCookie(w, &http.Cookie{Name: testCookie, Value: testSession, Path: "/", HttpOnly: true, SameSite: http.SameSiteLaxMode})
		http.Redirect(w, r, "/", http.StatusSeeOther)
	})
	mux.HandleFunc("GET /favicon.ico", func(w http.ResponseWriter, r *http.Request) {
		w.WriteHeader(http.StatusNoContent)
	})
	return mux
}

// toneWAV is a 16-bit mono PCM WAV file of a sine tone at half scale.
func toneWAV(freq float64, rate int, d time.Duration) []byte {
	n := int(int64(rate) * int64(d) / int64(time.Second))
	samples := make([]int16, n)
	for i := range samples {
		samples[i] = int16(math.Round(0.5 * math.MaxInt16 * math.Sin(2*math.Pi*freq*float64(i)/float64(rate))))
	}
	dataLen := uint32(2 * n)
	var buf bytes.Buffer
	le := binary.LittleEndian
	buf.WriteString("RIFF")
	binary.Write(&buf, le, 36+dataLen)
	buf.WriteString("WAVE")
	buf.WriteString("fmt ")
	binary.Write(&buf, le, struct {
		Size          uint32
		Format        uint16
		Channels      uint16
		Rate          uint32
		ByteRate      uint32
		BlockAlign    uint16
		BitsPerSample uint16
	}{16, 1, 1, uint32(rate), uint32(rate * 2), 2, 16})
	buf.WriteString("data")
	binary.Write(&buf, le, dataLen)
	binary.Write(&buf, le, samples)
	return buf.Bytes()
}

const homePage = `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Pump house 3</title>
<style>
  body { margin: 0; font: 16px sans-serif; background: #f4f1ea; color: #1d2b36; }
  header { background: #1d5c7a; color: #fff; padding: 12px 16px; }
  main { padding: 16px; }
  .card { background: #fff; border-left: 6px solid #d98e04; padding: 12px; margin-bottom: 12px; }
  svg { width: 100%; height: 80px; display: block; }
</style>
</head>
<body>
<header><h1>Pump house 3</h1></header>
<main>
  <div class="card" id="reading">Bearing noise score: <b>0.42</b> (normal)</div>
  <svg id="spark" viewBox="0 0 200 40" preserveAspectRatio="none" role="img" aria-label="score trend">
    <rect width="200" height="40" fill="#e8eef2"/>
    <polyline fill="none" stroke="#c0392b" stroke-width="2"
      points="0,30 20,28 40,31 60,22 80,25 100,12 120,18 140,9 160,14 180,6 200,10"/>
  </svg>
  <p>Last clip:</p>
  <audio id="clip" controls preload="metadata" src="/clip.wav"></audio>
</main>
</body>
</html>`

const brokenPage = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Broken</title></head>
<body>
<p id="x">This page has a bug.</p>
<script>console.error("sensor offline:", 3);</script>
<script>startTrend(document.getElementById("x"));</script>
</body></html>`

const loginPage = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Sign in</title></head>
<body>
<form method="post" action="/login">
  <label>User <input id="user" name="user" autocomplete="username"></label>
  <label>Password <input id="pass" name="pass" type="password" autocomplete="current-password"></label>
  <button id="go" type="submit">Sign in</button>
</form>
</body></html>`
