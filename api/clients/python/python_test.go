// Package pyclient holds the tests of the Python client script
// dampfront_front.py: they run it with Debian's /usr/bin/python3
// against a server on 127.0.0.1.
package pyclient

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"log/slog"
	"math"
	"math/rand/v2"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"google.golang.org/grpc"
	"google.golang.org/grpc/credentials/insecure"
	"google.golang.org/grpc/metadata"
	"google.golang.org/protobuf/encoding/protojson"
	"google.golang.org/protobuf/proto"
	"sigs.k8s.io/yaml"

	"dampfront/api"
	"dampfront/api/frontfile"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// python is Debian's interpreter, which has Debian's python3-grpcio and
// python3-protobuf; a python3 first on PATH (pyenv, a virtualenv) may not.
const python = "/usr/bin/python3"

// testTimeout bounds each wait: a job of a few generations, one run of
// the script.
const testTimeout = 45 * time.Second

// needPython skips the test without Debian's python3 and its grpc and
// protobuf modules.
func needPython(t *testing.T) {
	t.Helper()
	if _, err := os.Stat(python); err != nil {
		t.Skipf("no %s (Debian: apt-get install python3 python3-grpcio python3-protobuf)", python)
	}
	if out, err := exec.Command(python, "-c", "import grpc, google.protobuf").CombinedOutput(); err != nil {
		t.Skipf("%s has no grpc or protobuf module (Debian: apt-get install python3-grpcio python3-protobuf): %s", python, bytes.TrimSpace(out))
	}
}

func testContext(t *testing.T) context.Context {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
	t.Cleanup(cancel)
	return ctx
}

// serve starts an engine on a new SQLite file and the service over it on
// a free port of 127.0.0.1; it returns the address and a client.
func serve(t *testing.T, opt api.Options) (string, pb.DampfrontServiceClient) {
	t.Helper()
	quiet := slog.New(slog.DiscardHandler)
	ctx := context.Background()
	e, err := jobs.Open(ctx, jobs.Config{
		DatabaseURL: filepath.Join(t.TempDir(), "jobs.db"), Workers: 1,
		ProgressInterval: 50 * time.Millisecond, FetchPollInterval: 20 * time.Millisecond,
		StopTimeout: 10 * time.Second, Logger: quiet,
	}, api.NewOpener(1))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := e.Start(ctx); err != nil {
		t.Fatal(err)
	}
	opt.Logger = quiet
	srv, err := api.NewServer(e, opt)
	if err != nil {
		t.Fatal(err)
	}
	lis, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	sctx, cancel := context.WithCancel(ctx)
	done := make(chan error, 1)
	go func() { done <- srv.Serve(sctx, lis) }()
	conn, err := grpc.NewClient(lis.Addr().String(), grpc.WithTransportCredentials(insecure.NewCredentials()))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		_ = conn.Close()
		cancel()
		if err := <-done; err != nil {
			t.Errorf("Serve: %v", err)
		}
		sctx, scancel := context.WithTimeout(context.Background(), testTimeout)
		defer scancel()
		if err := e.Stop(sctx); err != nil {
			t.Errorf("engine Stop: %v", err)
		}
		_ = e.Close()
	})
	return lis.Addr().String(), pb.NewDampfrontServiceClient(conn)
}

// demoSpec is testdata/demo-job.yaml (the invented Quillon GT on three
// invented road cases) cut to a small population and a few generations,
// with the labels given.
func demoSpec(t *testing.T, labels map[string]string) *pb.JobSpec {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "..", "testdata", "demo-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	j, err := yaml.YAMLToJSON(b)
	if err != nil {
		t.Fatal(err)
	}
	spec := &pb.JobSpec{}
	if err := protojson.Unmarshal(j, spec); err != nil {
		t.Fatal(err)
	}
	spec.Search.PopulationSize, spec.Search.Generations, spec.Search.Seed = 12, 3, proto.Uint64(5)
	spec.Labels = labels
	return spec
}

// runJob submits spec and waits until it has finished.
func runJob(t *testing.T, ctx context.Context, c pb.DampfrontServiceClient, spec *pb.JobSpec) *pb.Job {
	t.Helper()
	res, err := c.SubmitJob(ctx, &pb.SubmitJobRequest{Spec: spec})
	if err != nil {
		t.Fatalf("SubmitJob: %v", err)
	}
	for {
		g, err := c.GetJob(ctx, &pb.GetJobRequest{Name: res.GetJob().GetName(), View: pb.JobView_JOB_VIEW_BASIC})
		if err != nil {
			t.Fatalf("GetJob: %v", err)
		}
		if s := g.GetJob().GetState(); s != pb.JobState_JOB_STATE_QUEUED && s != pb.JobState_JOB_STATE_RUNNING {
			return g.GetJob()
		}
		select {
		case <-ctx.Done():
			t.Fatalf("job still %v after %v", g.GetJob().GetState(), testTimeout)
		case <-time.After(20 * time.Millisecond):
		}
	}
}

// script runs dampfront_front.py with args and extra environment
// "K=V" pairs; it returns the exit code and standard error.
func script(t *testing.T, env []string, args ...string) (int, string) {
	t.Helper()
	ctx := testContext(t)
	cmd := exec.CommandContext(ctx, python, append([]string{"dampfront_front.py"}, args...)...)
	for _, kv := range os.Environ() {
		if !strings.HasPrefix(kv, "DAMPFRONT_") && !strings.HasPrefix(kv, "PYTHON") {
			cmd.Env = append(cmd.Env, kv)
		}
	}
	// No __pycache__ in the source tree.
	cmd.Env = append(append(cmd.Env, "PYTHONDONTWRITEBYTECODE=1"), env...)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	err := cmd.Run()
	var ee *exec.ExitError
	switch {
	case err == nil:
		return 0, stderr.String()
	case errors.As(err, &ee) && ctx.Err() == nil:
		return ee.ExitCode(), stderr.String()
	}
	t.Fatalf("python3 dampfront_front.py %s: %v\n%s", strings.Join(args, " "), err, stderr.String())
	return 0, ""
}

// wholeFront reads a job's front through the Go client.
func wholeFront(t *testing.T, ctx context.Context, c pb.DampfrontServiceClient, name string) *pb.Front {
	t.Helper()
	req := &pb.GetFrontRequest{Job: name, PageSize: 7, View: pb.SolutionView_SOLUTION_VIEW_FULL}
	var front *pb.Front
	for {
		res, err := c.GetFront(ctx, req)
		if err != nil {
			t.Fatal(err)
		}
		if front == nil {
			front = res.GetFront()
		} else {
			front.Solutions = append(front.Solutions, res.GetFront().GetSolutions()...)
		}
		if req.PageToken = res.GetNextPageToken(); req.PageToken == "" {
			return front
		}
	}
}

// TestFrontCSV runs the script against a server with two finished jobs
// of different labels: it picks the one with the label and writes its
// front byte for byte as package frontfile (the command line's and the
// page's writer) writes the front the Go client reads.
func TestFrontCSV(t *testing.T) {
	t.Parallel()
	needPython(t)
	ctx := testContext(t)
	addr, c := serve(t, api.Options{})
	want := runJob(t, ctx, c, demoSpec(t, map[string]string{"suite": "python", "car": "quillon-gt"}))
	other := runJob(t, ctx, c, demoSpec(t, map[string]string{"suite": "elsewhere"}))
	if want.GetState() != pb.JobState_JOB_STATE_SUCCEEDED || other.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("jobs ended %v and %v", want.GetState(), other.GetState())
	}
	front := wholeFront(t, ctx, c, want.GetName())
	var wantCSV bytes.Buffer
	if err := frontfile.WriteCSV(&wantCSV, front); err != nil {
		t.Fatal(err)
	}

	out := filepath.Join(t.TempDir(), "front.csv")
	code, stderr := script(t, nil, "--addr", addr, "--label", "suite=python", "-o", out)
	if code != 0 {
		t.Fatalf("exit code %d:\n%s", code, stderr)
	}
	if !strings.Contains(stderr, want.GetName()) || strings.Contains(stderr, other.GetName()) {
		t.Errorf("the script listed the wrong jobs:\n%s", stderr)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if len(front.GetSolutions()) < 2 || !bytes.Equal(b, wantCSV.Bytes()) {
		t.Errorf("the script's CSV differs from frontfile.WriteCSV of the same %d solutions:\n%s\nwant:\n%s", len(front.GetSolutions()), b, wantCSV.Bytes())
	}

	code, stderr = script(t, nil, "--addr", addr, "--label", "suite=none")
	if code != 1 || !strings.Contains(stderr, "no finished job") {
		t.Errorf("no matching job: exit code %d, want 1:\n%s", code, stderr)
	}
}

// TestFrontCSVToken runs the script against a server that asks for
// tokens: $DAMPFRONT_TOKEN goes as the bearer token; without it the
// server's Unauthenticated ends the script with exit code 1.
func TestFrontCSVToken(t *testing.T) {
	t.Parallel()
	needPython(t)
	// A seeded source stands in for crypto/rand in this test only.
	token, err := api.NewToken(rand.NewChaCha8([32]byte{3}))
	if err != nil {
		t.Fatal(err)
	}
	tokens, err := api.ParseTokens([]byte(fmt.Sprintf("- {name: ci, role: submitter, sha256: %q}\n", api.HashToken(token))))
	if err != nil {
		t.Fatal(err)
	}
	ctx := testContext(t)
	addr, c := serve(t, api.Options{Tokens: tokens})
	authed := metadata.AppendToOutgoingContext(ctx, "authorization", "Bearer "+token)
	job := runJob(t, authed, c, demoSpec(t, map[string]string{"suite": "python"}))
	if job.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("job ended %v", job.GetState())
	}
	code, stderr := script(t, []string{"DAMPFRONT_TOKEN=" + token}, "--addr", addr, "--label", "suite=python", "-o", filepath.Join(t.TempDir(), "f.csv"))
	if code != 0 {
		t.Errorf("with the token: exit code %d:\n%s", code, stderr)
	}
	code, stderr = script(t, nil, "--addr", addr, "--label", "suite=python")
	if code != 1 || !strings.Contains(stderr, "UNAUTHENTICATED") {
		t.Errorf("without the token: exit code %d, want 1 with UNAUTHENTICATED:\n%s", code, stderr)
	}
}

// TestGeneratedCodeIsCurrent regenerates the Python message code into a
// temporary directory with generate.sh and fails when it differs from the
// committed dampfront/v1/, file by file and byte for byte.
func TestGeneratedCodeIsCurrent(t *testing.T) {
	t.Parallel()
	out, err := exec.Command("protoc", "--version").Output()
	if err != nil || strings.TrimSpace(string(out)) != "libprotoc 3.21.12" {
		t.Skipf("protoc 3.21.12 (Debian 12: apt-get install protobuf-compiler) is needed, have %q", strings.TrimSpace(string(out)))
	}
	dir := t.TempDir()
	if b, err := exec.Command("./generate.sh", "--out", dir).CombinedOutput(); err != nil {
		t.Fatalf("generate.sh: %v\n%s", err, b)
	}
	committed := os.DirFS(filepath.Join("dampfront", "v1"))
	fresh := os.DirFS(filepath.Join(dir, "dampfront", "v1"))
	names := map[string]bool{}
	for _, f := range []fs.FS{committed, fresh} {
		entries, err := fs.ReadDir(f, ".")
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range entries {
			names[e.Name()] = true
		}
	}
	for name := range names {
		a, errA := fs.ReadFile(committed, name)
		b, errB := fs.ReadFile(fresh, name)
		switch {
		case errA != nil:
			t.Errorf("%s is generated but not committed", name)
		case errB != nil:
			t.Errorf("%s is committed but no longer generated", name)
		case !bytes.Equal(a, b):
			t.Errorf("%s differs from what generate.sh makes; run api/clients/python/generate.sh", name)
		}
	}
}

// TestNumberMatchesGo holds the script's number() to Go's
// strconv.FormatFloat(x, 'g', -1, 64), the reference the command line's
// files are written with: on edge values (the switch to exponents at
// 1e-4 and 1e6, subnormals, signed zero, infinities) and on 20,000
// random bit patterns and 20,000 random magnitudes from 1e-20 to 1e20.
// The text must be equal, character for character.
func TestNumberMatchesGo(t *testing.T) {
	t.Parallel()
	needPython(t)
	r := rand.New(rand.NewPCG(1, 2))
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 0.0001, 0.000099999, 1e-5, 123456, 999999.9999, 1e6, 1234567, 1e21,
		5e-324, math.SmallestNonzeroFloat64 * 3, math.MaxFloat64, -math.MaxFloat64, math.Inf(1), math.Inf(-1), 1.0 / 3, 0.1}
	for i := 0; i < 20000; i++ {
		if v := math.Float64frombits(r.Uint64()); !math.IsNaN(v) {
			vals = append(vals, v)
		}
		vals = append(vals, r.Float64()*math.Pow(10, float64(r.IntN(40)-20)))
	}
	var in, want bytes.Buffer
	for _, v := range vals {
		fmt.Fprintln(&in, math.Float64bits(v))
		fmt.Fprintln(&want, frontfile.Number(v))
	}
	const prog = `import importlib.util, struct, sys
spec = importlib.util.spec_from_file_location("m", "dampfront_front.py")
m = importlib.util.module_from_spec(spec)
spec.loader.exec_module(m)
for line in sys.stdin:
    print(m.number(struct.unpack("<d", struct.pack("<Q", int(line)))[0]))
`
	cmd := exec.CommandContext(testContext(t), python, "-c", prog)
	cmd.Env = append(os.Environ(), "PYTHONDONTWRITEBYTECODE=1")
	cmd.Stdin = &in
	got, err := cmd.Output()
	if err != nil {
		t.Fatal(err)
	}
	g, w := strings.Split(string(got), "\n"), strings.Split(want.String(), "\n")
	if len(g) != len(w) {
		t.Fatalf("%d lines from python, want %d", len(g), len(w))
	}
	bad := 0
	for i := range w {
		if g[i] != w[i] {
			if bad++; bad <= 5 {
				t.Errorf("%v: python writes %q, Go %q", vals[i], g[i], w[i])
			}
		}
	}
}

// TestFrontRefined runs the script on a job with a refinement: its CSV
// is byte for byte frontfile.WriteCSV's, refined columns included, and
// its JSON field for field frontfile.WriteJSON's (the objectives with
// their refined_source).
func TestFrontRefined(t *testing.T) {
	t.Parallel()
	needPython(t)
	ctx := testContext(t)
	addr, c := serve(t, api.Options{})
	spec := demoSpec(t, map[string]string{"suite": "python-refined"})
	spec.Refinement = &pb.Refinement{Enabled: true, DurationS: 5}
	job := runJob(t, ctx, c, spec)
	if job.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("job ended %v: %s", job.GetState(), job.GetErrorMessage())
	}
	front := wholeFront(t, ctx, c, job.GetName())
	if len(front.GetSolutions()) < 2 || !frontfile.Refined(front) {
		t.Fatalf("front of %d solutions, refined %v", len(front.GetSolutions()), frontfile.Refined(front))
	}
	var wantCSV, wantJSON bytes.Buffer
	if err := frontfile.WriteCSV(&wantCSV, front); err != nil {
		t.Fatal(err)
	}
	if err := frontfile.WriteJSON(&wantJSON, job, front); err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, f := range []string{"csv", "json"} {
		out := filepath.Join(dir, "front."+f)
		if code, stderr := script(t, nil, "--addr", addr, "--job", job.GetName(), "--format", f, "-o", out); code != 0 {
			t.Fatalf("%s: exit code %d:\n%s", f, code, stderr)
		}
		b, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		if f == "csv" {
			if !bytes.Equal(b, wantCSV.Bytes()) || !bytes.Contains(b, []byte("refined_rank")) {
				t.Errorf("the script's CSV differs from frontfile.WriteCSV:\n%s\nwant:\n%s", b, wantCSV.Bytes())
			}
			continue
		}
		var got, want any
		if err := json.Unmarshal(b, &got); err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(wantJSON.Bytes(), &want); err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, want) || !bytes.Contains(b, []byte(`"refined_source"`)) {
			t.Errorf("the script's JSON differs from frontfile.WriteJSON:\n%.2000s\nwant:\n%.2000s", b, wantJSON.Bytes())
		}
	}
}
