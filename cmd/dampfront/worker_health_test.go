package main

import (
	"context"
	"net"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials/insecure"
	healthpb "google.golang.org/grpc/health/grpc_health_v1"
	"google.golang.org/grpc/status"

	pb "dampfront/api/gen/dampfront/v1"
)

// The worker's --health-addr (worker_health.go), against the real binary
// on a SQLite file and 127.0.0.1: SERVING for "" while it works, only
// the health service behind the port, NOT_SERVING from SIGTERM on, exit
// code 0, and the port closed after the exit. The statuses are those of
// the gRPC health checking protocol
// (github.com/grpc/grpc/blob/master/doc/health-checking.md).
func TestWorkerHealth(t *testing.T) {
	t.Parallel()
	tests := []struct {
		name    string
		fromEnv bool // the address from $DAMPFRONT_HEALTH_ADDR, else --health-addr
		// withJob keeps a job running on the worker when SIGTERM comes, so
		// that its stop takes a generation and a checkpoint write: then
		// NOT_SERVING must reach an open Watch before the listener closes.
		// An idle worker may close it first, so either answer is right.
		withJob bool
	}{
		{name: "flag, idle", fromEnv: false, withJob: false},
		{name: "env, mid-job", fromEnv: true, withJob: true},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			db := filepath.Join(t.TempDir(), "health.db")
			addr := "127.0.0.1:" + strconv.Itoa(freePort(t))
			var env, args []string
			if tt.fromEnv {
				env = append(env, "DAMPFRONT_HEALTH_ADDR="+addr)
			} else {
				args = append(args, "--health-addr", addr)
			}
			// No checkpoint but the one of the stop: the interval and the
			// slice outlast the test.
			args = append(args, "--checkpoint-interval", "10m", "--slice", "10m", "--stop-timeout", "20s")
			var s *server
			if tt.withJob {
				s = startServer(t, db, nil, "--workers", "0")
			}
			w := startWorker(t, db, "health-"+strings.ReplaceAll(tt.name, ", ", "-"), env, args...)
			if !strings.Contains(w.logs.String(), "health="+addr) {
				t.Errorf("the worker's start does not log health=%s:\n%s", addr, w.logs.String())
			}

			conn, err := grpc.NewClient(addr, grpc.WithTransportCredentials(insecure.NewCredentials()))
			if err != nil {
				t.Fatal(err)
			}
			defer conn.Close()
			ctx, cancel := context.WithTimeout(context.Background(), commandTimeout+serverStop)
			defer cancel()
			hc := healthpb.NewHealthClient(conn)
			resp, err := hc.Check(ctx, &healthpb.HealthCheckRequest{})
			if err != nil || resp.GetStatus() != healthpb.HealthCheckResponse_SERVING {
				t.Fatalf("health of \"\" while working: %v, %v; want SERVING", resp.GetStatus(), err)
			}
			// The health service alone: no API on this port, and no other
			// service name known to it.
			if _, err := pb.NewDampfrontServiceClient(conn).ListJobs(ctx, &pb.ListJobsRequest{}); status.Code(err) != codes.Unimplemented {
				t.Errorf("ListJobs on the health port: %v, want Unimplemented", err)
			}
			if _, err := hc.Check(ctx, &healthpb.HealthCheckRequest{Service: pb.DampfrontService_ServiceDesc.ServiceName}); status.Code(err) != codes.NotFound {
				t.Errorf("health of %s on the worker: %v, want NotFound", pb.DampfrontService_ServiceDesc.ServiceName, err)
			}

			var id string
			var at int32
			if tt.withJob {
				spec := writeSpec(t, "generations: 30", "generations: 2000")
				id = firstLine(mustRun(t, exitOK, nil, s.client("submit", spec)...).stdout)
				at = waitGeneration(t, s, id, 3).GetProgress().GetGeneration()
			}

			watch, err := hc.Watch(ctx, &healthpb.HealthCheckRequest{})
			if err != nil {
				t.Fatal(err)
			}
			if m, err := watch.Recv(); err != nil || m.GetStatus() != healthpb.HealthCheckResponse_SERVING {
				t.Fatalf("first status of the watch: %v, %v; want SERVING", m.GetStatus(), err)
			}
			exited := w.signal(syscall.SIGTERM)
			m, err := watch.Recv()
			switch {
			case err == nil && m.GetStatus() == healthpb.HealthCheckResponse_NOT_SERVING:
			case err != nil && !tt.withJob && status.Code(err) == codes.Unavailable:
				// An idle worker went away before the update was sent.
			default:
				t.Errorf("after SIGTERM the watch got %v, %v; want NOT_SERVING", m.GetStatus(), err)
			}

			select {
			case <-exited:
			case <-time.After(serverStop):
				t.Fatalf("the worker did not exit within %v of SIGTERM", serverStop)
			}
			if code := w.exitCode(); code != 0 {
				t.Fatalf("the worker exited with code %d after SIGTERM:\n%s", code, w.logs.String())
			}
			// The listener went with the process: the stream ends, and a
			// new connection is refused.
			if m, err := watch.Recv(); err == nil {
				t.Errorf("the watch still delivers %v after the worker exited", m.GetStatus())
			}
			after, err := grpc.NewClient(addr, grpc.WithTransportCredentials(insecure.NewCredentials()))
			if err != nil {
				t.Fatal(err)
			}
			defer after.Close()
			if _, err := healthpb.NewHealthClient(after).Check(ctx, &healthpb.HealthCheckRequest{}); status.Code(err) != codes.Unavailable {
				t.Errorf("health after the worker exited: %v, want Unavailable (nothing listening)", err)
			}

			if tt.withJob {
				// The job was handed back: its checkpoint, the stop's own,
				// is at least where it was when the signal came.
				if c := readCheckpoint(t, db, id); c.Generation < int(at) {
					t.Errorf("checkpoint at generation %d after the stop, the job had reached %d", c.Generation, at)
				}
			}
		})
	}
}

// A --health-addr or --metrics-addr that is not host:port with a numeric port is a usage
// error naming the flag, and one that cannot be listened on fails the
// worker with the flag's name; both before the database is opened.
func TestWorkerHealthAddrErrors(t *testing.T) {
	t.Parallel()
	taken, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { taken.Close() }) // after the parallel subtests, not when this function returns
	tests := []struct {
		name string
		env  []string
		args []string
		code int
		want string // in stderr
	}{
		{"no port", nil, []string{"--health-addr", "127.0.0.1"}, exitUsage, `--health-addr "127.0.0.1" is not host:port`},
		{"port too large", nil, []string{"--health-addr", "127.0.0.1:70000"}, exitUsage, `--health-addr "127.0.0.1:70000": port "70000" is not a number`},
		{"named port", nil, []string{"--health-addr", "127.0.0.1:grpc"}, exitUsage, `port "grpc" is not a number`},
		{"bad env", []string{"DAMPFRONT_HEALTH_ADDR=probe-me"}, nil, exitUsage, `--health-addr "probe-me" is not host:port`},
		{"port taken", nil, []string{"--health-addr", taken.Addr().String()}, exitFailure, "listen on --health-addr " + taken.Addr().String()},
		{"metrics no port", nil, []string{"--metrics-addr", "127.0.0.1"}, exitUsage, `--metrics-addr "127.0.0.1" is not host:port`},
		{"metrics bad env", []string{"DAMPFRONT_METRICS_ADDR=127.0.0.1:x"}, nil, exitUsage, `--metrics-addr "127.0.0.1:x": port "x" is not a number`},
		{"metrics port taken", nil, []string{"--metrics-addr", taken.Addr().String()}, exitFailure, "listen on --metrics-addr " + taken.Addr().String()},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			db := filepath.Join(t.TempDir(), "never.db")
			r := mustRun(t, tt.code, tt.env, append([]string{"worker", "--database", db}, tt.args...)...)
			if !strings.Contains(r.stderr, tt.want) {
				t.Errorf("stderr does not contain %q:\n%s", tt.want, r.stderr)
			}
			if _, err := os.Stat(db); !os.IsNotExist(err) {
				t.Errorf("the database %s was opened (%v); the address is checked first", db, err)
			}
		})
	}
}
