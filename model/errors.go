package model

import (
	"errors"
	"fmt"
	"math"
	"strings"
)

// FieldError is one input problem, tied to the path of the field that has
// it, in the lower_snake_case names the API uses (for example
// "vehicle.corners[2].tyre_rate_n_per_m").
type FieldError struct {
	Field  string // path of the field
	Reason string // what is wrong and what is expected
}

func (e FieldError) Error() string { return e.Field + ": " + e.Reason }

// ValidationError lists every problem found in an input, not only the first.
// The API maps it to InvalidArgument with one field violation per entry.
type ValidationError struct {
	Problems []FieldError
}

func (e *ValidationError) Error() string {
	var b strings.Builder
	b.WriteString("invalid input: ")
	for i, p := range e.Problems {
		if i > 0 {
			b.WriteString("; ")
		}
		b.WriteString(p.Error())
	}
	return b.String()
}

// ErrNoConvergence is wrapped by the error returned when the statistical
// linearisation does not reach its fixed point.
var ErrNoConvergence = errors.New("model: statistical linearisation did not converge")

// ErrUnstable is wrapped by the error returned when the linear system has a
// non-positive stiffness (for example an aero stiffness larger than the
// suspension's) and so has no stationary response.
var ErrUnstable = errors.New("model: linear system is not stable")

// problems collects field errors while validating.
type problems struct {
	list []FieldError
}

func (p *problems) add(field, format string, args ...any) {
	p.list = append(p.list, FieldError{Field: field, Reason: fmt.Sprintf(format, args...)})
}

// finite reports a NaN or infinite value.
func (p *problems) finite(field string, v float64) bool {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		p.add(field, "must be a finite number, got %v", v)
		return false
	}
	return true
}

// positive requires a finite value > 0.
func (p *problems) positive(field string, v float64) {
	if p.finite(field, v) && v <= 0 {
		p.add(field, "must be > 0, got %g", v)
	}
}

// nonNegative requires a finite value >= 0.
func (p *problems) nonNegative(field string, v float64) {
	if p.finite(field, v) && v < 0 {
		p.add(field, "must be >= 0, got %g", v)
	}
}

// table requires every value of a tabulated input in the named
// plausible range, and increasing when increasing is set; it reports the
// first bad value only, so that a long table gives one line.
func (p *problems) table(field string, vs []float64, name string, increasing bool) {
	l := limit(name)
	for i, v := range vs {
		f := fmt.Sprintf("%s[%d]", field, i)
		switch {
		case !l.Contains(v):
			p.add(f, "must be finite and in %s, got %s%s", l, num(v), l.hint(v))
		case increasing && i > 0 && v <= vs[i-1]:
			p.add(f, "must be increasing, got %s after %s", num(v), num(vs[i-1]))
		default:
			continue
		}
		return
	}
}

// merge adds the problems of a nested validation under a prefix.
func (p *problems) merge(prefix string, err error) {
	if err == nil {
		return
	}
	var ve *ValidationError
	if errors.As(err, &ve) {
		for _, q := range ve.Problems {
			p.list = append(p.list, FieldError{Field: prefix + q.Field, Reason: q.Reason})
		}
		return
	}
	p.add(strings.TrimSuffix(prefix, "."), "%v", err)
}

func (p *problems) err() error {
	if len(p.list) == 0 {
		return nil
	}
	return &ValidationError{Problems: p.list}
}
