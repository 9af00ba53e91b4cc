package calc

import (
	"errors"
	"fmt"
)

// Error is a calc error at a position in a block: 1-based line and column (in
// characters) and what went wrong or what was expected. Err, when set, is the underlying
// error (for example a *quantity.DimError or quantity.ErrUnknownUnit) so callers can
// branch on it with errors.Is and errors.As.
type Error struct {
	Line, Col int
	Msg       string
	Err       error
}

func (e *Error) Error() string {
	msg := e.Msg
	if msg == "" && e.Err != nil {
		msg = e.Err.Error()
	}
	return fmt.Sprintf("%d:%d: %s", e.Line, e.Col, msg)
}

func (e *Error) Unwrap() error { return e.Err }

// Sentinel errors wrapped by *Error.
var (
	ErrUnknownName     = errors.New("unknown name")
	ErrUnknownFunction = errors.New("unknown function")
	ErrArgument        = errors.New("bad argument")
	ErrType            = errors.New("wrong type")
	ErrPath            = errors.New("path not allowed")
	ErrTooDeep         = errors.New("expression nested too deeply")
	ErrTooLarge        = errors.New("calc line too large")
	ErrNotFinite       = errors.New("result not a finite number")
)

// ArgError lets a function point an error at one of its arguments (index into args);
// the evaluator turns it into an *Error at that argument's position.
type ArgError struct {
	Arg int
	Err error
}

func (e *ArgError) Error() string { return e.Err.Error() }
func (e *ArgError) Unwrap() error { return e.Err }
