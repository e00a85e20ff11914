package optimizer

import "errors"

// FieldError reports an input problem and names the field it is in, for
// example "Settings.PopulationSize" or "Problem.Bounds[2]".
type FieldError struct {
	Field string // dotted path of the offending field
	Msg   string // what is wrong and what was given
}

func (e *FieldError) Error() string { return "optimizer: " + e.Field + ": " + e.Msg }

// ErrCheckpoint is wrapped by every error about checkpoint bytes that cannot
// be read: wrong magic, unknown version, truncation, bad checksum.
var ErrCheckpoint = errors.New("optimizer: invalid checkpoint")

// ErrShape is the panic value for slices of mismatched lengths passed to
// the exported helpers; it is a programmer error, not a data problem.
var ErrShape = errors.New("optimizer: dimension mismatch")
