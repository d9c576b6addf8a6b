package store

import (
	"errors"
	"fmt"
)

var (
	// ErrInvalid marks user input the store refuses (a limit exceeded, an
	// empty title, a malformed import document). It is always wrapped in a
	// *FieldError that names the field.
	ErrInvalid = errors.New("invalid review")

	// ErrNotFound is returned when no review has the requested id.
	ErrNotFound = errors.New("review not found")

	// ErrReadOnly is returned by every write on a store opened with
	// Options.ReadOnly.
	ErrReadOnly = errors.New("store is read-only")

	// ErrSchemaTooNew is returned by Open for a database written by a newer
	// ringbox, whose schema this build does not know.
	ErrSchemaTooNew = errors.New("database schema is newer than this program")

	// ErrNotRingbox is returned by Open for an SQLite file that belongs to
	// some other application.
	ErrNotRingbox = errors.New("not a ringbox database")

	// ErrExists is returned by Backup when the target path already exists.
	ErrExists = errors.New("backup target already exists")
)

// FieldError is bad user input for one field. Field uses the names of the
// web form and the JSON document ("title", "notes", "s" for scenarios,
// "created", "format", "version", "document"); Index is the position of the
// offending scenario for Field "s", and -1 otherwise.
type FieldError struct {
	Field string
	Index int
	Msg   string
}

func (e *FieldError) Error() string {
	if e.Index >= 0 {
		return fmt.Sprintf("%s[%d]: %s", e.Field, e.Index, e.Msg)
	}
	return e.Field + ": " + e.Msg
}

// Unwrap makes errors.Is(err, ErrInvalid) true for every FieldError.
func (e *FieldError) Unwrap() error { return ErrInvalid }

func invalid(field, format string, args ...any) error {
	return &FieldError{Field: field, Index: -1, Msg: fmt.Sprintf(format, args...)}
}

func invalidAt(field string, index int, format string, args ...any) error {
	return &FieldError{Field: field, Index: index, Msg: fmt.Sprintf(format, args...)}
}
