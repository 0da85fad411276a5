// Package browsertest drives a real headless Chromium from Go tests, so that
// the tests of the site package can load its pages the way a technician's
// phone or laptop does: with real HTML parsing, CSS layout, JavaScript, media
// decoding and screenshots, not with a mock.
//
// It uses the chromedp module to speak the Chrome DevTools Protocol over a
// pipe to Debian's chromium package (/usr/bin/chromium). No port is opened
// and nothing is fetched from outside: the browser is started with the
// background networking, component updates, sync and QUIC turned off, with a
// fresh profile directory from t.TempDir for every test. The browser resolves
// no host name but localhost, so serve the pages under test from
// net/http/httptest (127.0.0.1) and refer to them by that address.
//
// A test starts one browser and opens as many tabs as it needs:
//
//	b := browsertest.Start(t)                     // skips if chromium is missing
//	p := b.Page(t, 390, 844, map[string]string{   // a phone-sized tab
//		"Authorization": "Bearer " + token,
//	})
//	if err := p.Navigate(srv.URL + "/"); err != nil {
//		t.Fatal(err)
//	}
//	if p.Status() != http.StatusOK { ... }
//	n, _ := p.Count("svg")
//	d, _ := p.AudioDuration("audio", 5*time.Second)
//
// When chromium is not installed, Start skips the test, except when the
// environment variable CI is true (CI=true), where a missing browser fails
// the test: CI must never pass by skipping the browser checks. Install the
// browser with
//
//	DEBIAN_FRONTEND=noninteractive apt-get install -y --no-install-recommends chromium
//
// Everything the page writes to the console as an error, every uncaught
// exception and every error entry of the browser log (such as a failed
// resource load) is kept; see Page.ConsoleErrors.
package browsertest
