package api_test

import (
	"context"
	"log/slog"
	"net"
	"path/filepath"
	"testing"
	"time"

	"google.golang.org/grpc"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/protobuf/proto"

	"dampfront/api"
	"dampfront/api/apitest"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// largeFront is the size of the seeded front: more than the 1,523
// solutions of the 3-objective job that first broke the front's pages.
const largeFront = 3000

// TestGetFrontPagesBySize reads a front of largeFront full solutions
// (some 10 kB each, so 1,000 of them pass gRPC's default 4 MiB receive
// limit) over TCP with a client that keeps that default. Every page must
// arrive (AIP-158: a page may hold fewer than page_size), and the pages
// joined must be the stored front, each solution bit for bit, in order.
// The basic view, a few hundred bytes a solution, still fills its pages.
func TestGetFrontPagesBySize(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	spec, err := apitest.DemoSpec(filepath.Join("..", "testdata", "demo-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	quiet := slog.New(slog.DiscardHandler)
	e, err := jobs.Open(ctx, jobs.Config{DatabaseURL: filepath.Join(t.TempDir(), "jobs.db"), Logger: quiet}, api.NewOpener(0))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = e.Close() })
	name, err := apitest.SeedFront(ctx, e, spec, largeFront, 1)
	if err != nil {
		t.Fatal(err)
	}
	srv, err := api.NewServer(e, api.Options{Logger: quiet})
	if err != nil {
		t.Fatal(err)
	}
	lis, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	sctx, stop := context.WithCancel(ctx)
	done := make(chan error, 1)
	go func() { done <- srv.Serve(sctx, lis) }()
	t.Cleanup(func() { stop(); <-done })
	conn, err := grpc.NewClient(lis.Addr().String(), grpc.WithTransportCredentials(insecure.NewCredentials()))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { _ = conn.Close() })
	c := pb.NewDampfrontServiceClient(conn)

	for _, view := range []pb.SolutionView{pb.SolutionView_SOLUTION_VIEW_FULL, pb.SolutionView_SOLUTION_VIEW_BASIC} {
		req := &pb.GetFrontRequest{Job: name, PageSize: 1000, View: view}
		var got []*pb.Solution
		pages := 0
		for {
			res, err := c.GetFront(ctx, req)
			if err != nil {
				t.Fatalf("%v, page %d: %v", view, pages+1, err)
			}
			pages++
			if n := len(res.GetFront().GetSolutions()); n == 0 || n > 1000 {
				t.Fatalf("%v, page %d holds %d solutions", view, pages, n)
			}
			if b := proto.Size(res); b > 4<<20 {
				t.Errorf("%v, page %d is %d bytes, over the 4 MiB default", view, pages, b)
			}
			got = append(got, res.GetFront().GetSolutions()...)
			if req.PageToken = res.GetNextPageToken(); req.PageToken == "" {
				break
			}
		}
		if len(got) != largeFront {
			t.Fatalf("%v: %d solutions in %d pages, want %d", view, len(got), pages, largeFront)
		}
		// Full: some 10 kB a solution cuts pages by size; basic fills each
		// page of 1,000 (3,000 in three pages).
		if view == pb.SolutionView_SOLUTION_VIEW_BASIC && pages != 3 {
			t.Errorf("basic view: %d pages, want 3 of at most 1,000", pages)
		}
		if view == pb.SolutionView_SOLUTION_VIEW_FULL && pages <= 3 {
			t.Errorf("full view: %d pages, want more than 3 (cut by size)", pages)
		}
		stored, err := e.Store().FrontGet(ctx, &jobs.FrontGetParams{JobID: name[len("jobs/"):], PageSize: jobs.MaxPageSize})
		if err != nil {
			t.Fatal(err)
		}
		for i, js := range stored.Solutions {
			s := got[i]
			if int(s.GetIndex()) != i || len(s.GetObjectives()) != 3 || s.GetObjectives()[2] != js.Objectives[2] || s.GetGenes()[0] != js.Genes[0] {
				t.Fatalf("%v: solution %d is %v, stored %v", view, i, s.GetObjectives(), js.Objectives)
			}
			if view == pb.SolutionView_SOLUTION_VIEW_FULL && len(s.GetDamperCurves()) != 4 {
				t.Fatalf("full view: solution %d has %d damper curves", i, len(s.GetDamperCurves()))
			}
		}
	}
}
