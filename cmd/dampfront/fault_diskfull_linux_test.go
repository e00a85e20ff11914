package main

import (
	"context"
	"database/sql"
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"google.golang.org/genproto/googleapis/rpc/errdetails"
	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/grpc/status"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/jobs/jobstest"
)

// diskFullMaxSubmits bounds the submits it takes to fill the disk. Each
// submit appends a few dozen 4 kB pages to the WAL (job row, slice row and
// their indexes; 8 submits filled diskFullHeadroom when this was written),
// so 400 is far beyond what it takes and still bounds the test if the
// accounting is off.
const (
	diskFullMaxSubmits = 400
	diskFullHeadroom   = 512 << 10 // bytes left free after the filler file
	diskFullSize       = "16m"     // the tmpfs holding the database
)

// The disk full at submit time, for real: the server's SQLite file is on
// a small tmpfs of its own, filled with a filler file until a little room
// is left, and jobs are submitted until three were refused. Every submit
// either succeeds whole or fails with Unavailable (reason
// DATABASE_UNAVAILABLE), and the server goes on answering reads. Once the
// filler is removed submits work again. After the server stops, the
// database holds exactly the jobs whose submit succeeded, each with its
// one queued slice, and passes SQLite's integrity check: no partial job.
//
// Needs root and a kernel that lets it mount a tmpfs (CAP_SYS_ADMIN);
// skipped, saying so, otherwise.
func TestFaultDiskFullAtSubmit(t *testing.T) {
	t.Parallel()
	dir := jobstest.MountSmallDisk(t, diskFullSize)
	db := filepath.Join(dir, "dampfront.db")
	s := startServer(t, db, nil, "--workers", "0")
	spec := &pb.JobSpec{}
	if err := readMessage(&env{}, faultSpec(t, 12, 10), spec); err != nil {
		t.Fatal(err)
	}
	conn, err := grpc.NewClient(s.addr, grpc.WithTransportCredentials(insecure.NewCredentials()))
	if err != nil {
		t.Fatal(err)
	}
	defer conn.Close()
	c := pb.NewDampfrontServiceClient(conn)
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()

	filler := jobstest.Fill(t, dir, diskFullHeadroom)
	var accepted []string
	full := 0
	for i := 0; i < diskFullMaxSubmits && full < 3; i++ {
		r, err := c.SubmitJob(ctx, &pb.SubmitJobRequest{Spec: seeded(spec, uint64(100+i))})
		if err == nil {
			// Also after a refusal: the rolled-back transaction's WAL
			// frames are written over by the next, so a smaller write may
			// still fit. What matters is that each submit is whole or
			// refused, which the database is checked for below.
			accepted = append(accepted, r.GetJob().GetJobId())
			continue
		}
		checkUnavailableFull(t, i, err)
		full++
		// Reads still work on a full disk.
		if len(accepted) > 0 {
			if _, err := c.GetJob(ctx, &pb.GetJobRequest{Name: accepted[0]}); err != nil {
				t.Errorf("GetJob with the disk full: %v; want the job", err)
			}
		}
	}
	if full == 0 {
		t.Fatalf("%d submits fitted into %d bytes of headroom; the disk never filled", len(accepted), diskFullHeadroom)
	}
	if len(accepted) == 0 {
		t.Fatalf("no submit fitted into %d bytes of headroom; the test needs a few to succeed first", diskFullHeadroom)
	}
	t.Logf("%d submits accepted and %d refused with the disk full", len(accepted), full)

	if err := os.Remove(filler); err != nil {
		t.Fatal(err)
	}
	r, err := c.SubmitJob(ctx, &pb.SubmitJobRequest{Spec: seeded(spec, 99)})
	if err != nil {
		t.Fatalf("submit after room was made again: %v", err)
	}
	accepted = append(accepted, r.GetJob().GetJobId())

	s.stop(t)
	checkOnlyAccepted(t, db, accepted)
}

// checkUnavailableFull checks that submit i failed as a full database
// should: Unavailable with the DATABASE_UNAVAILABLE reason.
func checkUnavailableFull(t *testing.T, i int, err error) {
	t.Helper()
	st, _ := status.FromError(err)
	if st.Code() != codes.Unavailable {
		t.Errorf("submit %d with the disk full: %v; want code Unavailable", i, err)
		return
	}
	for _, d := range st.Details() {
		if info, ok := d.(*errdetails.ErrorInfo); ok && info.GetReason() == api.ReasonDatabaseDown {
			return
		}
	}
	t.Errorf("submit %d with the disk full: details %v; want ErrorInfo reason %s", i, st.Details(), api.ReasonDatabaseDown)
}

// checkOnlyAccepted opens the stopped server's SQLite file and checks
// that it holds exactly the accepted jobs, each with one slice, and that
// SQLite finds the file intact.
func checkOnlyAccepted(t *testing.T, db string, accepted []string) {
	t.Helper()
	h, err := sql.Open("sqlite", db)
	if err != nil {
		t.Fatal(err)
	}
	defer h.Close()
	ctx, cancel := context.WithTimeout(context.Background(), pgTimeout)
	defer cancel()
	var ok string
	if err := h.QueryRowContext(ctx, `PRAGMA integrity_check`).Scan(&ok); err != nil || ok != "ok" {
		t.Errorf("integrity check of the database after the disk was full: %q, %v; want ok", ok, err)
	}
	jobIDs := queryStrings(t, h, `SELECT id FROM dampfront_job`)
	sliceIDs := queryStrings(t, h, `SELECT json_extract(args, '$.job_id') FROM river_job WHERE kind = 'dampfront_slice'`)
	want := slices.Clone(accepted)
	slices.Sort(want)
	if !slices.Equal(jobIDs, want) {
		t.Errorf("job rows after the disk was full: %v; want exactly the %d accepted %v", jobIDs, len(want), want)
	}
	if !slices.Equal(sliceIDs, want) {
		t.Errorf("queued slices after the disk was full, by job: %v; want one for each accepted job %v", sliceIDs, want)
	}
}

// queryStrings runs a query of one text column and returns its values,
// sorted.
func queryStrings(t *testing.T, h *sql.DB, query string) []string {
	t.Helper()
	rows, err := h.Query(query)
	if err != nil {
		t.Fatalf("%s: %v", query, err)
	}
	defer rows.Close()
	var out []string
	for rows.Next() {
		var s sql.NullString
		if err := rows.Scan(&s); err != nil {
			t.Fatalf("%s: %v", query, err)
		}
		out = append(out, s.String)
	}
	if err := rows.Err(); err != nil && !errors.Is(err, sql.ErrNoRows) {
		t.Fatalf("%s: %v", query, err)
	}
	slices.Sort(out)
	return out
}

// The disk full under a running job: the worker's checkpoints and slice
// hand-overs fail for a while. Once room is made again the job goes on
// from its last stored checkpoint and ends with exactly the front of the
// same job run without interruption.
func TestFaultDiskFullWhileRunning(t *testing.T) {
	t.Parallel()
	specPath := faultSpec(t, 16, 60)
	reference := referenceRun(t, specPath, []uint64{41})
	dir := jobstest.MountSmallDisk(t, diskFullSize)
	db := filepath.Join(dir, "dampfront.db")
	s := startServer(t, db, []string{"DAMPFRONT_SLICE=1s", "DAMPFRONT_CHECKPOINT_INTERVAL=100ms"},
		"--workers", "1", "--eval-workers", "1")
	ids := submitJobs(t, s, specPath, 1, 41)

	// Wait for the first stored checkpoint, then take every byte.
	st := openStore(t, db)
	ctx, cancel := context.WithTimeout(context.Background(), faultJobsTimeout)
	defer cancel()
	for {
		j, err := st.JobGetByID(ctx, &jobs.JobGetByIDParams{ID: ids[0]})
		if err != nil {
			t.Fatal(err)
		}
		if j.Progress.Generation > 0 {
			break
		}
		if ctx.Err() != nil {
			t.Fatal("the job stored no checkpoint")
		}
		time.Sleep(pollInterval)
	}
	filler := jobstest.Fill(t, dir, 0)
	// Until the worker has met the full disk (a checkpoint or a slice
	// hand-over failed), so that the test cannot pass without the fault.
	for !strings.Contains(s.logs.String(), "database or disk is full") {
		if ctx.Err() != nil {
			t.Fatal("the worker never met the full disk")
		}
		time.Sleep(pollInterval)
	}
	time.Sleep(time.Second) // and let it go on failing for a while
	if err := os.Remove(filler); err != nil {
		t.Fatal(err)
	}
	mustRun(t, exitOK, nil, s.client("watch", ids[0], "--quiet")...)
	want := reference()
	j, err := st.JobGetByID(ctx, &jobs.JobGetByIDParams{ID: ids[0]})
	if err != nil {
		t.Fatal(err)
	}
	if j.State != jobs.StateSucceeded {
		t.Errorf("job after the disk was full: %s (%s); want succeeded", j.State, j.Error)
	}
	if d := diffSolutions(readFront(t, st, ids[0]), want[string(j.Spec)]); d != "" {
		t.Errorf("front after the disk was full: %s", d)
	}
}
