package api

import (
	"context"
	"log/slog"
	"net"
	"slices"
	"testing"
	"time"

	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials/insecure"
	healthpb "google.golang.org/grpc/health/grpc_health_v1"
	reflectionpb "google.golang.org/grpc/reflection/grpc_reflection_v1"
	"google.golang.org/grpc/test/bufconn"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestServeOnLoopback serves on a real TCP port of 127.0.0.1: health
// and reflection answer, and a small job runs from submit to front.
func TestServeOnLoopback(t *testing.T) {
	t.Parallel()
	e := startEngine(t)
	srv, err := NewServer(e, Options{Logger: slog.New(slog.DiscardHandler)})
	if err != nil {
		t.Fatal(err)
	}
	lis, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	conn := serve(t, srv, lis, nil, lis.Addr().String())
	ctx := testContext(t)

	hc := healthpb.NewHealthClient(conn)
	for _, service := range []string{"", "dampfront.v1.DampfrontService"} {
		res, err := hc.Check(ctx, &healthpb.HealthCheckRequest{Service: service})
		if err != nil || res.GetStatus() != healthpb.HealthCheckResponse_SERVING {
			t.Errorf("health of %q: %v, %v", service, res, err)
		}
	}

	rs, err := reflectionpb.NewServerReflectionClient(conn).ServerReflectionInfo(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if err := rs.Send(&reflectionpb.ServerReflectionRequest{MessageRequest: &reflectionpb.ServerReflectionRequest_ListServices{}}); err != nil {
		t.Fatal(err)
	}
	res, err := rs.Recv()
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, s := range res.GetListServicesResponse().GetService() {
		names = append(names, s.GetName())
	}
	for _, want := range []string{"dampfront.v1.DampfrontService", "grpc.health.v1.Health"} {
		if !slices.Contains(names, want) {
			t.Errorf("reflection lists %v, missing %s", names, want)
		}
	}
	_ = rs.CloseSend()

	b := &testBundle{engine: e, server: srv, client: pb.NewDampfrontServiceClient(conn), conn: conn}
	job := b.submit(t, testSpec(4))
	_, final := b.watch(t, job.GetName())
	if final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("final job %v", final)
	}
	front, _ := b.wholeFront(t, job.GetName(), 0)
	if len(front.GetSolutions()) == 0 {
		t.Error("empty front")
	}
}

// TestShutdownEndsWatches: when Serve's context ends, health stops
// serving and an open watch ends with Unavailable instead of holding up
// the graceful stop; Serve then returns nil.
func TestShutdownEndsWatches(t *testing.T) {
	t.Parallel()
	e := startEngine(t)
	srv, err := NewServer(e, Options{Logger: slog.New(slog.DiscardHandler), StopTimeout: testTimeout})
	if err != nil {
		t.Fatal(err)
	}
	lis := bufconn.Listen(1 << 20)
	ctx, stop := context.WithCancel(context.Background())
	defer stop()
	done := make(chan error, 1)
	go func() { done <- srv.Serve(ctx, lis) }()
	conn, err := grpc.NewClient("passthrough:///bufconn", grpc.WithTransportCredentials(insecure.NewCredentials()),
		grpc.WithContextDialer(func(ctx context.Context, _ string) (net.Conn, error) { return lis.DialContext(ctx) }))
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	client := pb.NewDampfrontServiceClient(conn)

	res, err := client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: testSpec(5000)})
	if err != nil {
		t.Fatal(err)
	}
	defer func() { _, _ = e.Cancel(context.Background(), res.GetJob().GetJobId()) }()
	stream, err := client.WatchJob(testContext(t), &pb.WatchJobRequest{Name: res.GetJob().GetName()})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := stream.Recv(); err != nil {
		t.Fatal(err)
	}
	stop()
	for {
		_, err := stream.Recv()
		if err != nil {
			wantCode(t, "watch during shutdown", err, codes.Unavailable, ReasonShuttingDown)
			break
		}
	}
	select {
	case err := <-done:
		if err != nil {
			t.Errorf("Serve: %v", err)
		}
	case <-time.After(testTimeout):
		t.Fatal("Serve did not return")
	}
	st, err := srv.health.Check(context.Background(), &healthpb.HealthCheckRequest{})
	if err != nil || st.GetStatus() != healthpb.HealthCheckResponse_NOT_SERVING {
		t.Errorf("health after shutdown: %v, %v", st, err)
	}
}

// TestShutdownCutsLongCalls: a call still running when the graceful stop
// times out is cut by Stop rather than waited for. The call evaluates
// some 2000 setups (seconds of work); with a stop timeout of 50 ms it
// must end with an error, not a result.
func TestShutdownCutsLongCalls(t *testing.T) {
	t.Parallel()
	e := startEngine(t)
	srv, err := NewServer(e, Options{Logger: slog.New(slog.DiscardHandler), StopTimeout: 50 * time.Millisecond, MaxSyncWork: 1 << 20})
	if err != nil {
		t.Fatal(err)
	}
	lis := bufconn.Listen(1 << 20)
	ctx, stop := context.WithCancel(context.Background())
	defer stop()
	done := make(chan error, 1)
	go func() { done <- srv.Serve(ctx, lis) }()
	conn, err := grpc.NewClient("passthrough:///bufconn", grpc.WithTransportCredentials(insecure.NewCredentials()),
		grpc.WithContextDialer(func(ctx context.Context, _ string) (net.Conn, error) { return lis.DialContext(ctx) }))
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	setups := make([]*pb.Setup, 2000)
	for i := range setups {
		setups[i] = testSetup()
	}
	callErr := make(chan error, 1)
	go func() {
		_, err := pb.NewDampfrontServiceClient(conn).EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{
			Source: &pb.EvaluateSetupsRequest_Spec{Spec: testSpec(1)}, Setups: setups, View: pb.SolutionView_SOLUTION_VIEW_BASIC})
		callErr <- err
	}()
	// Wait until the handler holds its evaluation slot, i.e. is running.
	deadline := time.Now().Add(testTimeout)
	for len(srv.slots) == 0 {
		if time.Now().After(deadline) {
			t.Fatal("the call never started")
		}
		time.Sleep(time.Millisecond)
	}
	stop()
	if err := <-callErr; err == nil {
		t.Error("the long call completed; the graceful stop's timeout did not cut it")
	}
	if err := <-done; err != nil {
		t.Errorf("Serve: %v", err)
	}
}
