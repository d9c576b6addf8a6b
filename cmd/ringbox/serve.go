package main

import (
	"context"
	"fmt"
	"io"
	"log/slog"

	"ringbox/web"
)

func serveCmd(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("serve", stderr)
	cfg := web.Config{}
	fs.StringVar(&cfg.Addr, "addr", "127.0.0.1:8080", "listen address (use :8080 for the intranet)")
	fs.StringVar(&cfg.DBPath, "db", "ringbox.db", "SQLite file for saved reviews")
	fs.BoolVar(&cfg.ReadOnly, "read-only", false, "show saved reviews but refuse writes")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	cfg.Logger = slog.New(slog.NewTextHandler(stderr, nil))
	app, err := web.New(cfg)
	if err != nil {
		fmt.Fprintf(stderr, "ringbox serve: %v\n", err)
		return 1
	}
	defer app.Close()
	fmt.Fprintf(stdout, "ringbox: serving on http://%s\n", cfg.Addr)
	if err := app.Run(ctx); err != nil {
		fmt.Fprintf(stderr, "ringbox serve: %v\n", err)
		return 1
	}
	return 0
}
