package store

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"testing"
	"time"
)

func TestExportImportRoundTrip(t *testing.T) {
	s, _ := openTemp(t)
	ctx := context.Background()
	cases := []Review{
		sample("GaAs wire: box vs ring"),
		{
			Title:     `Quotes "and" <html> & ünïcödé, 100%_`,
			Notes:     "line 1\n\ttab <b>not bold</b> & \\ backslash \u2028 sep",
			Scenarios: []string{"material=cu&dims=2&lx=20nm&ly=40nm", "a=%26&b=%3C"},
		},
		// The largest review, with characters encoding/json escapes.
		{
			Title:     strings.Repeat("<", MaxTitle),
			Notes:     strings.Repeat("&", MaxNotes),
			Scenarios: []string{strings.Repeat("<", MaxScenarioLen), "x=1", "x=2", "x=3", "x=4", "x=5", "x=6", "x=7"},
		},
	}
	for i, in := range cases {
		t.Run(fmt.Sprint(i), func(t *testing.T) {
			orig, err := s.Create(ctx, in)
			if err != nil {
				t.Fatal(err)
			}
			doc, err := s.Export(ctx, orig.ID)
			if err != nil {
				t.Fatal(err)
			}
			var head struct {
				Format  string `json:"format"`
				Version int    `json:"version"`
				Review  struct {
					ID int64 `json:"id"`
				} `json:"review"`
			}
			if err := json.Unmarshal(doc, &head); err != nil {
				t.Fatalf("export is not JSON: %v", err)
			}
			if head.Format != "ringbox-review" || head.Version != 1 || head.Review.ID != orig.ID {
				t.Errorf("export header = %+v", head)
			}
			imp, err := s.Import(ctx, doc)
			if err != nil {
				t.Fatalf("Import: %v", err)
			}
			if imp.ID == orig.ID {
				t.Errorf("import kept id %d, want a new one", imp.ID)
			}
			imp.ID = orig.ID
			if !equalReview(imp, orig) {
				t.Errorf("import = %+v\nwant    %+v", imp, orig)
			}
			read, err := s.Get(ctx, imp.ID)
			if err != nil {
				t.Fatal(err)
			}
			read.ID = orig.ID
			if !equalReview(read, orig) || read.Created.Location() != time.UTC {
				t.Errorf("stored import = %+v\nwant           %+v", read, orig)
			}
		})
	}

	// Even if every character of the largest review is written \u00XX,
	// the document stays under MaxDocument.
	worst := 6*(4*MaxTitle+MaxNotes+MaxScenarios*MaxScenarioLen) + 1024
	if worst > MaxDocument {
		t.Errorf("worst-case document %d bytes > MaxDocument %d", worst, MaxDocument)
	}
}

func TestImportKeepsCreatedAndConvertsToUTC(t *testing.T) {
	s, _ := openTemp(t)
	doc := `{"format":"ringbox-review","version":1,"review":{"id":5,"title":"from a colleague",
		"notes":"","scenarios":["material=inp&dims=1&lx=50nm"],"created":"2024-02-29T23:30:00.5+02:00"}}`
	r, err := s.Import(context.Background(), []byte(doc))
	if err != nil {
		t.Fatal(err)
	}
	want := time.Date(2024, 2, 29, 21, 30, 0, 5e8, time.UTC)
	if !r.Created.Equal(want) || r.Created.Location() != time.UTC {
		t.Errorf("Created = %v, want %v", r.Created, want)
	}
	got, err := s.Get(context.Background(), r.ID)
	if err != nil || !got.Created.Equal(want) {
		t.Errorf("stored Created = %v, %v; want %v", got.Created, err, want)
	}
}

func TestImportRejects(t *testing.T) {
	s, _ := openTemp(t)
	ctx := context.Background()
	// doc builds a document from a valid one with one part replaced.
	doc := func(format, version, review string) string {
		return fmt.Sprintf(`{"format":%s,"version":%s,"review":%s}`, format, version, review)
	}
	rev := func(title, notes, scenarios, created string) string {
		return fmt.Sprintf(`{"id":1,"title":%s,"notes":%s,"scenarios":%s,"created":%s}`, title, notes, scenarios, created)
	}
	okReview := rev(`"t"`, `""`, `["a=1"]`, `"2025-01-02T03:04:05Z"`)
	if _, err := ParseDocument([]byte(doc(`"ringbox-review"`, `1`, okReview))); err != nil {
		t.Fatalf("the valid base document is refused: %v", err)
	}
	nine := `["a=1","a=2","a=3","a=4","a=5","a=6","a=7","a=8","a=9"]`
	future := time.Now().Add(48 * time.Hour).UTC().Format(time.RFC3339)

	for _, c := range []struct {
		name, doc, field string
	}{
		{"empty", ``, "document"},
		{"not JSON", `ringbox`, "document"},
		{"truncated", doc(`"ringbox-review"`, `1`, okReview)[:40], "document"},
		{"array", `[]`, "document"},
		{"null", `null`, "format"},
		{"no format", `{"version":1,"review":` + okReview + `}`, "format"},
		{"wrong format", doc(`"ringbox-sweep"`, `1`, okReview), "format"},
		{"format not a string", doc(`7`, `1`, okReview), "document"},
		{"no version", `{"format":"ringbox-review","review":` + okReview + `}`, "version"},
		{"version 2", doc(`"ringbox-review"`, `2`, okReview), "version"},
		{"version 0", doc(`"ringbox-review"`, `0`, okReview), "version"},
		{"version string", doc(`"ringbox-review"`, `"1"`, okReview), "version"},
		{"version fraction", doc(`"ringbox-review"`, `1.5`, okReview), "version"},
		{"no review", `{"format":"ringbox-review","version":1}`, "review"},
		{"review null", doc(`"ringbox-review"`, `1`, `null`), "review"},
		{"unknown top field", `{"format":"ringbox-review","version":1,"extra":1,"review":` + okReview + `}`, "document"},
		{"unknown review field", doc(`"ringbox-review"`, `1`, `{"title":"t","scenarios":["a=1"],"created":"2025-01-02T03:04:05Z","owner":"x"}`), "document"},
		{"trailing data", doc(`"ringbox-review"`, `1`, okReview) + `{}`, "document"},
		{"title missing", doc(`"ringbox-review"`, `1`, `{"scenarios":["a=1"],"created":"2025-01-02T03:04:05Z"}`), "title"},
		{"title too long", doc(`"ringbox-review"`, `1`, rev(`"`+strings.Repeat("x", MaxTitle+1)+`"`, `""`, `["a=1"]`, `"2025-01-02T03:04:05Z"`)), "title"},
		{"title number", doc(`"ringbox-review"`, `1`, rev(`5`, `""`, `["a=1"]`, `"2025-01-02T03:04:05Z"`)), "title"},
		{"notes too long", doc(`"ringbox-review"`, `1`, rev(`"t"`, `"`+strings.Repeat("n", MaxNotes+1)+`"`, `["a=1"]`, `"2025-01-02T03:04:05Z"`)), "notes"},
		{"notes escaped NUL", doc(`"ringbox-review"`, `1`, rev(`"t"`, `"a\u0000b"`, `["a=1"]`, `"2025-01-02T03:04:05Z"`)), "notes"},
		{"no scenarios", doc(`"ringbox-review"`, `1`, rev(`"t"`, `""`, `[]`, `"2025-01-02T03:04:05Z"`)), "s"},
		{"nine scenarios", doc(`"ringbox-review"`, `1`, rev(`"t"`, `""`, nine, `"2025-01-02T03:04:05Z"`)), "s"},
		{"scenario too long", doc(`"ringbox-review"`, `1`, rev(`"t"`, `""`, `["`+strings.Repeat("q", MaxScenarioLen+1)+`"]`, `"2025-01-02T03:04:05Z"`)), "s"},
		{"scenario number", doc(`"ringbox-review"`, `1`, rev(`"t"`, `""`, `[3]`, `"2025-01-02T03:04:05Z"`)), "s"},
		{"created missing", doc(`"ringbox-review"`, `1`, `{"title":"t","scenarios":["a=1"]}`), "created"},
		{"created not a time", doc(`"ringbox-review"`, `1`, rev(`"t"`, `""`, `["a=1"]`, `"yesterday"`)), "created"},
		{"created before 1970", doc(`"ringbox-review"`, `1`, rev(`"t"`, `""`, `["a=1"]`, `"1969-12-31T23:59:59Z"`)), "created"},
		{"created in the future", doc(`"ringbox-review"`, `1`, rev(`"t"`, `""`, `["a=1"]`, `"`+future+`"`)), "created"},
		{"oversized", `{"format":"ringbox-review","version":1,"pad":"` + strings.Repeat(" ", MaxDocument) + `"}`, "document"},
	} {
		t.Run(c.name, func(t *testing.T) {
			before := countReviews(t, s)
			_, err := s.Import(ctx, []byte(c.doc))
			var fe *FieldError
			if !errors.Is(err, ErrInvalid) || !errors.As(err, &fe) {
				t.Fatalf("Import error = %v, want a FieldError", err)
			}
			if fe.Field != c.field {
				t.Errorf("error %q names field %q, want %q", err, fe.Field, c.field)
			}
			if n := countReviews(t, s); n != before {
				t.Errorf("refused import wrote a review (%d → %d)", before, n)
			}
		})
	}
}

// FuzzImport feeds arbitrary bytes to Import: it must never panic, and
// whatever it accepts must obey the limits and export back to a document
// that imports to the same review.
func FuzzImport(f *testing.F) {
	f.Add([]byte(`{"format":"ringbox-review","version":1,"review":{"id":1,"title":"t","notes":"n","scenarios":["material=gaas&dims=3&lx=10nm"],"created":"2025-01-02T03:04:05.123Z"}}`))
	f.Add([]byte(`{"format":"ringbox-review","version":2}`))
	f.Add([]byte(`{"format":"ringbox-review","version":1,"review":{"title":"\u00e9","scenarios":["a","b"],"created":"2000-01-01T00:00:00+14:00"}}`))
	f.Add([]byte(`{"format":"ringbox-review","version":1,"review":null}`))
	f.Add([]byte(`[1,2,3]`))
	f.Add([]byte(``))

	s, _ := openTemp(f)
	ctx := context.Background()
	f.Fuzz(func(t *testing.T, doc []byte) {
		r, err := s.Import(ctx, doc)
		if err != nil {
			if !errors.Is(err, ErrInvalid) {
				t.Fatalf("Import error %v is not ErrInvalid", err)
			}
			return
		}
		if verr := r.Validate(); verr != nil {
			t.Fatalf("Import accepted an invalid review: %v", verr)
		}
		out, err := s.Export(ctx, r.ID)
		if err != nil {
			t.Fatal(err)
		}
		again, err := ParseDocument(out)
		if err != nil {
			t.Fatalf("re-import of our own export: %v\n%s", err, out)
		}
		again.ID = r.ID
		if !equalReview(again, r) {
			t.Fatalf("round trip changed the review:\n%+v\n%+v", again, r)
		}
	})
}
