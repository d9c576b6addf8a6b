package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"net/url"
	"slices"
	"strings"
)

// Flag handling shared by the subcommands: one flag set per command that
// reports to stderr, the keys of a request as string flags, --format, and
// the parse that rejects stray arguments.

func newFlagSet(name string, stderr io.Writer) *flag.FlagSet {
	fs := flag.NewFlagSet("ringbox "+name, flag.ContinueOnError)
	fs.SetOutput(stderr)
	return fs
}

// scenarioFlags registers one string flag per scenario key; set returns the
// ones given on the command line as url.Values.
func scenarioFlags(fs *flag.FlagSet, keys []string) func() url.Values {
	return keyFlags(fs, keys, func(k string) string { return "scenario key " + k + " (see DESIGN names)" })
}

// keyFlags registers one string flag per key of a request, with the usage
// text help(key); the function it returns gives the flags set on the
// command line as url.Values, the query the web app would get.
func keyFlags(fs *flag.FlagSet, keys []string, help func(key string) string) func() url.Values {
	vals := map[string]*string{}
	for _, k := range keys {
		vals[k] = fs.String(k, "", help(k))
	}
	return func() url.Values {
		q := url.Values{}
		fs.Visit(func(f *flag.Flag) {
			if p, ok := vals[f.Name]; ok {
				q.Set(f.Name, *p)
			}
		})
		return q
	}
}

// formatFlag is a command's --format: one of choices, the first the
// default.
type formatFlag struct {
	fs      *flag.FlagSet
	value   *string
	choices []string
}

// newFormatFlag registers --format on fs.
func newFormatFlag(fs *flag.FlagSet, choices ...string) *formatFlag {
	if len(choices) == 0 {
		panic("ringbox: --format needs at least one choice")
	}
	return &formatFlag{fs: fs, value: fs.String("format", choices[0], "output: "+orList(choices)), choices: choices}
}

// get returns the format given, after fs is parsed; with one that is not a
// choice it prints why and reports false (exit status 2).
func (f *formatFlag) get(stderr io.Writer) (string, bool) {
	if !slices.Contains(f.choices, *f.value) {
		fmt.Fprintf(stderr, "%s: --format: %q is not %s\n", f.fs.Name(), *f.value, orList(f.choices))
		return "", false
	}
	return *f.value, true
}

// orList writes "a, b or c".
func orList(words []string) string {
	if len(words) < 2 {
		return strings.Join(words, "")
	}
	return strings.Join(words[:len(words)-1], ", ") + " or " + words[len(words)-1]
}

// parseFlags parses args into fs and refuses positional arguments. When
// ok is false the command stops with code: 0 after --help, 2 for bad
// usage (the flag package or this has printed why).
func parseFlags(fs *flag.FlagSet, args []string, stderr io.Writer) (code int, ok bool) {
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0, false
		}
		return 2, false
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "%s: unexpected argument %q\n", fs.Name(), fs.Arg(0))
		return 2, false
	}
	return 0, true
}
