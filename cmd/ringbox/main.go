// Command ringbox counts the electronic states and conduction modes of small
// conductors exactly and serves the same numbers as web pages and a JSON API.
//
//	ringbox serve [--addr 127.0.0.1:8080] [--db ringbox.db]
//	ringbox count --material gaas --dims 3 --lx 10nm … [--format table|json|csv]
//	ringbox materials
package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"strings"
	"syscall"

	"ringbox/internal/material"
	"ringbox/internal/scenario"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

const usage = `usage: ringbox COMMAND [flags]

commands:
  serve      run the web app (default http://127.0.0.1:8080)
  count      count states and modes of one conductor
  sweep      sweep a length and find the crossover to the bulk
  lattice    graphene ribbons and nanotubes (tight binding)
  backup     copy the review database consistently
  validate   run the published checks
  materials  list the material catalogue
Run "ringbox COMMAND --help" for a command's flags.
`

// run dispatches a subcommand; it returns the process exit status: 0, 1 for
// a failure, 2 for bad usage or input.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, usage)
		return 2
	}
	cmd, rest := args[0], args[1:]
	if f, ok := commands[cmd]; ok {
		return f(ctx, rest, stdout, stderr)
	}
	if cmd == "-h" || cmd == "--help" || cmd == "help" {
		fmt.Fprint(stdout, usage)
		return 0
	}
	fmt.Fprintf(stderr, "ringbox: unknown command %q\n%s", cmd, usage)
	return 2
}

// commands maps each subcommand to its function. Subcommands in other files
// of this package add themselves from init.
var commands = map[string]func(ctx context.Context, args []string, stdout, stderr io.Writer) int{
	"count":     countCmd,
	"materials": materialsCmd,
	"serve":     serveCmd,
}

// fail prints a user error naming its flag and returns the exit status.
func fail(stderr io.Writer, cmd string, err error) int {
	if e, ok := scenario.AsError(err); ok {
		if e.Key != "" {
			fmt.Fprintf(stderr, "ringbox %s: --%s: %s\n", cmd, e.Key, e.Msg)
		} else {
			fmt.Fprintf(stderr, "ringbox %s: %s\n", cmd, e.Msg)
		}
		if e.Code == scenario.Invalid || e.Code == scenario.TooLarge {
			return 2
		}
		return 1
	}
	fmt.Fprintf(stderr, "ringbox %s: %v\n", cmd, err)
	return 1
}

func countCmd(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("count", stderr)
	given := scenarioFlags(fs, scenario.Keys)
	formatOpt := newFormatFlag(fs, "table", "json", "csv")
	if code, ok := parseFlags(fs, args, stderr); !ok {
		return code
	}
	format, ok := formatOpt.get(stderr)
	if !ok {
		return 2
	}
	s, err := scenario.Parse(given())
	if err != nil {
		return fail(stderr, "count", err)
	}
	// A one-shot run holds little memory (the counts never enumerate
	// states): skip garbage collection unless the heap passes 1 GiB.
	debug.SetGCPercent(-1)
	debug.SetMemoryLimit(1 << 30)
	res, err := scenario.Run(ctx, s)
	if err != nil {
		return fail(stderr, "count", err)
	}
	if err := writeResult(stdout, format, res, "", res.WriteCSV, res.WriteTable); err != nil {
		fmt.Fprintf(stderr, "ringbox count: %v\n", err)
		return 1
	}
	return 0
}

// writeResult writes res to w in format: "json" through encoding/json,
// indented by indent ("" for one line, byte for byte the API's answer),
// "csv" through writeCSV, anything else through writeTable.
func writeResult(w io.Writer, format string, res any, indent string, writeCSV, writeTable func(io.Writer) error) error {
	switch format {
	case "json":
		enc := json.NewEncoder(w)
		enc.SetIndent("", indent)
		return enc.Encode(res)
	case "csv":
		return writeCSV(w)
	default:
		return writeTable(w)
	}
}

func materialsCmd(_ context.Context, args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("materials", stderr)
	if err := fs.Parse(args); err != nil {
		return 2
	}
	fmt.Fprintf(stdout, "%-7s %-26s %-9s %-9s %-8s %s\n", "id", "name", "masses", "alpha/eV", "E_F eV", "source")
	for _, m := range material.All() {
		var ms []string
		for _, v := range m.Valleys {
			ms = append(ms, fmt.Sprintf("%g", v.MassM0[0]))
		}
		fmt.Fprintf(stdout, "%-7s %-26s %-9s %-9.3g %-8.3g %s\n", m.ID, m.Name, strings.Join(ms, "/"), m.AlphaPerEV, m.FermiEV, m.Source)
	}
	fmt.Fprintf(stdout, "%-7s %-26s %s\n", "custom", "user-defined", "keys m or mx, my, mz; gv; alpha")
	return 0
}
