package site

import (
	"context"
	"crypto/sha256"
	"crypto/subtle"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"net/http"
	"time"

	"github.com/auscult/auscult/pkg/store"
)

// Store is what the server reads; *store.Store implements it.
type Store interface {
	Events(q store.EventQuery) ([]store.Event, error)
	Event(seq uint64) (store.Event, error)
	Trend(r store.Range) ([]store.TrendPoint, error)
	Summaries(r store.Range) ([]store.Summary, error)
	Clip(id uint64) (store.Clip, error)
	Baselines() ([]store.Baseline, error)
	Stats() (store.Stats, error)
	OutboxStats() (store.OutboxStats, error)
	Backup(w io.Writer) (int64, error)
}

var _ Store = (*store.Store)(nil)

// MinTokenLen is the shortest token New accepts.
const MinTokenLen = 16

// ErrConfig is returned by New when the configuration cannot work.
var ErrConfig = errors.New("site: invalid config")

// Config configures the server.
type Config struct {
	// Store is the agent's log; required.
	Store Store
	// Token is the shared secret for every page but /healthz; at least
	// MinTokenLen bytes.
	Token string
	// Live reports the agent's present state; required.
	Live func() Live
	// Now is the clock (default time.Now).
	Now func() time.Time
	// TempDir is where a backup is staged before it is sent (default the
	// system's).
	TempDir string
	// Logger gets one line per refused login and per failed request.
	Logger *slog.Logger
}

// Server serves the site-visit pages.
type Server struct {
	cfg     Config
	session string // cookie value: derived from the token, never the token itself
	mux     *http.ServeMux
}

// sessionCookie is the login cookie's name.
const sessionCookie = "auscult_session"

// New checks cfg and builds the server.
func New(cfg Config) (*Server, error) {
	if cfg.Store == nil || cfg.Live == nil {
		return nil, fmt.Errorf("%w: Store and Live are required", ErrConfig)
	}
	if len(cfg.Token) < MinTokenLen {
		return nil, fmt.Errorf("%w: the web token is %d bytes, at least %d (make one with: head -c 24 /dev/urandom | base64)",
			ErrConfig, len(cfg.Token), MinTokenLen)
	}
	if cfg.Now == nil {
		cfg.Now = time.Now
	}
	if cfg.Logger == nil {
		cfg.Logger = slog.New(slog.DiscardHandler)
	}
	sum := sha256.Sum256([]byte("auscult session v1\x00" + cfg.Token))
	s := &Server{cfg: cfg, session: hex.EncodeToString(sum[:]), mux: http.NewServeMux()}
	s.routes()
	return s, nil
}

// Handler returns the server's handler, with authentication and limits.
func (s *Server) Handler() http.Handler { return s }

// ServeHTTP applies the security headers, the body limit and the token
// check, then routes.
func (s *Server) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	h := w.Header()
	h.Set("X-Content-Type-Options", "nosniff")
	h.Set("X-Frame-Options", "DENY")
	h.Set("Referrer-Policy", "no-referrer")
	h.Set("Content-Security-Policy", "default-src 'self'; img-src 'self' data:; style-src 'self' 'unsafe-inline'; media-src 'self'; script-src 'none'; form-action 'self'; frame-ancestors 'none'")
	h.Set("Cache-Control", "no-store")
	r.Body = http.MaxBytesReader(w, r.Body, 8<<10)
	switch r.URL.Path {
	case "/healthz":
		io.WriteString(w, "ok\n")
		return
	case "/login":
		s.login(w, r)
		return
	case "/style.css":
		s.style(w, r)
		return
	}
	if !s.authorised(r) {
		s.unauthorised(w, r)
		return
	}
	s.mux.ServeHTTP(w, r)
}

// authorised checks the bearer header or the session cookie, in constant
// time.
func (s *Server) authorised(r *http.Request) bool {
	if a := r.Header.Get("Authorization"); len(a) > 7 && a[:7] == "Bearer " {
		return subtle.ConstantTimeCompare([]byte(a[7:]), []byte(s.cfg.Token)) == 1
	}
	if c, err := r.Cookie(sessionCookie); err == nil {
		return subtle.ConstantTimeCompare([]byte(c.Value), []byte(s.session)) == 1
	}
	return false
}

// login shows the form (GET) or checks the token and sets the cookie
// (POST).
func (s *Server) login(w http.ResponseWriter, r *http.Request) {
	switch r.Method {
	case http.MethodGet, http.MethodHead:
		s.render(w, http.StatusOK, "login", pageData{Title: "Sign in"})
	case http.MethodPost:
		if err := r.ParseForm(); err != nil {
			http.Error(w, "site: login form too large or malformed", http.StatusBadRequest)
			return
		}
		tok := r.PostForm.Get("token")
		if subtle.ConstantTimeCompare([]byte(tok), []byte(s.cfg.Token)) != 1 {
			s.cfg.Logger.Warn("web login refused: wrong token", "remote", remoteHost(r))
			s.render(w, http.StatusUnauthorized, "login", pageData{Title: "Sign in", Error: "That token is not right."})
			return
		}
		http.SetCookie(w, &http.Cookie{Name: sessionCookie, Value: s.session, Path: "/", HttpOnly: true,
			SameSite: http.SameSiteStrictMode, Secure: r.TLS != nil, MaxAge: 12 * 3600})
		http.Redirect(w, r, "/", http.StatusSeeOther)
	default:
		w.Header().Set("Allow", "GET, POST")
		http.Error(w, "site: method not allowed", http.StatusMethodNotAllowed)
	}
}

// unauthorised answers 401: a login page for a browser, plain text for a
// program.
func (s *Server) unauthorised(w http.ResponseWriter, r *http.Request) {
	w.Header().Set("WWW-Authenticate", `Bearer realm="auscult"`)
	if r.Header.Get("Authorization") != "" {
		s.cfg.Logger.Warn("web request refused: wrong token", "remote", remoteHost(r), "path", r.URL.Path)
	}
	s.render(w, http.StatusUnauthorized, "login", pageData{Title: "Sign in",
		Error: "Sign in with the agent's web token to see this page."})
}

func remoteHost(r *http.Request) string {
	host, _, err := net.SplitHostPort(r.RemoteAddr)
	if err != nil {
		return r.RemoteAddr
	}
	return host
}

// Timeouts and limits of ListenAndServe.
const (
	readHeaderTimeout = 5 * time.Second
	readTimeout       = 15 * time.Second
	writeTimeout      = 10 * time.Minute // a backup of a large log on a slow phone link
	idleTimeout       = 60 * time.Second
	maxHeaderBytes    = 16 << 10
)

// Serve serves on ln until ctx is cancelled, with TLS when certFile and
// keyFile are given, then shuts down (waiting up to 3 s for requests in
// flight). It returns nil after a clean shutdown.
func (s *Server) Serve(ctx context.Context, ln net.Listener, certFile, keyFile string) error {
	srv := &http.Server{Handler: s, ReadHeaderTimeout: readHeaderTimeout, ReadTimeout: readTimeout,
		WriteTimeout: writeTimeout, IdleTimeout: idleTimeout, MaxHeaderBytes: maxHeaderBytes,
		ErrorLog: slog.NewLogLogger(s.cfg.Logger.Handler(), slog.LevelWarn)}
	errc := make(chan error, 1)
	go func() {
		if certFile != "" {
			errc <- srv.ServeTLS(ln, certFile, keyFile)
		} else {
			errc <- srv.Serve(ln)
		}
	}()
	select {
	case err := <-errc:
		return fmt.Errorf("site: %w", err)
	case <-ctx.Done():
	}
	sctx, cancel := context.WithTimeout(context.Background(), 3*time.Second)
	defer cancel()
	if err := srv.Shutdown(sctx); err != nil {
		srv.Close()
	}
	<-errc
	return nil
}
