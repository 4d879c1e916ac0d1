package bc

import (
	"errors"
	"fmt"
)

// ErrInput is wrapped by every error this package returns for bad input
// (an unphysical value, a missing or unknown tag, a contradictory choice).
// Callers map errors.Is(err, ErrInput) to the "bad input" exit code.
var ErrInput = errors.New("bad input")

// Error is one validation failure. Where is the case-file place (for example
// "case.yaml:12:5") and Tag the boundary tag it concerns; either may be empty.
type Error struct {
	Where string
	Tag   string
	Msg   string
}

// Error formats the failure as "where: boundary tag "t": msg".
func (e *Error) Error() string {
	s := ""
	if e.Where != "" {
		s = e.Where + ": "
	}
	if e.Tag != "" {
		s += fmt.Sprintf("boundary tag %q: ", e.Tag)
	}
	return s + e.Msg
}

// Unwrap returns ErrInput, so errors.Is(err, ErrInput) holds.
func (e *Error) Unwrap() error { return ErrInput }

// inputErr builds an *Error with a formatted message.
func inputErr(where, tag, format string, args ...any) error {
	return &Error{Where: where, Tag: tag, Msg: fmt.Sprintf(format, args...)}
}
