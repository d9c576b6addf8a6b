// Package web is ringbox's HTTP front end: the chi router, the handlers, the
// middleware, the rendered-output cache and the server's lifecycle. Pages
// are templ components in web/views; the physics lives in internal/.
package web

import (
	"context"
	"errors"
	"fmt"
	"log/slog"
	"net"
	"net/http"
	"runtime"
	"time"
)

// Config is everything the web app needs to start. Zero fields take the
// defaults that New documents.
type Config struct {
	// Addr is the TCP address to listen on; default "127.0.0.1:8080"
	// (localhost only: exposing the app is a deliberate choice).
	Addr string
	// DBPath is the saved-review database file; default "ringbox.db".
	DBPath string
	// ReadOnly refuses every request that would change state (anything
	// but GET, HEAD and OPTIONS) with 403, for a shared intranet copy.
	ReadOnly bool
	// MaxConcurrent bounds the computations in flight; default
	// 2×GOMAXPROCS+2. Further requests get 503 with Retry-After.
	MaxConcurrent int
	// RequestTimeout is each request's deadline; default 10 s.
	RequestTimeout time.Duration
	// CacheEntries is the number of rendered outputs kept; default 256.
	CacheEntries int
	// Logger receives the access log and internal errors; default
	// slog.Default().
	Logger *slog.Logger
}

// withDefaults returns c with every zero field set to its default.
func (c Config) withDefaults() Config {
	if c.Addr == "" {
		c.Addr = "127.0.0.1:8080"
	}
	if c.DBPath == "" {
		c.DBPath = "ringbox.db"
	}
	if c.MaxConcurrent <= 0 {
		// The engines are CPU-bound: a little more than the cores keeps
		// them busy while requests wait on I/O, without queueing work
		// that would only time out.
		c.MaxConcurrent = 2*runtime.GOMAXPROCS(0) + 2
	}
	if c.RequestTimeout <= 0 {
		c.RequestTimeout = 10 * time.Second
	}
	if c.CacheEntries <= 0 {
		c.CacheEntries = 256
	}
	if c.Logger == nil {
		c.Logger = slog.Default()
	}
	return c
}

// App is the wired web application. Build it with New, serve it with Run
// (or mount Handler in a test server), and release it with Close.
type App struct {
	cfg     Config
	log     *slog.Logger
	cache   *renderCache
	handler http.Handler

	// Reviews is the saved-review store (internal/store behind a small
	// interface, see store.go). It is nil until that store is wired; the
	// review handlers must answer 503 while it is.
	Reviews ReviewStore
}

// shutdownGrace is how long Run waits for requests in flight after its
// context ends: a little more than nothing, since engines honour their
// request deadline.
const shutdownGrace = 5 * time.Second

// New builds the App from cfg: it fills defaults, opens the review store
// when one is wired (see openReviews) and builds the router once.
func New(cfg Config) (*App, error) {
	cfg = cfg.withDefaults()
	a := &App{
		cfg:   cfg,
		log:   cfg.Logger,
		cache: newRenderCache(cfg.CacheEntries),
	}
	if openReviews != nil {
		s, err := openReviews(cfg.DBPath, cfg.ReadOnly)
		if err != nil {
			return nil, fmt.Errorf("web: open review store %s: %w", cfg.DBPath, err)
		}
		a.Reviews = s
	}
	a.handler = a.router()
	return a, nil
}

// Handler returns the app's root handler, with all middleware applied.
func (a *App) Handler() http.Handler { return a.handler }

// Run listens on the configured address and serves until ctx ends, then
// shuts down gracefully, giving requests in flight up to a few seconds.
// It returns nil after a clean shutdown.
func (a *App) Run(ctx context.Context) error {
	ln, err := net.Listen("tcp", a.cfg.Addr)
	if err != nil {
		return fmt.Errorf("web: listen: %w", err)
	}
	return a.serve(ctx, ln)
}

// serve is Run on an existing listener, so tests can listen on port 0.
func (a *App) serve(ctx context.Context, ln net.Listener) error {
	srv := a.server()
	a.log.Info("serving", "addr", "http://"+ln.Addr().String())
	errc := make(chan error, 1)
	go func() { errc <- srv.Serve(ln) }()
	select {
	case err := <-errc:
		return fmt.Errorf("web: serve: %w", err)
	case <-ctx.Done():
	}
	sctx, cancel := context.WithTimeout(context.Background(), shutdownGrace)
	defer cancel()
	err := srv.Shutdown(sctx)
	if errors.Is(err, context.DeadlineExceeded) {
		// Requests still running after the grace period are cut off.
		err = srv.Close()
	}
	if serr := <-errc; serr != nil && !errors.Is(serr, http.ErrServerClosed) {
		return fmt.Errorf("web: serve: %w", serr)
	}
	return err
}

// server returns the http.Server with timeouts that keep a slow or
// malicious client from holding connections: headers must arrive quickly,
// and a response may take the request deadline plus a margin to write.
func (a *App) server() *http.Server {
	return &http.Server{
		Handler:           a.handler,
		ReadHeaderTimeout: 5 * time.Second,
		ReadTimeout:       15 * time.Second,
		WriteTimeout:      a.cfg.RequestTimeout + 10*time.Second,
		IdleTimeout:       60 * time.Second,
		// Compare URLs carry several scenario query strings, so allow
		// more than a typical page needs, but far below the 1 MiB default.
		MaxHeaderBytes: 256 << 10,
		ErrorLog:       slog.NewLogLogger(a.log.Handler(), slog.LevelWarn),
	}
}

// Close releases the App's resources (the review store).
func (a *App) Close() error {
	if a.Reviews != nil {
		return a.Reviews.Close()
	}
	return nil
}
