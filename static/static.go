// Package static holds ringbox's stylesheet, scripts and icon, embedded in
// the binary so the web app needs no files or network at run time.
//
// Each asset is addressed as /static/NAME?v=HASH: the version changes when
// the content does, so browsers may keep a versioned URL for a year without
// ever showing a stale stylesheet after an upgrade.
package static

import (
	"crypto/sha256"
	"embed"
	"encoding/hex"
	"io/fs"
	"mime"
	"path"
	"sync"
)

//go:embed *.css *.js *.svg
var files embed.FS

// Asset is one embedded file with the version that its URL carries.
type Asset struct {
	Name        string
	Content     []byte
	Version     string // first 12 hex digits of the SHA-256 of Content
	ContentType string
}

// assets is built once, on first use (not at start-up, so command-line runs
// that serve nothing do not hash the files); they never change while running.
var assets = sync.OnceValue(func() map[string]Asset {
	entries, err := fs.ReadDir(files, ".")
	if err != nil {
		panic("static: " + err.Error())
	}
	m := make(map[string]Asset, len(entries))
	for _, e := range entries {
		b, err := files.ReadFile(e.Name())
		if err != nil {
			panic("static: " + err.Error())
		}
		sum := sha256.Sum256(b)
		ct := mime.TypeByExtension(path.Ext(e.Name()))
		if ct == "" {
			ct = "application/octet-stream"
		}
		m[e.Name()] = Asset{Name: e.Name(), Content: b, Version: hex.EncodeToString(sum[:])[:12], ContentType: ct}
	}
	return m
})

// Lookup returns the asset called name (a bare file name such as
// "ringbox.css") and whether it exists.
func Lookup(name string) (Asset, bool) {
	a, ok := assets()[name]
	return a, ok
}

// Path returns the versioned URL path of the asset called name. It panics
// on a name that is not embedded: templates name their assets literally, so
// a miss is a programming error caught by the first render in any test.
func Path(name string) string {
	a, ok := assets()[name]
	if !ok {
		panic("static: no asset " + name)
	}
	return "/static/" + a.Name + "?v=" + a.Version
}
