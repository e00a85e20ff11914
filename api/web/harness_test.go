package web

import (
	"context"
	"log/slog"
	"net/http/httptest"
	"path/filepath"
	"testing"
	"time"

	"google.golang.org/protobuf/proto"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// testTimeout bounds every wait; the jobs these tests run take a few
// seconds of compute at most.
const testTimeout = 45 * time.Second

// quiet discards the logs of the engine and the server.
var quiet = slog.New(slog.DiscardHandler)

// engineConfig polls often, so that a small job starts at once and its
// progress is written every few generations.
func engineConfig(db string, workers int) jobs.Config {
	return jobs.Config{
		DatabaseURL:        db,
		Workers:            workers,
		ProgressInterval:   20 * time.Millisecond,
		CancelPollInterval: 50 * time.Millisecond,
		WatchInterval:      20 * time.Millisecond,
		FetchPollInterval:  20 * time.Millisecond,
		RetryDelay:         50 * time.Millisecond,
		StopTimeout:        10 * time.Second,
		FinalizeTimeout:    10 * time.Second,
		Logger:             quiet,
	}
}

// startEngine opens and starts an engine on the SQLite file db.
func startEngine(t *testing.T, cfg jobs.Config) *jobs.Engine {
	t.Helper()
	ctx := context.Background()
	e, err := jobs.Open(ctx, cfg, api.NewOpener(1))
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

// bundle is an engine, the service over it in process, and the page.
type bundle struct {
	engine *jobs.Engine
	client pb.DampfrontServiceClient
	page   *httptest.Server
}

// setup starts an engine with workers on a new SQLite file, the service
// with opt and the page on 127.0.0.1.
func setup(t *testing.T, workers int, opt api.Options) *bundle {
	t.Helper()
	return setupOn(t, filepath.Join(t.TempDir(), "jobs.db"), workers, opt)
}

// setupOn is setup on the SQLite file db.
func setupOn(t *testing.T, db string, workers int, opt api.Options) *bundle {
	t.Helper()
	e := startEngine(t, engineConfig(db, workers))
	opt.Logger = quiet
	srv, err := api.NewServer(e, opt)
	if err != nil {
		t.Fatal(err)
	}
	local, err := NewLocal(srv)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		if err := local.Close(); err != nil {
			t.Errorf("Local.Close: %v", err)
		}
	})
	h, err := New(local.Client(), Options{PollInterval: 100 * time.Millisecond, Logger: quiet})
	if err != nil {
		t.Fatal(err)
	}
	page := httptest.NewServer(h) // listens on 127.0.0.1
	t.Cleanup(page.Close)
	return &bundle{engine: e, client: local.Client(), page: page}
}

// demoSpec is the demo job of testdata/demo-job.yaml (the invented
// Quillon GT on three invented road cases), cut to a few generations of
// a small population so that it runs in about a second.
func demoSpec(t *testing.T, population, generations int32) *pb.JobSpec {
	t.Helper()
	spec := specFile(t, "demo-job.yaml")
	spec.Search.PopulationSize, spec.Search.Generations = population, generations
	spec.Search.Seed = proto.Uint64(11)
	spec.Labels["suite"] = "web"
	return spec
}

func testContext(t *testing.T) context.Context {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
	t.Cleanup(cancel)
	return ctx
}

// submit queues spec and returns the job.
func (b *bundle) submit(t *testing.T, spec *pb.JobSpec) *pb.Job {
	t.Helper()
	res, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec})
	if err != nil {
		t.Fatalf("SubmitJob: %v", err)
	}
	return res.GetJob()
}

// finish waits until job name is terminal and returns it.
func (b *bundle) finish(t *testing.T, name string) *pb.Job {
	t.Helper()
	ctx := testContext(t)
	for {
		res, err := b.client.GetJob(ctx, &pb.GetJobRequest{Name: name, View: pb.JobView_JOB_VIEW_BASIC})
		if err != nil {
			t.Fatalf("GetJob: %v", err)
		}
		if terminal(res.GetJob().GetState()) {
			return res.GetJob()
		}
		select {
		case <-ctx.Done():
			t.Fatalf("job %s still %v after %v", name, res.GetJob().GetState(), testTimeout)
		case <-time.After(20 * time.Millisecond):
		}
	}
}
