package api

import (
	"testing"
	"time"

	"google.golang.org/grpc/codes"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestRPCTimeoutDefaults: zero takes the default, negative turns the
// bound off, a positive value is kept.
func TestRPCTimeoutDefaults(t *testing.T) {
	t.Parallel()
	tests := []struct {
		in, want time.Duration
	}{
		{0, DefaultRPCTimeout},
		{-1, 0},
		{5 * time.Second, 5 * time.Second},
	}
	for _, tt := range tests {
		if got := (Options{RPCTimeout: tt.in}).rpcTimeout(); got != tt.want {
			t.Errorf("rpcTimeout of %v = %v, want %v", tt.in, got, tt.want)
		}
	}
}

// TestRPCTimeoutCutsUnaryCallsOnly: with a bound of a nanosecond, spent
// before any handler reads the database, a unary call ends with the
// server's DeadlineExceeded, whatever the client's deadline (a minute
// here); WatchJob is not bounded, so its stream reaches the database and
// answers NotFound for the unknown job.
func TestRPCTimeoutCutsUnaryCallsOnly(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{RPCTimeout: time.Nanosecond})
	const unknown = "jobs/0123456789abcdef01234567"
	_, err := b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: unknown})
	wantCode(t, "GetJob past the server's bound", err, codes.DeadlineExceeded, ReasonCallTimedOut)

	st, err := b.client.WatchJob(testContext(t), &pb.WatchJobRequest{Name: unknown})
	if err != nil {
		t.Fatal(err)
	}
	_, err = st.Recv()
	wantCode(t, "WatchJob of an unknown job", err, codes.NotFound, ReasonJobNotFound)
}
