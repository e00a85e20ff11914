package api

import (
	"context"
	"errors"
	"fmt"
	"time"

	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/status"
)

// DefaultRPCTimeout is the default of Options.RPCTimeout: twice the
// client's default time limit of one call, well past the largest
// EvaluateSetups the default MaxSyncWork allows on two cores.
const DefaultRPCTimeout = 2 * time.Minute

// ReasonCallTimedOut is the ErrorInfo reason of a unary call cut at the
// server's RPCTimeout.
const ReasonCallTimedOut = "CALL_TIMED_OUT"

// rpcTimeout is the bound of one unary call, or 0 for none.
func (o Options) rpcTimeout() time.Duration {
	switch {
	case o.RPCTimeout == 0:
		return DefaultRPCTimeout
	case o.RPCTimeout < 0:
		return 0
	}
	return o.RPCTimeout
}

// deadlineUnary bounds a unary call by the server's RPCTimeout, or by
// the client's deadline when that is sooner. A call cut by the server's
// bound ends with DeadlineExceeded saying so. Streams (WatchJob) are not
// bounded: a watch lasts as long as its job.
func (s *Server) deadlineUnary(ctx context.Context, req any, _ *grpc.UnaryServerInfo, handler grpc.UnaryHandler) (any, error) {
	d := s.opt.rpcTimeout()
	if d <= 0 {
		return handler(ctx, req)
	}
	cctx, cancel := context.WithTimeout(ctx, d)
	defer cancel()
	resp, err := handler(cctx, req)
	if err != nil && errors.Is(cctx.Err(), context.DeadlineExceeded) && ctx.Err() == nil && cutShort(err) {
		return nil, statusError(codes.DeadlineExceeded,
			fmt.Sprintf("the call ran past the server's limit of %v per call; ask for less at once (fewer setups, smaller pages)", d),
			ReasonCallTimedOut, map[string]string{"limit": d.String()})
	}
	return resp, err
}

// cutShort reports whether err is what a handler returns when its
// context ends under it: DeadlineExceeded, or an error of a lower layer
// that gave up (Canceled, Unknown, Internal, Unavailable).
func cutShort(err error) bool {
	switch status.Code(err) {
	case codes.DeadlineExceeded, codes.Canceled, codes.Unknown, codes.Internal, codes.Unavailable:
		return true
	}
	return false
}
