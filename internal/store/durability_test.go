//go:build unix

package store

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"
)

// childEnv names the database a re-executed test binary works on; its
// presence makes TestDurabilityAfterSIGKILL play the child.
const childEnv = "RINGBOX_STORE_KILL_CHILD_DB"

// TestDurabilityAfterSIGKILL checks the promise in dsn's comment: once
// Create has returned, the review survives the process being killed with
// SIGKILL (no Close, no checkpoint, no deferred function runs).
func TestDurabilityAfterSIGKILL(t *testing.T) {
	if path := os.Getenv(childEnv); path != "" {
		durabilityChild(path)
		return
	}
	path := filepath.Join(t.TempDir(), "reviews.db")
	ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
	defer cancel()
	cmd := exec.CommandContext(ctx, os.Args[0], "-test.run=^TestDurabilityAfterSIGKILL$", "-test.count=1")
	cmd.Env = append(os.Environ(), childEnv+"="+path)
	cmd.Stderr = os.Stderr
	stdin, err := cmd.StdinPipe() // held open: the child blocks reading it
	if err != nil {
		t.Fatal(err)
	}
	defer stdin.Close()
	stdout, err := cmd.StdoutPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}

	var id int64
	sc := bufio.NewScanner(stdout)
	for sc.Scan() {
		if v, ok := strings.CutPrefix(sc.Text(), "created id="); ok {
			id, err = strconv.ParseInt(v, 10, 64)
			if err != nil {
				t.Fatalf("child printed %q", sc.Text())
			}
			break
		}
	}
	if id == 0 {
		cmd.Process.Kill()
		cmd.Wait()
		t.Fatalf("child exited without printing an id (%v)", sc.Err())
	}
	// Kill at once, before the child can do anything else.
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	go io.Copy(io.Discard, stdout)
	err = cmd.Wait()
	ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus)
	if !ok || !ws.Signaled() || ws.Signal() != syscall.SIGKILL {
		t.Fatalf("child did not die of SIGKILL: %v", err)
	}
	// The review lived only in the write-ahead log: the child never closed
	// the database, so nothing was checkpointed into the main file.
	if fi, err := os.Stat(path + "-wal"); err != nil || fi.Size() == 0 {
		t.Errorf("expected a non-empty WAL left by the killed child: %v", err)
	}

	s, err := Open(context.Background(), path, Options{})
	if err != nil {
		t.Fatalf("reopen after SIGKILL: %v", err)
	}
	defer s.Close()
	got, err := s.Get(context.Background(), id)
	if err != nil {
		t.Fatalf("review %d lost after SIGKILL: %v", id, err)
	}
	want := sample("survives SIGKILL")
	if got.Title != want.Title || got.Notes != want.Notes || strings.Join(got.Scenarios, " ") != strings.Join(want.Scenarios, " ") {
		t.Errorf("recovered review = %+v", got)
	}
	var check string
	if err := s.r.QueryRow("PRAGMA integrity_check").Scan(&check); err != nil || check != "ok" {
		t.Errorf("integrity_check after SIGKILL = %q, %v", check, err)
	}
}

// durabilityChild creates one review, reports its id, and waits to be
// killed. It exits by itself if the parent goes away (stdin closes).
func durabilityChild(path string) {
	s, err := Open(context.Background(), path, Options{})
	if err != nil {
		fmt.Fprintln(os.Stderr, "child:", err)
		os.Exit(2)
	}
	r, err := s.Create(context.Background(), sample("survives SIGKILL"))
	if err != nil {
		fmt.Fprintln(os.Stderr, "child:", err)
		os.Exit(2)
	}
	fmt.Printf("created id=%d\n", r.ID)
	io.Copy(io.Discard, os.Stdin)
	os.Exit(3)
}
