package api

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"time"

	"google.golang.org/genproto/googleapis/rpc/errdetails"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/status"
	"google.golang.org/protobuf/protoadapt"
	"google.golang.org/protobuf/types/known/durationpb"

	"dampfront/jobs"
	"dampfront/model"
)

// ErrorDomain is the ErrorInfo domain of every error the service returns
// (AIP-193).
const ErrorDomain = "dampfront"

// ErrorInfo reasons, UPPER_SNAKE_CASE as AIP-193 asks.
const (
	ReasonInvalidArgument  = "INVALID_ARGUMENT"     // some request fields are bad; see BadRequest
	ReasonJobNotFound      = "JOB_NOT_FOUND"        // no job has the ID
	ReasonJobNotFinished   = "JOB_NOT_FINISHED"     // the front of a queued or running job
	ReasonJobFinished      = "JOB_FINISHED"         // cancelling a job that has already ended
	ReasonEmptyFront       = "EMPTY_FRONT"          // the job's front has no solution to compare with
	ReasonSolutionNotFound = "SOLUTION_NOT_FOUND"   // no solution of the front has the index
	ReasonJobTooLarge      = "JOB_TOO_LARGE"        // population × islands × generations × cases over the limit
	ReasonTooManySetups    = "TOO_MANY_SETUPS"      // setups × cases of one synchronous call over the limit
	ReasonGridTooFine      = "GRID_TOO_FINE"        // a spec's frequency grid over the limit
	ReasonTooManyRoadCases = "TOO_MANY_ROAD_CASES"  // a spec's road cases over the limit
	ReasonServerBusy       = "SERVER_BUSY"          // too many synchronous evaluations at once
	ReasonShuttingDown     = "SHUTTING_DOWN"        // the server is stopping
	ReasonInternal         = "INTERNAL"             // a bug or a storage failure
	ReasonDatabaseDown     = "DATABASE_UNAVAILABLE" // the job database cannot be reached or is full; retry later
)

// fieldProblem is one bad request field, by its path in the request.
type fieldProblem struct {
	Field  string
	Reason string
}

// problems collects the bad fields of a request. Paths are proto field
// paths: lower_snake_case names joined by dots, [i] for list elements and
// ["key"] for map entries.
type problems []fieldProblem

func (p *problems) add(field, format string, args ...any) {
	*p = append(*p, fieldProblem{Field: field, Reason: fmt.Sprintf(format, args...)})
}

// covers reports whether a problem is already recorded at field or at a
// field that contains it, so that one cause is not reported twice.
func (p problems) covers(field string) bool {
	for _, q := range p {
		if field == q.Field || strings.HasPrefix(field, q.Field+".") || strings.HasPrefix(field, q.Field+"[") {
			return true
		}
	}
	return false
}

// mergeModel adds the problems of a model *ValidationError, their paths
// translated to proto paths and then mapped by paths, leaving out any
// that a problem already recorded covers (the same field, or a field
// that contains it). Another error is added at paths("").
func (p *problems) mergeModel(paths pathMapper, err error) {
	if err == nil {
		return
	}
	var ve *model.ValidationError
	if !errors.As(err, &ve) {
		p.add(paths(""), "%v", err)
		return
	}
	before := append(problems(nil), (*p)...)
	for _, q := range ve.Problems {
		pq := protoProblem(q)
		f := paths(pq.Field)
		if !before.covers(f) {
			p.add(f, "%s", pq.Reason)
		}
	}
}

// under maps a path relative to a message to its path in the request.
func under(prefix string) pathMapper {
	return func(path string) string { return joinPath(prefix, path) }
}

// err returns the InvalidArgument status of the problems, or nil.
func (p problems) err() error {
	if len(p) == 0 {
		return nil
	}
	return invalidArgument(p)
}

// joinPath joins a prefix ending in "." (or empty) and a path.
func joinPath(prefix, path string) string {
	if path == "" {
		return strings.TrimSuffix(prefix, ".")
	}
	return prefix + path
}

// String lists the problems: "field: reason; field: reason".
func (p problems) String() string {
	parts := make([]string, len(p))
	for i, q := range p {
		parts[i] = q.Field + ": " + q.Reason
	}
	return strings.Join(parts, "; ")
}

// validationError is the problems as a *model.ValidationError, for
// callers in the same process that want no status.
func (p problems) validationError() error {
	if len(p) == 0 {
		return nil
	}
	ve := &model.ValidationError{}
	for _, q := range p {
		ve.Problems = append(ve.Problems, model.FieldError{Field: q.Field, Reason: q.Reason})
	}
	return ve
}

// invalidArgument is the InvalidArgument status of AIP-193: the message
// lists the problems so that a command-line user sees them, and the
// details are an ErrorInfo and a BadRequest with one violation per field.
func invalidArgument(p problems) error {
	msg := "invalid request: "
	if len(p) > 1 {
		msg = fmt.Sprintf("invalid request, %d problems: ", len(p))
	}
	br := &errdetails.BadRequest{}
	for _, q := range p {
		br.FieldViolations = append(br.FieldViolations, &errdetails.BadRequest_FieldViolation{Field: q.Field, Description: q.Reason})
	}
	return withDetails(codes.InvalidArgument, msg+p.String(), ReasonInvalidArgument, nil, br)
}

// statusError returns a status with the given code and message and an
// ErrorInfo of the service's domain.
func statusError(c codes.Code, msg, reason string, metadata map[string]string) error {
	return withDetails(c, msg, reason, metadata)
}

func withDetails(c codes.Code, msg, reason string, metadata map[string]string, extra ...protoadapt.MessageV1) error {
	info := &errdetails.ErrorInfo{Reason: reason, Domain: ErrorDomain, Metadata: metadata}
	st, err := status.New(c, msg).WithDetails(append([]protoadapt.MessageV1{info}, extra...)...)
	if err != nil {
		// Only a detail that does not marshal fails here, which would be
		// a bug; the status without details still has the right code.
		return status.Error(c, msg)
	}
	return st.Err()
}

// resourceExhausted is ResourceExhausted with an ErrorInfo and, when
// retry > 0, a RetryInfo saying when to try again.
func resourceExhausted(reason, msg string, metadata map[string]string, retry time.Duration) error {
	if retry > 0 {
		return withDetails(codes.ResourceExhausted, msg, reason, metadata, &errdetails.RetryInfo{RetryDelay: durationpb.New(retry)})
	}
	return withDetails(codes.ResourceExhausted, msg, reason, metadata)
}

// pathMapper turns a field path of a lower layer into the request's path.
type pathMapper func(string) string

// toStatus maps an error of the model, the optimiser or the job engine to
// a status with a canonical code; a status passes through unchanged.
// paths maps the field paths of the engine's and optimiser's input errors
// to request paths (nil keeps them).
func toStatus(err error, paths pathMapper) error {
	if err == nil {
		return nil
	}
	if _, ok := status.FromError(err); ok {
		return err
	}
	if paths == nil {
		paths = func(s string) string { return s }
	}
	var (
		ia *jobs.InvalidArgumentError
		nf *jobs.NotFoundError
		pe *jobs.PreconditionError
		ve *model.ValidationError
	)
	switch {
	case errors.As(err, &ia):
		var p problems
		for _, v := range ia.Violations {
			p.add(paths(v.Field), "%s", v.Reason)
		}
		return invalidArgument(p)
	case errors.As(err, &ve):
		var p problems
		for _, q := range ve.Problems {
			pq := protoProblem(q)
			p.add(paths(pq.Field), "%s", pq.Reason)
		}
		return invalidArgument(p)
	case errors.As(err, &nf):
		return statusError(codes.NotFound,
			fmt.Sprintf("%s %q not found; list the jobs to see their IDs", nf.Resource, nf.ID),
			ReasonJobNotFound, map[string]string{"job_id": nf.ID})
	case errors.As(err, &pe):
		reason := ReasonJobNotFinished
		if pe.State.Terminal() {
			reason = ReasonJobFinished
		}
		return statusError(codes.FailedPrecondition,
			fmt.Sprintf("job %q is %s: %s", pe.ID, stateToProto(pe.State).display(), pe.Reason),
			reason, map[string]string{"job_id": pe.ID, "state": string(pe.State)})
	case errors.Is(err, jobs.ErrNotFound):
		return statusError(codes.NotFound, err.Error(), ReasonJobNotFound, nil)
	case errors.Is(err, jobs.ErrFailedPrecondition):
		return statusError(codes.FailedPrecondition, err.Error(), ReasonJobNotFinished, nil)
	case errors.Is(err, context.Canceled):
		return status.Error(codes.Canceled, "the request was cancelled")
	case errors.Is(err, context.DeadlineExceeded):
		return status.Error(codes.DeadlineExceeded, "the request's deadline passed")
	}
	if jobs.IsUnavailable(err) {
		// The driver's text can name the database's user, host and port:
		// it stays in the server's log, not in the answer.
		return statusError(codes.Unavailable, "the job database is unavailable (unreachable, restarting or full); nothing was changed, retry later",
			ReasonDatabaseDown, nil)
	}
	return statusError(codes.Internal, "internal error: "+err.Error(), ReasonInternal, nil)
}
