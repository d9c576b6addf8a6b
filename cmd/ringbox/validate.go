package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strconv"
	"text/tabwriter"

	"ringbox/internal/validation"
)

// ringbox validate: run the published checks of the reference table
// (testdata/validation/checks.tsv, built in) through the real engines.
// Exit status 0 when every check passes, 1 when any fails, 2 for bad usage
// or an unreadable table.

func init() { commands["validate"] = validateCmd }

func validateCmd(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := newFlagSet("validate", stderr)
	formatOpt := newFormatFlag(fs, "table", "json")
	tablePath := fs.String("table", "", "run this reference table (tab-separated, same columns) instead of the built-in one")
	timeout := fs.Duration("timeout", validation.DefaultTimeout, "time limit of each check")
	if code, ok := parseFlags(fs, args, stderr); !ok {
		return code
	}
	format, ok := formatOpt.get(stderr)
	if !ok {
		return 2
	}
	checks := []validation.Check(nil)
	if *tablePath == "" {
		checks = validation.Default()
	} else {
		b, err := os.ReadFile(*tablePath)
		if err != nil {
			fmt.Fprintf(stderr, "ringbox validate: --table: %v\n", err)
			return 2
		}
		if checks, err = validation.Parse(bytes.NewReader(b)); err != nil {
			fmt.Fprintf(stderr, "ringbox validate: --table %s: %v\n", *tablePath, err)
			return 2
		}
	}
	rep, err := validation.Run(ctx, checks, *timeout)
	if err != nil {
		fmt.Fprintf(stderr, "ringbox validate: %v\n", err)
		return 1
	}
	if format == "json" {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", " ")
		err = enc.Encode(rep)
	} else {
		err = writeValidationTable(stdout, rep)
	}
	if err != nil {
		fmt.Fprintf(stderr, "ringbox validate: %v\n", err)
		return 1
	}
	if !rep.OK() {
		return 1
	}
	return 0
}

// writeValidationTable prints one line per check and a closing count.
func writeValidationTable(w io.Writer, rep validation.Report) error {
	tw := tabwriter.NewWriter(w, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "check\tresult\tcomputed\treference\tunit\tdeviation\ttolerance\tsource")
	for _, o := range rep.Outcomes {
		result, computed, dev := "pass", strconv.FormatFloat(o.Computed, 'g', 7, 64), strconv.FormatFloat(o.Deviation, 'g', 3, 64)
		if !o.Pass {
			result = "FAIL"
		}
		if o.Err != "" {
			computed, dev = "error: "+o.Err, "-"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%g\t%s\t%s\t%s\t%s\n", o.ID, result, computed, o.Reference, o.Unit, dev, o.ToleranceText, o.Source)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "%d of %d checks passed\n", rep.Passed, len(rep.Outcomes))
	return err
}
