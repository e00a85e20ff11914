package api

import (
	"context"
	"encoding/hex"
	"errors"
	"io"
	"sync"
	"testing"
	"time"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// refinedSummaryHex is the summary refineSpec's job stores when it ends,
// recorded from the version before the refinement reported its progress
// (commit 4cd327b): the front check of its 18 points, then the
// refinement's summary (18 points, 10 s, seed 11, 3 statistical errors).
// A finished job's summary must keep these bytes.
const refinedSummaryHex = "001e08122012280431b81e85eb51b89e3f39fca9f1d24d62503f4803500358540812310000000000002440380b410000000000000840"

// TestRefinementProgressInSummary steps refineSpec's job with two
// workers, so that the refinement checks two front points a step, and
// reads its summary after every step. While it refines, the summary is
// marked in progress with the front's size and the points checked, two
// more each step, and none of the counts known only at the end; the
// front check is the finished one's. Once done, the summary is the bytes
// the job stored before the progress existed (refinedSummaryHex).
func TestRefinementProgressInSummary(t *testing.T) {
	t.Parallel()
	st, err := NewOpener(2).Open(refineSpec(t), nil)
	if err != nil {
		t.Fatal(err)
	}
	var checked []int32
	var progress []*pb.RefinementSummary
	var checks []*pb.FrontCheck
	var final []byte
	for {
		done, err := st.Step(context.Background(), 100)
		if err != nil {
			t.Fatal(err)
		}
		sum, err := st.(jobs.Summarizer).Summary()
		if err != nil {
			t.Fatal(err)
		}
		if done {
			final = sum
			break
		}
		if sum == nil {
			continue // still searching
		}
		fc, rs, err := decodeSummary(sum)
		if err != nil || !rs.GetInProgress() {
			t.Fatalf("summary of a run not done: %v, %v; want a refinement in progress", rs, err)
		}
		checked, progress, checks = append(checked, rs.GetPointsChecked()), append(progress, rs), append(checks, fc)
	}
	if got := hex.EncodeToString(final); got != refinedSummaryHex {
		t.Fatalf("finished summary\n%s\nwant the bytes stored before\n%s", got, refinedSummaryHex)
	}
	fc, rs, err := decodeSummary(final)
	if err != nil || rs.GetInProgress() || rs.GetPointsChecked() != 0 {
		t.Fatalf("finished refinement summary %v, %v", rs, err)
	}
	n := rs.GetPoints()
	var want []int32
	for k := int32(2); ; k += 2 {
		want = append(want, min(k, n))
		if k >= n {
			break
		}
	}
	if len(checked) != len(want) {
		t.Fatalf("points checked after each refining step %v, want %v", checked, want)
	}
	for i, p := range progress {
		if p.GetPointsChecked() != want[i] || p.GetPoints() != n || p.GetFailed() != 0 || p.GetOffFront() != 0 ||
			p.GetInfeasible() != 0 || p.GetUnsettled() != 0 || p.GetSeed() != 11 || p.GetDurationS() != 10 {
			t.Errorf("step %d of the refinement: summary %v; want %d of %d points checked, no other count", i, p, want[i], n)
		}
		if !proto.Equal(checks[i], fc) {
			t.Errorf("step %d of the refinement: front check %v, the finished one %v", i, checks[i], fc)
		}
	}
}

// TestJobRefinementSummaryByState: a job's refinement summary shows in
// Job.refinement_summary while the job runs and after it stopped (marked
// in progress, with no front check), and as before once it succeeded; a
// summary without a refinement in progress shows nothing before the job
// succeeded.
func TestJobRefinementSummaryByState(t *testing.T) {
	t.Parallel()
	spec := refineSpec(t)
	fc := &pb.FrontCheck{Points: 18, Beaten: 1}
	refining := &pb.RefinementSummary{Points: 18, DurationS: 10, Seed: 11, Sigmas: 3, InProgress: true, PointsChecked: 6}
	refined := &pb.RefinementSummary{Points: 18, OffFront: 2, DurationS: 10, Seed: 11, Sigmas: 3}
	enc := func(rs *pb.RefinementSummary) []byte {
		b, err := encodeSummary(fc, rs)
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	for _, c := range []struct {
		name      string
		state     jobs.State
		summary   []byte
		wantRS    *pb.RefinementSummary
		wantCheck bool
	}{
		{"refining", jobs.StateRunning, enc(refining), refining, false},
		{"cancelled while refining", jobs.StateCancelled, enc(refining), refining, false},
		{"searching after a front check", jobs.StateRunning, enc(nil), nil, false},
		{"queued", jobs.StateQueued, nil, nil, false},
		{"succeeded", jobs.StateSucceeded, enc(refined), refined, true},
	} {
		j, err := jobToProto(&jobs.Job{ID: "j1", Spec: spec, State: c.state, Summary: c.summary}, false)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if !proto.Equal(j.GetRefinementSummary(), c.wantRS) || (j.GetFrontCheck() != nil) != c.wantCheck {
			t.Errorf("%s: refinement summary %v, front check %v; want %v, front check %v", c.name, j.GetRefinementSummary(), j.GetFrontCheck(), c.wantRS, c.wantCheck)
		}
	}
}

// holdOpener opens the API's runs and holds each in its refinement: once
// a summary in progress has been stored (the engine asks for it at each
// checkpoint), every later step waits after its work until release is
// closed or the slice ends, so that a watch sees the job refining
// whatever the machine's speed.
type holdOpener struct {
	inner   jobs.RunOpener
	release chan struct{}
	mu      sync.Mutex
	stored  bool
}

func (o *holdOpener) Open(spec, checkpoint []byte) (jobs.Run, error) {
	r, err := o.inner.Open(spec, checkpoint)
	if err != nil {
		return nil, err
	}
	return &heldRun{Run: r, o: o}, nil
}

type heldRun struct {
	jobs.Run
	o *holdOpener
}

func (r *heldRun) Summary() ([]byte, error) {
	b, err := r.Run.(jobs.Summarizer).Summary()
	if refinementInProgress(b) != nil {
		r.o.mu.Lock()
		r.o.stored = true
		r.o.mu.Unlock()
	}
	return b, err
}

func (r *heldRun) Step(ctx context.Context, n int) (bool, error) {
	done, err := r.Run.Step(ctx, n)
	r.o.mu.Lock()
	hold := r.o.stored
	r.o.mu.Unlock()
	if hold && !done && err == nil {
		select {
		case <-r.o.release:
		case <-ctx.Done():
		}
	}
	return done, err
}

// TestWatchReportsRefinement: the watch of a job that refines its front
// sends the refinement's progress as of the last checkpoint (in
// progress, at most the front's points checked), GetJob shows the same,
// and the job then ends with its finished refinement summary.
func TestWatchReportsRefinement(t *testing.T) {
	t.Parallel()
	o := &holdOpener{inner: NewOpener(1), release: make(chan struct{})}
	released := sync.OnceFunc(func() { close(o.release) })
	t.Cleanup(released)
	// A checkpoint after every step: the first step of the refinement is
	// stored before the hold begins.
	b := setupWith(t, o, Options{}, func(c *jobs.Config) { c.CheckpointInterval = time.Nanosecond })
	spec := testSpec(4)
	spec.Refinement = &pb.Refinement{Enabled: true, DurationS: 10, Seed: proto.Uint64(11)}
	job := b.submit(t, spec)
	stream, err := b.client.WatchJob(testContext(t), &pb.WatchJobRequest{Name: job.GetName()})
	if err != nil {
		t.Fatal(err)
	}
	var seen *pb.RefinementSummary
	var final *pb.Job
	for final == nil {
		ev, err := stream.Recv()
		if errors.Is(err, io.EOF) {
			t.Fatal("the watch ended without the final job")
		}
		if err != nil {
			t.Fatalf("WatchJob: %v", err)
		}
		switch e := ev.GetEvent().(type) {
		case *pb.WatchJobResponse_Refinement:
			rs := e.Refinement
			// 0 checked is a true state too: a slice that ends as the
			// refinement starts stores its front before any point.
			if !rs.GetInProgress() || rs.GetPoints() < 1 || rs.GetPointsChecked() > rs.GetPoints() {
				t.Fatalf("refinement event %v: want in progress, at most the front's points checked", rs)
			}
			if seen == nil {
				got, err := b.client.GetJob(testContext(t), &pb.GetJobRequest{Name: job.GetName()})
				if err != nil {
					t.Fatal(err)
				}
				if g := got.GetJob().GetRefinementSummary(); !g.GetInProgress() || g.GetPoints() != rs.GetPoints() || got.GetJob().GetFrontCheck() != nil {
					t.Fatalf("GetJob while refining: refinement summary %v, front check %v", g, got.GetJob().GetFrontCheck())
				}
				released()
			}
			seen = rs
		case *pb.WatchJobResponse_Job:
			final = e.Job
		}
	}
	if seen == nil {
		t.Fatal("the watch sent no refinement progress")
	}
	rs := final.GetRefinementSummary()
	if final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED || rs.GetInProgress() || rs.GetPoints() != seen.GetPoints() {
		t.Fatalf("final job %v with refinement summary %v; want succeeded with %d points checked", final.GetState(), rs, seen.GetPoints())
	}
}
