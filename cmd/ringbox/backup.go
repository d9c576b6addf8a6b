package main

import (
	"context"
	"errors"
	"fmt"
	"io"

	"ringbox/internal/store"
)

// ringbox backup --db PATH --to FILE writes a consistent copy of the review
// database, safe while `ringbox serve` runs on the same file: the copy is
// one snapshot (store.Backup, VACUUM INTO), writers carry on meanwhile.

func init() { commands["backup"] = backupCmd }

func backupCmd(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("backup", stderr)
	db := fs.String("db", "ringbox.db", "SQLite file of saved reviews to copy")
	to := fs.String("to", "", "file to write the copy to (must not exist)")
	if code, ok := parseFlags(fs, args, stderr); !ok {
		return code
	}
	if *to == "" {
		fmt.Fprintln(stderr, "ringbox backup: --to: the file to write the copy to is required")
		return 2
	}
	// Read-only: a mistyped --db must not create an empty database, and the
	// copy never needs to write the source.
	st, err := store.Open(ctx, *db, store.Options{ReadOnly: true})
	if err != nil {
		fmt.Fprintf(stderr, "ringbox backup: --db: %v\n", err)
		return 1
	}
	defer st.Close()
	if err := st.Backup(ctx, *to); err != nil {
		fmt.Fprintf(stderr, "ringbox backup: %v\n", err)
		if errors.Is(err, store.ErrExists) {
			return 2
		}
		return 1
	}
	fmt.Fprintf(stdout, "ringbox: backed up %s to %s\n", *db, *to)
	return 0
}
