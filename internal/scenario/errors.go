// Package scenario is ringbox's request model: it reads the keys shared by
// the web form, the URL query, the CLI flags and the JSON API, validates
// them, encodes them canonically and runs the engines on them.
package scenario

import (
	"errors"
	"fmt"
)

// Code classifies an error so each front end can map it once (to an HTTP
// status or a CLI exit code).
type Code int

const (
	// Invalid marks bad user input; it names the offending key.
	Invalid Code = iota + 1
	// TooLarge marks a request whose work would exceed the budget.
	TooLarge
	// Canceled marks a request whose context ended (deadline or client gone).
	Canceled
)

// Error is a user-facing error that names the key (form field, query
// parameter or CLI flag) it concerns.
type Error struct {
	Code Code
	Key  string
	Msg  string
}

func (e *Error) Error() string {
	if e.Key == "" {
		return e.Msg
	}
	return e.Key + ": " + e.Msg
}

// Errorf returns an Invalid error for key.
func Errorf(key, format string, args ...any) error {
	return &Error{Code: Invalid, Key: key, Msg: fmt.Sprintf(format, args...)}
}

// AsError finds a *Error in err's chain.
func AsError(err error) (*Error, bool) {
	var e *Error
	ok := errors.As(err, &e)
	return e, ok
}
