package store

import (
	"context"
	"database/sql"
	"encoding/json"
	"errors"
	"fmt"
	"slices"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"
)

// Limits on a review, enforced by Create and Import (and repeated as CHECK
// constraints in the schema).
const (
	MaxTitle       = 200   // characters (Unicode code points) in a title
	MaxNotes       = 20000 // bytes of UTF-8 in the notes
	MaxScenarios   = 8     // scenarios per review; at least one is required
	MaxScenarioLen = 4096  // bytes in one scenario query string
)

// List limits: a limit ≤ 0 asks for DefaultListLimit, and larger limits
// are cut to MaxListLimit.
const (
	DefaultListLimit = 50
	MaxListLimit     = 500
)

// Review is one saved design review: a titled set of scenarios to compare,
// with the engineer's notes.
type Review struct {
	ID    int64  `json:"id"`
	Title string `json:"title"`
	Notes string `json:"notes"`
	// Scenarios are URL query strings ("material=gaas&dims=3&lx=10nm"),
	// stored verbatim and in order. The web layer checks their physics;
	// the store checks only their count and size.
	Scenarios []string  `json:"scenarios"`
	Created   time.Time `json:"created"` // UTC
}

// timeLayout is how created is stored: fixed width (always nine fraction
// digits, always "Z"), so that comparing the text compares the times. It
// holds years 0000–9999, which is what RFC 3339 can carry.
const timeLayout = "2006-01-02T15:04:05.000000000Z07:00"

// Validate checks r's title, notes and scenarios against the limits and
// returns a *FieldError (wrapping ErrInvalid) for the first field that
// fails. ID and Created are not checked; the store assigns them.
func (r *Review) Validate() error {
	switch {
	case !utf8.ValidString(r.Title):
		return invalid("title", "not valid UTF-8")
	case strings.TrimSpace(r.Title) == "":
		return invalid("title", "must not be empty")
	case utf8.RuneCountInString(r.Title) > MaxTitle:
		return invalid("title", "longer than %d characters", MaxTitle)
	case strings.ContainsFunc(r.Title, unicode.IsControl):
		return invalid("title", "must be one line without control characters")
	}
	switch {
	case !utf8.ValidString(r.Notes):
		return invalid("notes", "not valid UTF-8")
	case len(r.Notes) > MaxNotes:
		return invalid("notes", "longer than %d bytes", MaxNotes)
	case strings.ContainsFunc(r.Notes, badNotesRune):
		return invalid("notes", "contains control characters")
	}
	switch {
	case len(r.Scenarios) == 0:
		return invalid("s", "at least one scenario is required")
	case len(r.Scenarios) > MaxScenarios:
		return invalid("s", "more than %d scenarios", MaxScenarios)
	}
	for i, q := range r.Scenarios {
		switch {
		case q == "":
			return invalidAt("s", i, "empty scenario")
		case len(q) > MaxScenarioLen:
			return invalidAt("s", i, "longer than %d bytes", MaxScenarioLen)
		case !utf8.ValidString(q):
			return invalidAt("s", i, "not valid UTF-8")
		case strings.ContainsFunc(q, badQueryRune):
			return invalidAt("s", i, "a URL query string has no spaces or control characters")
		}
	}
	return nil
}

// badNotesRune reports runes that plain-text notes may not hold: control
// characters other than tab and line breaks.
func badNotesRune(c rune) bool {
	return unicode.IsControl(c) && c != '\t' && c != '\n' && c != '\r'
}

// badQueryRune reports runes that never appear in an encoded query string.
func badQueryRune(c rune) bool { return unicode.IsControl(c) || unicode.IsSpace(c) }

// Create stores r as a new review in one transaction and returns it with
// ID and Created (now, UTC) set. r.ID and r.Created are ignored.
func (s *Store) Create(ctx context.Context, r Review) (Review, error) {
	if err := r.Validate(); err != nil {
		return Review{}, err
	}
	r.Created = time.Now().UTC()
	return s.insert(ctx, r)
}

// insert writes a validated review, keeping r.Created, and returns it with
// its new ID.
func (s *Store) insert(ctx context.Context, r Review) (Review, error) {
	if s.readOnly {
		return Review{}, ErrReadOnly
	}
	r.Created = r.Created.UTC()
	r.Scenarios = slices.Clone(r.Scenarios)

	tx, err := s.w.BeginTx(ctx, nil) // BEGIN IMMEDIATE, see dsn
	if err != nil {
		return Review{}, fmt.Errorf("store: create: %w", err)
	}
	defer tx.Rollback()
	err = tx.QueryRowContext(ctx,
		`INSERT INTO review (title, title_fold, notes, created) VALUES (?, ?, ?, ?) RETURNING id`,
		r.Title, strings.ToLower(r.Title), r.Notes, r.Created.Format(timeLayout)).Scan(&r.ID)
	if err != nil {
		return Review{}, fmt.Errorf("store: create: %w", err)
	}
	for i, q := range r.Scenarios {
		if _, err := tx.ExecContext(ctx,
			`INSERT INTO review_scenario (review_id, position, query) VALUES (?, ?, ?)`,
			r.ID, i, q); err != nil {
			return Review{}, fmt.Errorf("store: create: %w", err)
		}
	}
	if err := tx.Commit(); err != nil {
		return Review{}, fmt.Errorf("store: create: %w", err)
	}
	return r, nil
}

// reviewColumns are a review's columns from a source aliased r, with its
// scenarios in position order as a JSON array, so each read is one
// statement and so one snapshot. (ORDER BY inside an aggregate needs
// SQLite 3.44 or later.)
const reviewColumns = `r.id, r.title, r.notes, r.created,
	(SELECT json_group_array(query ORDER BY position) FROM review_scenario WHERE review_id = r.id)`

// Get returns the review with the given id, or ErrNotFound.
func (s *Store) Get(ctx context.Context, id int64) (Review, error) {
	r, err := scanReview(s.r.QueryRowContext(ctx, `SELECT `+reviewColumns+` FROM review AS r WHERE id = ?`, id))
	if errors.Is(err, sql.ErrNoRows) {
		return Review{}, fmt.Errorf("store: review %d: %w", id, ErrNotFound)
	}
	if err != nil {
		return Review{}, fmt.Errorf("store: get %d: %w", id, err)
	}
	return r, nil
}

// List returns up to limit reviews, newest first (ties by descending id),
// whose titles contain titleQuery, ignoring case; an empty (or all-space)
// titleQuery matches every review. See DefaultListLimit for limit.
func (s *Store) List(ctx context.Context, titleQuery string, limit int) ([]Review, error) {
	if limit <= 0 {
		limit = DefaultListLimit
	}
	limit = min(limit, MaxListLimit)
	pattern := "%" + escapeLike(strings.ToLower(strings.TrimSpace(titleQuery))) + "%"
	rows, err := s.r.QueryContext(ctx,
		// The page is cut first, so scenarios are gathered only for it.
		`SELECT `+reviewColumns+` FROM (
			SELECT id, title, notes, created FROM review
			WHERE title_fold LIKE ? ESCAPE '\' ORDER BY created DESC, id DESC LIMIT ?
		) AS r ORDER BY r.created DESC, r.id DESC`,
		pattern, limit)
	if err != nil {
		return nil, fmt.Errorf("store: list: %w", err)
	}
	defer rows.Close()
	out := []Review{}
	for rows.Next() {
		r, err := scanReview(rows)
		if err != nil {
			return nil, fmt.Errorf("store: list: %w", err)
		}
		out = append(out, r)
	}
	if err := rows.Err(); err != nil {
		return nil, fmt.Errorf("store: list: %w", err)
	}
	return out, nil
}

// scanReview scans one row of reviewColumns.
func scanReview(row interface{ Scan(...any) error }) (Review, error) {
	var r Review
	var created, scenarios string
	if err := row.Scan(&r.ID, &r.Title, &r.Notes, &created, &scenarios); err != nil {
		return Review{}, err
	}
	t, err := time.Parse(time.RFC3339Nano, created)
	if err != nil {
		return Review{}, fmt.Errorf("review %d: stored creation time %q: %w", r.ID, created, err)
	}
	r.Created = t.UTC()
	if err := json.Unmarshal([]byte(scenarios), &r.Scenarios); err != nil {
		return Review{}, fmt.Errorf("review %d: stored scenarios: %w", r.ID, err)
	}
	return r, nil
}

// escapeLike makes s match literally inside a LIKE pattern with ESCAPE '\',
// so a user's "%" or "_" is searched for, not used as a wildcard.
func escapeLike(s string) string {
	return strings.NewReplacer(`\`, `\\`, `%`, `\%`, `_`, `\_`).Replace(s)
}
