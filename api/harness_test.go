package api

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"net"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"

	"google.golang.org/genproto/googleapis/rpc/errdetails"
	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/grpc/status"
	"google.golang.org/grpc/test/bufconn"
	"google.golang.org/protobuf/reflect/protoreflect"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// testTimeout bounds every wait; the jobs these tests run take well under
// a second of compute each.
const testTimeout = 60 * time.Second

// testBundle is a server over a real job engine (SQLite in a temporary
// directory, two workers, short slices and polls) and a client to it.
type testBundle struct {
	engine *jobs.Engine
	server *Server
	client pb.DampfrontServiceClient
	conn   *grpc.ClientConn
}

// engineConfig has slices and polls short enough that a small job
// crosses several slices and checkpoints.
func engineConfig(dir string) jobs.Config {
	return jobs.Config{
		DatabaseURL:        filepath.Join(dir, "jobs.db"),
		Workers:            2,
		SliceDuration:      300 * time.Millisecond,
		SliceGrace:         10 * time.Second,
		RescueMargin:       time.Second,
		CheckpointInterval: 60 * time.Millisecond,
		ProgressInterval:   20 * time.Millisecond,
		CancelPollInterval: 20 * time.Millisecond,
		WatchInterval:      20 * time.Millisecond,
		FetchPollInterval:  20 * time.Millisecond,
		RetryDelay:         50 * time.Millisecond,
		StopTimeout:        5 * time.Second,
		FinalizeTimeout:    5 * time.Second,
		Logger:             slog.New(slog.DiscardHandler),
	}
}

// shortSlices makes slices short enough that a job of a few dozen small
// generations crosses several of them. A slice must outlast a generation
// (the first one includes the initial population), or it ends before
// committing anything; under the race detector a generation takes some
// ten times longer, so the slices stay long there.
func shortSlices(c *jobs.Config) {
	if !raceDetector {
		c.SliceDuration = 50 * time.Millisecond
		c.CheckpointInterval = 20 * time.Millisecond
	}
}

// startEngine opens and starts an engine with the API's opener; mods
// change the configuration first.
func startEngine(t *testing.T, mods ...func(*jobs.Config)) *jobs.Engine {
	t.Helper()
	return startEngineWith(t, NewOpener(1), mods...)
}

// startEngineWith is startEngine with the given opener.
func startEngineWith(t *testing.T, opener jobs.RunOpener, mods ...func(*jobs.Config)) *jobs.Engine {
	t.Helper()
	ctx := context.Background()
	cfg := engineConfig(t.TempDir())
	for _, m := range mods {
		m(&cfg)
	}
	e, err := jobs.Open(ctx, cfg, opener)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := e.Start(ctx); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
		defer cancel()
		if err := e.Stop(ctx); err != nil {
			t.Errorf("engine Stop: %v", err)
		}
		_ = e.Close()
	})
	return e
}

// setup serves a Server with opt over bufconn.
func setup(t *testing.T, opt Options, mods ...func(*jobs.Config)) *testBundle {
	t.Helper()
	return setupWith(t, NewOpener(1), opt, mods...)
}

// setupWith is setup with the engine's runs from opener.
func setupWith(t *testing.T, opener jobs.RunOpener, opt Options, mods ...func(*jobs.Config)) *testBundle {
	t.Helper()
	e := startEngineWith(t, opener, mods...)
	if opt.Logger == nil {
		opt.Logger = slog.New(slog.DiscardHandler)
	}
	srv, err := NewServer(e, opt)
	if err != nil {
		t.Fatal(err)
	}
	lis := bufconn.Listen(1 << 20)
	conn := serve(t, srv, lis, func(ctx context.Context, _ string) (net.Conn, error) { return lis.DialContext(ctx) }, "passthrough:///bufconn")
	return &testBundle{engine: e, server: srv, client: pb.NewDampfrontServiceClient(conn), conn: conn}
}

// serve runs srv.Serve on lis until the test ends and returns a client
// connection to target.
func serve(t *testing.T, srv *Server, lis net.Listener, dial func(context.Context, string) (net.Conn, error), target string) *grpc.ClientConn {
	t.Helper()
	ctx, cancel := context.WithCancel(context.Background())
	done := make(chan error, 1)
	go func() { done <- srv.Serve(ctx, lis) }()
	opts := []grpc.DialOption{grpc.WithTransportCredentials(insecure.NewCredentials())}
	if dial != nil {
		opts = append(opts, grpc.WithContextDialer(dial))
	}
	conn, err := grpc.NewClient(target, opts...)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		_ = conn.Close()
		cancel()
		select {
		case err := <-done:
			if err != nil {
				t.Errorf("Serve: %v", err)
			}
		case <-time.After(testTimeout):
			t.Error("Serve did not return after its context ended")
		}
	})
	return conn
}

func testContext(t *testing.T) context.Context {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
	t.Cleanup(cancel)
	return ctx
}

// submit submits spec and fails the test on an error.
func (b *testBundle) submit(t *testing.T, spec *pb.JobSpec) *pb.Job {
	t.Helper()
	res, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec})
	if err != nil {
		t.Fatalf("SubmitJob: %v", err)
	}
	return res.GetJob()
}

// watch reads a job's watch stream to its end and returns the progress
// events and the final job.
func (b *testBundle) watch(t *testing.T, name string) ([]*pb.Progress, *pb.Job) {
	t.Helper()
	stream, err := b.client.WatchJob(testContext(t), &pb.WatchJobRequest{Name: name})
	if err != nil {
		t.Fatalf("WatchJob: %v", err)
	}
	var progress []*pb.Progress
	var final *pb.Job
	for {
		ev, err := stream.Recv()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatalf("WatchJob: %v", err)
		}
		if final != nil {
			t.Fatalf("event after the final job: %v", ev)
		}
		switch e := ev.GetEvent().(type) {
		case *pb.WatchJobResponse_Progress:
			progress = append(progress, e.Progress)
		case *pb.WatchJobResponse_Job:
			final = e.Job
		}
	}
	if final == nil {
		t.Fatal("the watch ended without the final job")
	}
	return progress, final
}

// wholeFront reads every page of a job's front with the given page size.
func (b *testBundle) wholeFront(t *testing.T, name string, pageSize int32) (*pb.Front, int) {
	t.Helper()
	var all *pb.Front
	pages := 0
	token := ""
	for {
		res, err := b.client.GetFront(testContext(t), &pb.GetFrontRequest{Job: name, PageSize: pageSize, PageToken: token})
		if err != nil {
			t.Fatalf("GetFront: %v", err)
		}
		pages++
		if all == nil {
			all = res.GetFront()
		} else {
			all.Solutions = append(all.Solutions, res.GetFront().GetSolutions()...)
		}
		if token = res.GetNextPageToken(); token == "" {
			return all, pages
		}
	}
}

// wantCode fails unless err is a status with code c and an ErrorInfo of
// the service's domain with the given reason.
func wantCode(t *testing.T, what string, err error, c codes.Code, reason string) *status.Status {
	t.Helper()
	st, ok := status.FromError(err)
	if !ok || st.Code() != c {
		t.Fatalf("%s: got %v, want code %v", what, err, c)
	}
	for _, d := range st.Details() {
		if info, ok := d.(*errdetails.ErrorInfo); ok {
			if info.GetDomain() != ErrorDomain || info.GetReason() != reason {
				t.Errorf("%s: ErrorInfo %s/%s, want %s/%s", what, info.GetDomain(), info.GetReason(), ErrorDomain, reason)
			}
			return st
		}
	}
	t.Errorf("%s: no ErrorInfo in %v", what, st.Details())
	return st
}

// violations returns the BadRequest field paths of an InvalidArgument.
func violations(t *testing.T, what string, err error) []string {
	t.Helper()
	st := wantCode(t, what, err, codes.InvalidArgument, ReasonInvalidArgument)
	var out []string
	for _, d := range st.Details() {
		if br, ok := d.(*errdetails.BadRequest); ok {
			for _, v := range br.GetFieldViolations() {
				if v.GetDescription() == "" {
					t.Errorf("%s: violation of %s has no description", what, v.GetField())
				}
				out = append(out, v.GetField())
			}
		}
	}
	return out
}

var pathSegment = regexp.MustCompile(`^([a-z][a-z0-9_]*)((?:\[\d+\]|\["[^"]*"\])?)$`)

// resolvePath checks that path names a field of md: lower_snake_case
// names joined by dots, [i] after a repeated field, ["key"] after a map.
func resolvePath(md protoreflect.MessageDescriptor, path string) error {
	segs := strings.Split(path, ".")
	for i, seg := range segs {
		m := pathSegment.FindStringSubmatch(seg)
		if m == nil {
			return fmt.Errorf("segment %q is not a field name with an optional index", seg)
		}
		fd := md.Fields().ByName(protoreflect.Name(m[1]))
		if fd == nil {
			return fmt.Errorf("%s has no field %q", md.FullName(), m[1])
		}
		idx := m[2]
		switch {
		case idx != "" && strings.HasPrefix(idx, "[\"") && !fd.IsMap():
			return fmt.Errorf("%s is not a map", fd.FullName())
		case idx != "" && !strings.HasPrefix(idx, "[\"") && !fd.IsList():
			return fmt.Errorf("%s is not repeated", fd.FullName())
		case idx != "" && !strings.HasPrefix(idx, "[\""):
			if _, err := strconv.Atoi(idx[1 : len(idx)-1]); err != nil {
				return err
			}
		}
		if i == len(segs)-1 {
			return nil
		}
		switch {
		case fd.IsMap():
			if idx == "" {
				return fmt.Errorf("%s needs a key before going on", fd.FullName())
			}
			md = fd.MapValue().Message()
		case fd.IsList() && idx == "":
			return fmt.Errorf("%s needs an index before going on", fd.FullName())
		default:
			md = fd.Message()
		}
		if md == nil {
			return fmt.Errorf("%s is not a message", fd.FullName())
		}
	}
	return nil
}
