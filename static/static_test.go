package static

import (
	"crypto/sha256"
	"encoding/hex"
	"strings"
	"testing"
)

func TestAssets(t *testing.T) {
	for _, name := range []string{"ringbox.css", "readout.js", "favicon.svg"} {
		t.Run(name, func(t *testing.T) {
			a, ok := Lookup(name)
			if !ok || len(a.Content) == 0 {
				t.Fatalf("%s not embedded", name)
			}
			sum := sha256.Sum256(a.Content)
			if want := hex.EncodeToString(sum[:])[:12]; a.Version != want {
				t.Errorf("Version = %s, want %s", a.Version, want)
			}
			if p := Path(name); p != "/static/"+name+"?v="+a.Version {
				t.Errorf("Path = %s", p)
			}
		})
	}
	if _, ok := Lookup("static.go"); ok {
		t.Error("the package's Go source is served as an asset")
	}
}

func TestPathPanicsOnUnknownAsset(t *testing.T) {
	defer func() {
		if v := recover(); v == nil || !strings.HasPrefix(v.(string), "static: ") {
			t.Errorf("recovered %v, want a static: panic", v)
		}
	}()
	Path("missing.css")
}
