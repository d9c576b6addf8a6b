// Package validation holds ringbox's reference table of published checks,
// checks.tsv, embedded so the binary, the tests and the web page read one
// file. The package lives beside the table because //go:embed only reaches
// files under the embedding package's directory; the go tool skips
// directories named testdata for ./... patterns, but they import normally.
// internal/validation parses and runs the table.
package validation

import _ "embed"

// Table is the content of checks.tsv: a tab-separated header line and one
// row per published check (see internal/validation for the columns).
//
//go:embed checks.tsv
var Table []byte
