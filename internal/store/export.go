package store

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"
	"time"
)

// The export document, one JSON object:
//
//	{"format": "ringbox-review", "version": 1,
//	 "review": {"id": 7, "title": "…", "notes": "…",
//	            "scenarios": ["material=gaas&dims=3&lx=10nm", …],
//	            "created": "2026-03-01T09:30:00.123456789Z"}}
//
// created is RFC 3339 (encoding/json's time.Time form). On import the id is
// ignored (the review gets a new one) and everything else is kept.
const (
	DocFormat  = "ringbox-review"
	DocVersion = 1
	// MaxDocument bounds an import. The largest valid review exports to
	// about 330 kB even if a writer escapes every character of notes and
	// scenarios as \u00XX (6 bytes each), so 1 MiB leaves room for
	// indentation without letting a client make the server buffer more.
	MaxDocument = 1 << 20
)

// maxFutureSkew is how far in the future an imported creation time may lie
// (clocks of colleagues' machines disagree a little; a year 9999 date would
// pin a review to the top of every list).
const maxFutureSkew = 24 * time.Hour

// earliestCreated is the earliest creation time Import accepts.
var earliestCreated = time.Date(1970, 1, 1, 0, 0, 0, 0, time.UTC)

type document struct {
	Format  string  `json:"format"`
	Version int     `json:"version"`
	Review  *Review `json:"review"`
}

// Export returns the review with the given id as one JSON document (see
// DocFormat), or ErrNotFound.
func (s *Store) Export(ctx context.Context, id int64) ([]byte, error) {
	r, err := s.Get(ctx, id)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	// The document is a file for people to keep; "&" in scenarios stays
	// readable. It is data, never embedded in HTML.
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	if err := enc.Encode(document{Format: DocFormat, Version: DocVersion, Review: &r}); err != nil {
		return nil, fmt.Errorf("store: export %d: %w", id, err)
	}
	return buf.Bytes(), nil
}

// Import checks an export document (format, version, limits; unknown
// fields and trailing data are refused) and stores its review as a new
// review, keeping title, notes, scenarios and creation time. Bad documents
// return a *FieldError wrapping ErrInvalid.
func (s *Store) Import(ctx context.Context, doc []byte) (Review, error) {
	r, err := ParseDocument(doc)
	if err != nil {
		return Review{}, err
	}
	if s.readOnly {
		return Review{}, ErrReadOnly
	}
	return s.insert(ctx, r)
}

// ParseDocument decodes and checks an export document without storing it.
// The returned review has ID 0.
func ParseDocument(doc []byte) (Review, error) {
	if len(doc) > MaxDocument {
		return Review{}, invalid("document", "larger than %d bytes", MaxDocument)
	}
	// Format and version first, leniently, so a document from a newer
	// ringbox is reported as such and not as an unknown field.
	var head struct {
		Format  *string         `json:"format"`
		Version json.RawMessage `json:"version"`
	}
	if err := json.Unmarshal(doc, &head); err != nil {
		return Review{}, invalid("document", "not a JSON object: %s", jsonReason(err))
	}
	if head.Format == nil || *head.Format != DocFormat {
		return Review{}, invalid("format", "not a %s document", DocFormat)
	}
	var version int
	if err := json.Unmarshal(head.Version, &version); err != nil {
		return Review{}, invalid("version", "must be an integer")
	}
	if version != DocVersion {
		return Review{}, invalid("version", "unsupported version %d (this build reads %d)", version, DocVersion)
	}

	var d document
	dec := json.NewDecoder(bytes.NewReader(doc))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&d); err != nil {
		return Review{}, decodeError(err)
	}
	if _, err := dec.Token(); !errors.Is(err, io.EOF) {
		return Review{}, invalid("document", "data after the JSON object")
	}
	if d.Review == nil {
		return Review{}, invalid("review", "missing")
	}
	r := *d.Review
	r.ID = 0
	if err := r.Validate(); err != nil {
		return Review{}, err
	}
	switch {
	case r.Created.IsZero():
		return Review{}, invalid("created", "missing")
	case r.Created.Before(earliestCreated):
		return Review{}, invalid("created", "before %d", earliestCreated.Year())
	case r.Created.After(time.Now().Add(maxFutureSkew)):
		return Review{}, invalid("created", "in the future")
	}
	r.Created = r.Created.UTC()
	return r, nil
}

// decodeError turns a strict decoding error into a FieldError naming the
// review field when encoding/json tells which one.
func decodeError(err error) error {
	var te *json.UnmarshalTypeError
	if errors.As(err, &te) && te.Field != "" {
		return invalid(docField(te.Field), "wrong JSON type %s", te.Value)
	}
	if msg := err.Error(); strings.HasPrefix(msg, "json: unknown field ") {
		return invalid("document", "unknown field %s", strings.TrimPrefix(msg, "json: unknown field "))
	}
	var pe *time.ParseError
	if errors.As(err, &pe) {
		return invalid("created", "not an RFC 3339 time")
	}
	return invalid("document", "%s", jsonReason(err))
}

// docField maps a JSON path of the document to the field names of the web
// form ("review.scenarios" is the repeated form field "s").
func docField(path string) string {
	switch f := strings.TrimPrefix(path, "review."); {
	case strings.HasPrefix(f, "scenarios"):
		return "s"
	case f == "title", f == "notes", f == "created", f == "id", f == "format", f == "version", f == "review":
		return f
	default:
		return "document"
	}
}

// jsonReason shortens encoding/json's messages for users.
func jsonReason(err error) string {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		return fmt.Sprintf("syntax error at byte %d", se.Offset)
	}
	if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) {
		return "unexpected end of input"
	}
	return strings.TrimPrefix(err.Error(), "json: ")
}
