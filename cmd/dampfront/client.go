package main

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"time"

	"google.golang.org/genproto/googleapis/rpc/errdetails"
	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/grpc/status"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/model"
)

// defaultAddr is where serve listens and clients connect unless told.
const defaultAddr = "127.0.0.1:7403"

// clientFlags are the flags every client subcommand shares.
type clientFlags struct {
	addr    string
	timeout time.Duration
	sec     *clientSecurityFlags // TLS and bearer token, auth.go
}

func addClientFlags(fs *flagSet, e *env) *clientFlags {
	c := &clientFlags{}
	fs.StringVar(&c.addr, "addr", envOr(e, "DAMPFRONT_ADDR", defaultAddr), "server address host:port ($DAMPFRONT_ADDR)")
	fs.DurationVar(&c.timeout, "timeout", 60*time.Second, "time limit of each call to the server")
	c.sec = addClientSecurityFlags(fs, e)
	return c
}

// client is a connection to a dampfront server.
type client struct {
	conn    *grpc.ClientConn
	svc     pb.DampfrontServiceClient
	timeout time.Duration
}

// dial connects to addr with opts, or without TLS and token when none
// are given (the demo's own loopback server).
func dial(addr string, timeout time.Duration, opts ...grpc.DialOption) (*client, error) {
	if len(opts) == 0 {
		opts = []grpc.DialOption{grpc.WithTransportCredentials(insecure.NewCredentials())}
	}
	conn, err := grpc.NewClient(addr, opts...)
	if err != nil {
		return nil, fmt.Errorf("connect to %s: %w", addr, err)
	}
	return &client{conn: conn, svc: pb.NewDampfrontServiceClient(conn), timeout: timeout}, nil
}

// dial connects with the flags' TLS and token.
func (c *clientFlags) dial() (*client, error) {
	opts, err := c.sec.dialOptions(c.addr)
	if err != nil {
		return nil, err
	}
	return dial(c.addr, c.timeout, opts...)
}

func (c *client) Close() error { return c.conn.Close() }

// unary makes one unary call of the service, bounded by the client's
// timeout.
func unary[Q, R any](ctx context.Context, c *client, call func(context.Context, Q, ...grpc.CallOption) (R, error), req Q) (R, error) {
	cctx, cancel := c.call(ctx)
	defer cancel()
	return call(cctx, req)
}

// call bounds one unary call by the client's timeout.
func (c *client) call(ctx context.Context) (context.Context, context.CancelFunc) {
	if c.timeout <= 0 {
		return context.WithCancel(ctx)
	}
	return context.WithTimeout(ctx, c.timeout)
}

// jobName turns a bare job ID into the resource name "jobs/{id}".
func jobName(id string) string {
	if strings.HasPrefix(id, "jobs/") {
		return id
	}
	return "jobs/" + id
}

// jobID is the inverse of jobName.
func jobID(name string) string { return strings.TrimPrefix(name, "jobs/") }

// describeError renders an error for the terminal; a gRPC status shows its
// code, message and every field violation of a BadRequest detail, one a
// line.
func describeError(err error) string {
	var src api.TextSources
	if l := (*located)(nil); errors.As(err, &l) {
		src, err = l.src, l.err // a wrapped status would carry the wrapper's text as its message
	}
	st, ok := status.FromError(err)
	if !ok {
		return err.Error()
	}
	var b strings.Builder
	var fields []*errdetails.BadRequest_FieldViolation
	for _, d := range st.Details() {
		if br, ok := d.(*errdetails.BadRequest); ok {
			fields = append(fields, br.GetFieldViolations()...)
		}
	}
	switch {
	case st.Code() == codes.Unavailable:
		fmt.Fprintf(&b, "server unavailable: %s", st.Message())
		if strings.Contains(st.Message(), "server preface") {
			// A TLS server closes a plaintext connection before its preface.
			b.WriteString("\n  if the server serves TLS, connect with --tls-ca FILE (its CA certificate) or --tls (the system's CAs)")
		}
	case len(fields) > 0 && strings.Contains(st.Message(), fields[0].GetDescription()):
		// The message repeats the violations listed below.
		fmt.Fprintf(&b, "%s: %d bad fields", codeName(st.Code()), len(fields))
	default:
		fmt.Fprintf(&b, "%s: %s", codeName(st.Code()), st.Message())
	}
	for _, v := range fields {
		b.WriteString("\n  ")
		if at, ok := src.Locate(v.GetField()); ok {
			b.WriteString(at + ": ")
		}
		fmt.Fprintf(&b, "%s: %s", v.GetField(), v.GetDescription())
	}
	for _, d := range st.Details() {
		switch d := d.(type) {
		case *errdetails.PreconditionFailure:
			for _, v := range d.GetViolations() {
				fmt.Fprintf(&b, "\n  %s %s: %s", v.GetType(), v.GetSubject(), v.GetDescription())
			}
		}
	}
	return b.String()
}

// codeName spells a code in words: InvalidArgument -> "invalid argument".
func codeName(c codes.Code) string {
	var b strings.Builder
	for i, r := range c.String() {
		if r >= 'A' && r <= 'Z' {
			if i > 0 {
				b.WriteByte(' ')
			}
			r += 'a' - 'A'
		}
		b.WriteRune(r)
	}
	return b.String()
}

// isCode reports whether err is a gRPC status with code c.
func isCode(err error, c codes.Code) bool {
	var se interface{ GRPCStatus() *status.Status }
	if !errors.As(err, &se) {
		return false
	}
	return se.GRPCStatus().Code() == c
}

// inputError reports whether err says the request itself was wrong (bad
// input, unknown job, job in the wrong state): exit code 2 where a
// subcommand tells input errors from failures.
func inputError(err error) bool {
	var ia *jobs.InvalidArgumentError
	if errors.As(err, &ia) {
		return true // a bad engine setting, such as the database URL
	}
	var ve *model.ValidationError
	if errors.As(err, &ve) {
		return true // a bad spec or setup checked in this process
	}
	for _, c := range []codes.Code{codes.InvalidArgument, codes.NotFound, codes.FailedPrecondition, codes.OutOfRange} {
		if isCode(err, c) {
			return true
		}
	}
	return false
}
