package main

import (
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"slices"

	"ringbox/internal/scenario"
)

// ringbox sweep: a size sweep with its crossovers, the same request and
// JSON as GET /api/v1/sweep.

func init() { commands["sweep"] = sweepCmd }

// sweepFlagHelp is the usage text of the sweep's own keys.
var sweepFlagHelp = map[string]string{
	"sweep":    "length to sweep: lx, ly, lz, or all (every confined axis scaled, ratios kept)",
	"from":     "smallest swept length (20nm, 0.02um, 200A; bare numbers are nm)",
	"to":       "largest swept length; with all, the largest confined length",
	"steps":    "log-spaced sizes, 2 to 200",
	"quantity": "density, modes (M at E_F), conductance or states (N at E_F)",
	"tol":      "relative tolerance of the crossover to the continuum, e.g. 0.05",
}

func sweepCmd(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("sweep", stderr)
	keys := slices.DeleteFunc(slices.Clone(scenario.Keys), func(k string) bool { return k == "at" || k == "points" })
	given := scenarioFlags(fs, keys)
	sweepVals := map[string]*string{}
	for _, k := range scenario.SweepKeys {
		sweepVals[k] = fs.String(k, "", sweepFlagHelp[k])
	}
	format := fs.String("format", "table", "output: table, json or csv")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "ringbox sweep: unexpected argument %q\n", fs.Arg(0))
		return 2
	}
	if *format != "table" && *format != "json" && *format != "csv" {
		fmt.Fprintf(stderr, "ringbox sweep: --format: %q is not table, json or csv\n", *format)
		return 2
	}
	q := given()
	fs.Visit(func(f *flag.Flag) {
		if p, ok := sweepVals[f.Name]; ok {
			q.Set(f.Name, *p)
		}
	})
	sw, err := scenario.ParseSweep(q)
	if err != nil {
		return fail(stderr, "sweep", err)
	}
	res, err := scenario.RunSweep(ctx, sw, terminalProgress(stderr))
	if err != nil {
		return fail(stderr, "sweep", err)
	}
	switch *format {
	case "json":
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", " ")
		err = enc.Encode(res)
	case "csv":
		err = res.WriteCSV(stdout)
	default:
		err = res.WriteTable(stdout)
	}
	if err != nil {
		fmt.Fprintf(stderr, "ringbox sweep: %v\n", err)
		return 1
	}
	return 0
}

// terminalProgress returns a progress callback that redraws one status
// line on stderr when stderr is a terminal, and nil otherwise, so logs and
// pipes stay clean.
func terminalProgress(stderr io.Writer) func(done, total int) {
	f, ok := stderr.(*os.File)
	if !ok {
		return nil
	}
	if fi, err := f.Stat(); err != nil || fi.Mode()&os.ModeCharDevice == 0 {
		return nil
	}
	return func(done, total int) {
		fmt.Fprintf(f, "\rringbox sweep: %d/%d sizes", done, total)
		if done == total {
			fmt.Fprint(f, "\r\033[K")
		}
	}
}
