package jobs

import (
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors. Every error value this package returns for a caller's
// mistake or a missing resource wraps exactly one of them, so the API layer
// maps them to canonical codes with errors.Is:
//
//	ErrInvalidArgument    -> InvalidArgument (with the field paths of *InvalidArgumentError)
//	ErrNotFound           -> NotFound
//	ErrFailedPrecondition -> FailedPrecondition
//	ErrAlreadyExists      -> AlreadyExists
var (
	ErrInvalidArgument    = errors.New("jobs: invalid argument")
	ErrNotFound           = errors.New("jobs: not found")
	ErrFailedPrecondition = errors.New("jobs: failed precondition")
	ErrAlreadyExists      = errors.New("jobs: already exists")
)

// errLeaseLost is returned by a store write that carries a lease which is no
// longer the job's current one: another slice run has taken the job over
// (after a rescue), and the stale run must stop without writing anything.
var errLeaseLost = fmt.Errorf("%w: lease lost to a newer slice run", ErrFailedPrecondition)

// FieldError is one bad input field. Field is a path in lower_snake_case
// as the API names it, e.g. "page_size" or `labels["team"]`.
type FieldError struct {
	Field  string
	Reason string
}

// InvalidArgumentError lists every bad field of one request.
type InvalidArgumentError struct {
	Violations []FieldError
}

func (e *InvalidArgumentError) Error() string {
	var b strings.Builder
	b.WriteString("jobs: invalid argument: ")
	for i, v := range e.Violations {
		if i > 0 {
			b.WriteString("; ")
		}
		b.WriteString(v.Field)
		b.WriteString(": ")
		b.WriteString(v.Reason)
	}
	return b.String()
}

// Is reports ErrInvalidArgument.
func (e *InvalidArgumentError) Is(target error) bool { return target == ErrInvalidArgument }

// violations collects field errors while a request is checked.
type violations []FieldError

func (v *violations) add(field, format string, args ...any) {
	*v = append(*v, FieldError{Field: field, Reason: fmt.Sprintf(format, args...)})
}

// err returns nil when nothing was added.
func (v violations) err() error {
	if len(v) == 0 {
		return nil
	}
	return &InvalidArgumentError{Violations: v}
}

// NotFoundError says which resource is missing.
type NotFoundError struct {
	Resource string // "job"
	ID       string
}

func (e *NotFoundError) Error() string {
	return fmt.Sprintf("jobs: %s %q not found", e.Resource, e.ID)
}

// Is reports ErrNotFound.
func (e *NotFoundError) Is(target error) bool { return target == ErrNotFound }

// PreconditionError says why an operation does not apply to a job in its
// present state, e.g. the front of a job that is still running.
type PreconditionError struct {
	ID     string
	State  State
	Reason string
}

func (e *PreconditionError) Error() string {
	return fmt.Sprintf("jobs: job %q is %s: %s", e.ID, e.State, e.Reason)
}

// Is reports ErrFailedPrecondition.
func (e *PreconditionError) Is(target error) bool { return target == ErrFailedPrecondition }
