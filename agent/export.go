package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"net/http"
	"net/url"
	"os"
	"path/filepath"
	"strings"
	"time"

	"github.com/auscult/auscult/pkg/site"
	"github.com/auscult/auscult/pkg/store"
)

// logSource says where export, backup and report read the log: a running
// agent's site-visit address, or a database file.
type logSource struct {
	url, db             string
	tokenFile, tokenEnv string
}

func (l *logSource) flags(fs *flag.FlagSet) {
	fs.StringVar(&l.url, "url", "", "a running agent's site-visit address, e.g. http://10.20.0.7:8440")
	fs.StringVar(&l.db, "db", "", "a log file of a stopped agent, or a backup copy (opened read-only)")
	fs.StringVar(&l.tokenFile, "token-file", "", "with --url: file whose first line is the web token")
	fs.StringVar(&l.tokenEnv, "token-env", "AUSCULT_WEB_TOKEN", "with --url: environment variable holding the web token")
}

func (l *logSource) check() error {
	if (l.url == "") == (l.db == "") {
		return usagef("give --url (a running agent) or --db (a log file), one of them")
	}
	return nil
}

// openDB opens a log file read-only; a log held by a running agent gets a
// message saying to use its address.
func (l *logSource) openDB() (*store.Store, error) {
	st, err := store.Open(l.db, store.Options{ReadOnly: true, Timeout: 2 * time.Second})
	if errors.Is(err, store.ErrLocked) {
		return nil, fmt.Errorf("%s is in use by a running agent (its lock did not come free in 2 s); "+
			"read it through the agent instead: --url http://HOST:PORT --token-file FILE, or take a copy with `auscult backup --url`", l.db)
	}
	return st, err
}

// get fetches path from the running agent with the token.
func (l *logSource) get(path string, q url.Values) (*http.Response, error) {
	token, err := readSecret(l.tokenFile, l.tokenEnv, "token")
	if err != nil {
		return nil, err
	}
	if token == "" {
		return nil, fmt.Errorf("no web token: give --token-file FILE or set %s", l.tokenEnv)
	}
	u, err := url.Parse(strings.TrimRight(l.url, "/") + path)
	if err != nil || u.Host == "" {
		return nil, usagef("--url %q: want http://HOST:PORT", l.url)
	}
	u.RawQuery = q.Encode()
	req, _ := http.NewRequest(http.MethodGet, u.String(), nil)
	req.Header.Set("Authorization", "Bearer "+token)
	resp, err := (&http.Client{Timeout: 30 * time.Minute}).Do(req)
	if err != nil {
		return nil, err
	}
	if resp.StatusCode != http.StatusOK {
		defer resp.Body.Close()
		body, _ := io.ReadAll(io.LimitReader(resp.Body, 2048))
		msg := strings.TrimSpace(string(body))
		if resp.StatusCode == http.StatusUnauthorized {
			msg = "the agent refused the token"
		}
		return nil, fmt.Errorf("%s: %s: %s", u.Redacted(), resp.Status, msg)
	}
	return resp, nil
}

// writeOut writes to the file out (through a temporary file renamed into
// place, so a failed run leaves no half file) or to stdout when out is
// empty or "-".
func writeOut(out string, stdout io.Writer, fn func(io.Writer) error) error {
	if out == "" || out == "-" {
		return fn(stdout)
	}
	tmp, err := os.CreateTemp(filepath.Dir(out), "."+filepath.Base(out)+".part-*")
	if err != nil {
		return err
	}
	defer os.Remove(tmp.Name())
	if err := fn(tmp); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), out)
}

func runExport(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("export", stderr)
	var src logSource
	src.flags(fs)
	what := fs.String("what", "events", "events, trend or summaries")
	format := fs.String("format", "csv", "csv or json")
	from := fs.String("from", "30d", "start: a date (2026-11-01), an RFC 3339 time or a look-back (30d, 24h)")
	to := fs.String("to", "", "end (default now)")
	out := fs.String("out", "", "output file (default stdout)")
	if rest, err := parse(fs, args); err != nil {
		return err
	} else if len(rest) > 0 {
		return usagef("unexpected argument %q", rest[0])
	}
	if err := src.check(); err != nil {
		return err
	}
	if src.url != "" {
		resp, err := src.get("/export", url.Values{"what": {*what}, "format": {*format}, "from": {*from}, "to": {*to}})
		if err != nil {
			return err
		}
		defer resp.Body.Close()
		return writeOut(*out, stdout, func(w io.Writer) error { _, err := io.Copy(w, resp.Body); return err })
	}
	now := time.Now().UTC()
	f, t, err := site.ParseRange(*from, *to, now.Add(-30*24*time.Hour), now.Add(time.Minute))
	if err != nil {
		return usagef("%v", err)
	}
	st, err := src.openDB()
	if err != nil {
		return err
	}
	defer st.Close()
	asset := logAsset(st)
	return writeOut(*out, stdout, func(w io.Writer) error { return site.Export(w, st, asset, *what, *format, f, t) })
}

// logAsset is the asset a log describes, from its newest baseline record.
func logAsset(st *store.Store) string {
	if b, err := st.Baseline(0); err == nil {
		return b.Asset
	}
	return ""
}

func runBackup(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("backup", stderr)
	var src logSource
	src.flags(fs)
	out := fs.String("out", "", "the copy to write (required)")
	if rest, err := parse(fs, args); err != nil {
		return err
	} else if len(rest) > 0 {
		return usagef("unexpected argument %q", rest[0])
	}
	if err := src.check(); err != nil {
		return err
	}
	if *out == "" || *out == "-" {
		return usagef("--out FILE is required (a database copy does not go to a terminal)")
	}
	var n int64
	if src.url != "" {
		resp, err := src.get("/backup", nil)
		if err != nil {
			return err
		}
		defer resp.Body.Close()
		err = writeOut(*out, stdout, func(w io.Writer) (err error) { n, err = io.Copy(w, resp.Body); return err })
		if err != nil {
			return err
		}
	} else {
		st, err := src.openDB()
		if err != nil {
			return err
		}
		defer st.Close()
		if err := writeOut(*out, stdout, func(w io.Writer) (err error) { n, err = st.Backup(w); return err }); err != nil {
			return err
		}
	}
	// The copy must open as a log: check it before saying it is good.
	st, err := store.Open(*out, store.Options{ReadOnly: true, Timeout: time.Second})
	if err != nil {
		return fmt.Errorf("the copy %s does not open as a log: %w", *out, err)
	}
	stats, _ := st.Stats()
	st.Close()
	fmt.Fprintf(stdout, "backup %s: %d bytes, %d events, %d trend minutes, %d summaries, %d clips\n",
		*out, n, stats.Events, stats.Trend, stats.Summaries, stats.Clips)
	return nil
}

func runReport(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("report", stderr)
	var src logSource
	src.flags(fs)
	from := fs.String("from", "30d", "start: a date (2026-11-01), an RFC 3339 time or a look-back (30d)")
	to := fs.String("to", "", "end (default now)")
	out := fs.String("out", "", "the HTML file to write (required)")
	if rest, err := parse(fs, args); err != nil {
		return err
	} else if len(rest) > 0 {
		return usagef("unexpected argument %q", rest[0])
	}
	if err := src.check(); err != nil {
		return err
	}
	if *out == "" {
		return usagef("--out FILE is required, e.g. --out visit-2026-12-02.html")
	}
	if src.url != "" {
		resp, err := src.get("/report", url.Values{"from": {*from}, "to": {*to}})
		if err != nil {
			return err
		}
		defer resp.Body.Close()
		return writeOut(*out, stdout, func(w io.Writer) error { _, err := io.Copy(w, resp.Body); return err })
	}
	now := time.Now().UTC()
	f, t, err := site.ParseRange(*from, *to, now.Add(-30*24*time.Hour), now)
	if err != nil {
		return usagef("%v", err)
	}
	st, err := src.openDB()
	if err != nil {
		return err
	}
	defer st.Close()
	in := site.ReportInput{Store: st, From: f, To: t, Version: version, Now: now}
	if b, err := st.Baseline(0); err == nil {
		in.Asset, in.Threshold = b.Asset, b.Threshold
	}
	if err := writeOut(*out, stdout, func(w io.Writer) error { return site.WriteReport(w, in) }); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "report %s: %s to %s\n", *out, f.Format(time.RFC3339), t.Format(time.RFC3339))
	return nil
}
