package main

import (
	"context"
	"fmt"
	"io"
	"maps"
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
	sweepGiven := keyFlags(fs, scenario.SweepKeys, func(k string) string { return sweepFlagHelp[k] })
	formatOpt := newFormatFlag(fs, "table", "json", "csv")
	if code, ok := parseFlags(fs, args, stderr); !ok {
		return code
	}
	format, ok := formatOpt.get(stderr)
	if !ok {
		return 2
	}
	q := given()
	maps.Copy(q, sweepGiven())
	sw, err := scenario.ParseSweep(q)
	if err != nil {
		return fail(stderr, "sweep", err)
	}
	res, err := scenario.RunSweep(ctx, sw, terminalProgress(stderr))
	if err != nil {
		return fail(stderr, "sweep", err)
	}
	if err := writeResult(stdout, format, res, " ", res.WriteCSV, res.WriteTable); err != nil {
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
