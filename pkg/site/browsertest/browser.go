package browsertest

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"image/color"
	"image/png"
	"math"
	"os"
	"os/exec"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	cdpbrowser "github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/cdp"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"
)

// execNames are the program names that Start looks for in PATH, in order.
// Debian's package installs /usr/bin/chromium.
var execNames = []string{"chromium", "chromium-browser"}

const (
	// startTimeout bounds the start of the browser and the opening of a tab.
	startTimeout = 30 * time.Second
	// actionTimeout bounds one element action, Eval, Text, Count and
	// Screenshot.
	actionTimeout = 10 * time.Second
	// navTimeout bounds Navigate and the navigation that a Click starts.
	navTimeout = 20 * time.Second
	// clickGrace is how long Click watches for a navigation that the click
	// started before it returns without waiting for a load.
	clickGrace = 300 * time.Millisecond
	// maxShotHeight caps the height of a full-page screenshot in CSS pixels.
	maxShotHeight = 16384
	// outputTail is how much of the browser's own output is kept for the log
	// of a failed test.
	outputTail = 32 << 10
)

// Browser is one headless Chromium process, started by Start for one test.
// Its tabs are opened with Page.
type Browser struct {
	ctx     context.Context // chromedp context that owns the browser process
	path    string
	version string
	out     *tailBuffer
}

// Start launches headless Chromium for one test; t.Cleanup closes it and
// removes its profile directory.
//
// When no chromium program is in PATH, Start skips the test, or fails it when
// the environment variable CI is true. A browser that is installed but does
// not start always fails the test.
func Start(t testing.TB) *Browser {
	t.Helper()
	path, err := findChromium()
	if err != nil {
		const hint = "install it with: apt-get install -y --no-install-recommends chromium"
		if inCI() {
			t.Fatalf("browsertest: %v; CI=true needs a real browser; %s", err, hint)
		} else {
			t.Skipf("browsertest: %v; %s", err, hint)
		}
		return nil // only reached with a testing.TB whose Fatal and Skip return
	}

	out := &tailBuffer{max: outputTail}
	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(path),
		chromedp.Flag("headless", "new"),
		chromedp.NoSandbox, // tests run as root
		chromedp.DisableGPU,
		chromedp.Flag("disable-quic", true),
		chromedp.NoFirstRun,
		// No traffic of the browser's own: the network is closed, and
		// every attempt would be a refused connection.
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-domain-reliability", true),
		// Resolve no host name but localhost: the test servers listen on
		// 127.0.0.1, and the browser's own look-ups of its vendor's hosts
		// would only go to the resolver of a closed network.
		chromedp.Flag("host-resolver-rules", "MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1, EXCLUDE [::1]"),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1366, 900),
		chromedp.CombinedOutput(out),
	)
	allocCtx, allocCancel := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancel := chromedp.NewContext(allocCtx,
		chromedp.WithErrorf(out.printf),
		chromedp.WithLogf(out.printf),
	)

	// The first Do starts the process and binds it to ctx, so it must not
	// get a context with a deadline; wait for it here instead.
	if err := within(startTimeout, func() error { return chromedp.Do(ctx) }); err != nil {
		cancel()
		allocCancel()
		t.Fatalf("browsertest: starting %s: %v\nbrowser output:\n%s", path, err, out.String())
		return nil
	}
	b := &Browser{ctx: ctx, path: path, out: out}
	vctx, vcancel := context.WithTimeout(ctx, actionTimeout)
	if v, err := chromedp.CallBrowser(vctx, cdpbrowser.GetVersion, cdp.Empty{}); err == nil {
		b.version = v.Product
	}
	vcancel()

	t.Cleanup(func() {
		cctx, ccancel := context.WithTimeout(ctx, 10*time.Second)
		err := chromedp.Cancel(cctx) // Browser.close, then wait for the exit
		ccancel()
		cancel()
		allocCancel() // waits until the process is gone
		if err != nil && !errors.Is(err, context.Canceled) {
			t.Logf("browsertest: closing the browser: %v", err)
		}
		if t.Failed() {
			t.Logf("browsertest: last output of %s:\n%s", path, out.String())
		}
	})
	return b
}

// Version is the product string that the browser reports, such as
// "Chrome/156.0.8078.114".
func (b *Browser) Version() string { return b.version }

// Path is the browser program that Start launched.
func (b *Browser) Path() string { return b.path }

// Page opens a new tab; t.Cleanup closes it. Each tab has its own browser
// context, like a private window: cookies set in one tab (a login) are not
// seen by another. The headers are sent with every
// request of the tab (documents, scripts, images, media), for example
// "Authorization": "Bearer ...". The viewport is width x height CSS pixels at
// a device scale factor of 1, e.g. 390x844 for a phone or 1366x900 for a
// laptop.
func (b *Browser) Page(t testing.TB, width, height int, headers map[string]string) *Page {
	t.Helper()
	if width <= 0 || height <= 0 {
		t.Fatalf("browsertest: bad viewport %dx%d", width, height)
		return nil
	}
	p := &Page{width: width, height: height}
	ctx, cancel := chromedp.NewContext(b.ctx,
		chromedp.WithNewBrowserContext(), // own cookies and cache, like a private window
		chromedp.WithListener(p.onEvent),
	)
	p.ctx = ctx

	h := network.Headers{}
	for k, v := range headers {
		h[k] = v
	}
	setup := func() error {
		return chromedp.Do(ctx,
			chromedp.EmulateViewport(int64(width), int64(height)),
			chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
				_, err := cdp.Call(ctx, tg, network.SetExtraHTTPHeaders,
					network.SetExtraHTTPHeadersParams{Headers: h})
				return err
			}),
		)
	}
	// As in Start: the first Do attaches the tab to ctx, so no deadline.
	if err := within(startTimeout, setup); err != nil {
		cancel()
		t.Fatalf("browsertest: opening a tab: %v", err)
		return nil
	}
	p.mu.Lock()
	p.mainFrame = cdp.FrameID(chromedp.FromContext(ctx).Target.TargetID)
	p.mu.Unlock()

	t.Cleanup(func() {
		_ = chromedp.Cancel(ctx) // closes the tab
		cancel()
	})
	return p
}

// Page is one browser tab. Its methods are not safe for concurrent use.
type Page struct {
	ctx           context.Context
	width, height int

	mu        sync.Mutex
	mainFrame cdp.FrameID       // the tab's main frame has the target's ID
	docReq    network.RequestID // the last main-document request
	status    int               // status of the last main-document response
	navSeq    int               // main-frame navigations seen so far
	loading   bool              // a main-frame navigation has not loaded yet
	errs      []string          // console errors, exceptions, error log entries
}

// onEvent runs in the tab's event loop, in the order in which the browser sent
// the events and before the reply of any later command, so that the state it
// keeps is current when an action returns. It must be quick.
func (p *Page) onEvent(ev any) {
	p.mu.Lock()
	defer p.mu.Unlock()
	main := func(id cdp.FrameID) bool { return p.mainFrame != "" && id == p.mainFrame }
	switch ev := ev.(type) {
	case *page.EventFrameRequestedNavigation:
		if main(ev.FrameID) {
			p.navSeq++
			p.loading = true
		}
	case *network.EventRequestWillBeSent:
		if ev.Type == network.ResourceTypeDocument && main(ev.FrameID) {
			if ev.RedirectResponse == nil {
				p.navSeq++
			}
			p.loading = true
			p.docReq = ev.RequestID
			p.status = 0
		}
	case *network.EventResponseReceived:
		if ev.Type == network.ResourceTypeDocument && main(ev.FrameID) && ev.Response != nil {
			p.status = int(ev.Response.Status)
		}
	case *network.EventLoadingFailed:
		if ev.RequestID == p.docReq && ev.Canceled {
			p.loading = false
		}
	case *page.EventLoadEventFired: // only sent for the main frame
		p.loading = false
	case *page.EventFrameStoppedLoading:
		if main(ev.FrameID) {
			p.loading = false
		}
	case *runtime.EventConsoleAPICalled:
		if ev.Type == runtime.ConsoleAPICalledTypeError || ev.Type == runtime.ConsoleAPICalledTypeAssert {
			p.errs = append(p.errs, "console."+string(ev.Type)+": "+argsText(ev.Args))
		}
	case *runtime.EventExceptionThrown:
		p.errs = append(p.errs, "uncaught: "+exceptionText(ev.ExceptionDetails))
	case *cdplog.EventEntryAdded:
		if e := ev.Entry; e != nil && e.Level == cdplog.EntryLevelError {
			msg := string(e.Source) + ": " + e.Text
			if e.URL != "" && !strings.Contains(e.Text, e.URL) {
				msg += " (" + e.URL + ")"
			}
			p.errs = append(p.errs, msg)
		}
	}
}

// Navigate loads url in the tab and waits for its load event. An HTTP error
// status is not an error here; see Status.
func (p *Page) Navigate(url string) error {
	resp, err := run(p, navTimeout, chromedp.NavigateResponse(url))
	if err != nil {
		return fmt.Errorf("browsertest: navigate to %s: %w", url, err)
	}
	if resp != nil {
		p.mu.Lock()
		p.status = int(resp.Status)
		p.mu.Unlock()
	}
	return nil
}

// Status is the HTTP status of the last main-document response of the tab,
// after redirects; 0 before the first one or when the last navigation got no
// response.
func (p *Page) Status() int {
	p.mu.Lock()
	defer p.mu.Unlock()
	return p.status
}

// WaitVisible waits until an element that matches the CSS selector is
// visible.
func (p *Page) WaitVisible(selector string, timeout time.Duration) error {
	if _, err := run(p, timeout, chromedp.WaitVisible(chromedp.CSS(selector))); err != nil {
		return fmt.Errorf("browsertest: wait for %q to be visible: %w", selector, err)
	}
	return nil
}

// Text is the innerText of the first element that matches the CSS selector.
// It does not wait: no match is an error.
func (p *Page) Text(selector string) (string, error) {
	var s string
	err := p.eval(actionTimeout, `(() => {
		const el = document.querySelector(`+jsString(selector)+`);
		if (!el) throw new Error("no element matches " + `+jsString(selector)+`);
		return el.innerText;
	})()`, &s)
	if err != nil {
		return "", fmt.Errorf("browsertest: text of %q: %w", selector, err)
	}
	return s, nil
}

// Count is document.querySelectorAll(selector).length.
func (p *Page) Count(selector string) (int, error) {
	var n int
	if err := p.eval(actionTimeout, `document.querySelectorAll(`+jsString(selector)+`).length`, &n); err != nil {
		return 0, fmt.Errorf("browsertest: count %q: %w", selector, err)
	}
	return n, nil
}

// Eval evaluates the JavaScript expression in the page (Runtime.evaluate),
// waits for it when it is a promise, and decodes its JSON value into out,
// which may be nil to drop the value. A thrown exception is an error.
func (p *Page) Eval(js string, out any) error {
	if err := p.eval(actionTimeout, js, out); err != nil {
		return fmt.Errorf("browsertest: eval: %w", err)
	}
	return nil
}

func (p *Page) eval(timeout time.Duration, js string, out any) error {
	raw, err := run(p, timeout, chromedp.Evaluate[[]byte](js, chromedp.EvalAwaitPromise))
	if err != nil {
		return err
	}
	if out == nil {
		return nil
	}
	if len(raw) == 0 { // undefined
		raw = []byte("null")
	}
	if err := json.Unmarshal(raw, out); err != nil {
		return fmt.Errorf("decode the result of the script: %w", err)
	}
	return nil
}

// Click clicks the first element that matches the CSS selector, with real
// mouse events at its centre. When the click starts a navigation of the tab
// (a link, a form submission) within a short grace time, Click waits until the
// new page has loaded; Status then holds its HTTP status.
func (p *Page) Click(selector string) error {
	p.mu.Lock()
	before := p.navSeq
	p.mu.Unlock()
	if _, err := run(p, actionTimeout, chromedp.Click(chromedp.CSS(selector))); err != nil {
		return fmt.Errorf("browsertest: click %q: %w", selector, err)
	}
	grace := time.Now().Add(clickGrace)
	deadline := time.Now().Add(navTimeout)
	for {
		p.mu.Lock()
		started, loading := p.navSeq != before, p.loading
		p.mu.Unlock()
		switch {
		case started && !loading:
			return nil
		case !started && time.Now().After(grace):
			return nil
		case time.Now().After(deadline):
			return fmt.Errorf("browsertest: click %q: the page it opened did not load in %v", selector, navTimeout)
		}
		select {
		case <-p.ctx.Done():
			return fmt.Errorf("browsertest: click %q: %w", selector, p.ctx.Err())
		case <-time.After(10 * time.Millisecond):
		}
	}
}

// SetValue sets the value of the first form field that matches the CSS
// selector.
func (p *Page) SetValue(selector, value string) error {
	if _, err := run(p, actionTimeout, chromedp.SetValue(chromedp.CSS(selector), value)); err != nil {
		return fmt.Errorf("browsertest: set the value of %q: %w", selector, err)
	}
	return nil
}

// Screenshot writes a PNG of the whole page, beyond the viewport, to path.
func (p *Page) Screenshot(path string) error {
	shot := func(ctx context.Context, tg *chromedp.Target) ([]byte, error) {
		w, h := float64(p.width), float64(p.height)
		m, err := cdp.Call(ctx, tg, page.GetLayoutMetrics, cdp.Empty{})
		if err != nil {
			return nil, err
		}
		if s := m.CSSContentSize; s != nil {
			w, h = max(w, math.Ceil(s.Width)), max(h, math.Ceil(s.Height))
		}
		h = min(h, maxShotHeight)
		res, err := cdp.Call(ctx, tg, page.CaptureScreenshot, page.CaptureScreenshotParams{
			Format:                page.CaptureScreenshotFormatPng,
			Clip:                  &page.Viewport{Width: w, Height: h, Scale: 1},
			CaptureBeyondViewport: new(true),
			FromSurface:           new(true),
		})
		return res.Data, err
	}
	buf, err := run(p, actionTimeout, shot)
	if err != nil {
		return fmt.Errorf("browsertest: screenshot: %w", err)
	}
	if err := os.WriteFile(path, buf, 0o644); err != nil {
		return fmt.Errorf("browsertest: screenshot: %w", err)
	}
	return nil
}

// ConsoleErrors are the console errors (console.error, failed console.assert),
// the uncaught exceptions and unhandled rejections, and the error entries of
// the browser log (such as a resource that failed to load) that the tab has
// seen so far, oldest first.
func (p *Page) ConsoleErrors() []string {
	p.mu.Lock()
	defer p.mu.Unlock()
	return slices.Clone(p.errs)
}

// AudioDuration waits until the <audio> (or <video>) element that matches the
// CSS selector has loaded the metadata of its source (the 'loadedmetadata'
// event, readyState >= 1) and returns its duration in seconds. A media error,
// such as a 401 or an undecodable file, is returned as an error at once.
func (p *Page) AudioDuration(selector string, timeout time.Duration) (float64, error) {
	ms := strconv.FormatInt(timeout.Milliseconds(), 10)
	js := `new Promise((resolve, reject) => {
		const el = document.querySelector(` + jsString(selector) + `);
		if (!(el instanceof HTMLMediaElement)) {
			reject(new Error("no audio or video element matches " + ` + jsString(selector) + `));
			return;
		}
		const failed = () => reject(new Error("media error " + (el.error ? el.error.code + " " + el.error.message : "") +
			" for " + el.currentSrc));
		const done = () => resolve(Number.isFinite(el.duration) ? el.duration : -1);
		if (el.error) { failed(); return; }
		if (el.readyState >= 1) { done(); return; }
		const timer = setTimeout(() => reject(new Error("no metadata after ` + ms + ` ms, readyState " +
			el.readyState + ", networkState " + el.networkState)), ` + ms + `);
		el.addEventListener("loadedmetadata", () => { clearTimeout(timer); done(); }, {once: true});
		el.addEventListener("error", () => { clearTimeout(timer); failed(); }, {once: true});
		if (el.preload === "none" || el.networkState === HTMLMediaElement.NETWORK_EMPTY) {
			el.preload = "metadata";
			el.load();
		}
	})`
	var d float64
	if err := p.eval(timeout+actionTimeout, js, &d); err != nil {
		return 0, fmt.Errorf("browsertest: audio duration of %q: %w", selector, err)
	}
	if d < 0 {
		return 0, fmt.Errorf("browsertest: audio duration of %q: not finite", selector)
	}
	return d, nil
}

// NotBlank decodes a PNG and reports how many distinct colours it holds and
// the share (0..1) of the most common one; a blank page is 1 colour / 1.0.
func NotBlank(pngPath string) (colours int, dominant float64, err error) {
	f, err := os.Open(pngPath)
	if err != nil {
		return 0, 0, err
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		return 0, 0, fmt.Errorf("browsertest: decode %s: %w", pngPath, err)
	}
	r := img.Bounds()
	total := r.Dx() * r.Dy()
	if total == 0 {
		return 0, 0, fmt.Errorf("browsertest: %s has no pixels", pngPath)
	}
	counts := make(map[color.NRGBA]int)
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			counts[color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA)]++
		}
	}
	most := 0
	for _, n := range counts {
		most = max(most, n)
	}
	return len(counts), float64(most) / float64(total), nil
}

// run runs one action in the tab with a deadline. The tab is attached already,
// so the deadline ends only this action, not the tab.
func run[T any](p *Page, timeout time.Duration, a chromedp.Action[T]) (T, error) {
	ctx, cancel := context.WithTimeout(p.ctx, timeout)
	defer cancel()
	return chromedp.Run(ctx, a)
}

// within runs f and gives up after d; f keeps running until its context is
// cancelled by the caller.
func within(d time.Duration, f func() error) error {
	done := make(chan error, 1)
	go func() { done <- f() }()
	select {
	case err := <-done:
		return err
	case <-time.After(d):
		return fmt.Errorf("no answer from the browser in %v", d)
	}
}

func findChromium() (string, error) {
	for _, name := range execNames {
		if path, err := exec.LookPath(name); err == nil {
			return path, nil
		}
	}
	return "", fmt.Errorf("no Chromium in PATH (looked for %s)", strings.Join(execNames, ", "))
}

func inCI() bool {
	v, err := strconv.ParseBool(os.Getenv("CI"))
	return err == nil && v
}

// jsString quotes s as a JavaScript string literal.
func jsString(s string) string {
	b, _ := json.Marshal(s) // a string always marshals
	return string(b)
}

func argsText(args []*runtime.RemoteObject) string {
	parts := make([]string, 0, len(args))
	for _, a := range args {
		parts = append(parts, remoteText(a))
	}
	return strings.Join(parts, " ")
}

func remoteText(o *runtime.RemoteObject) string {
	switch {
	case o == nil:
		return ""
	case len(o.Value) > 0:
		var s string
		if json.Unmarshal(o.Value, &s) == nil {
			return s
		}
		return string(o.Value)
	case o.Description != "":
		return o.Description
	}
	return string(o.Type)
}

func exceptionText(d *runtime.ExceptionDetails) string {
	if d == nil {
		return "exception"
	}
	msg := d.Text
	if d.Exception != nil && d.Exception.Description != "" {
		// The description is "TypeError: ..." followed by the stack.
		msg, _, _ = strings.Cut(d.Exception.Description, "\n")
	} else if d.Exception != nil {
		msg = d.Text + " " + remoteText(d.Exception)
	}
	if d.URL != "" {
		msg += fmt.Sprintf(" (%s:%d:%d)", d.URL, d.LineNumber+1, d.ColumnNumber+1)
	}
	return msg
}

// tailBuffer keeps the last max bytes written to it.
type tailBuffer struct {
	mu  sync.Mutex
	max int
	buf []byte
}

func (b *tailBuffer) Write(p []byte) (int, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	b.buf = append(b.buf, p...)
	if over := len(b.buf) - b.max; over > 0 {
		b.buf = append(b.buf[:0], b.buf[over:]...)
	}
	return len(p), nil
}

func (b *tailBuffer) printf(format string, args ...any) {
	fmt.Fprintf(b, format+"\n", args...)
}

func (b *tailBuffer) String() string {
	b.mu.Lock()
	defer b.mu.Unlock()
	return string(b.buf)
}
