package main

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// The tests run the real binary as a process, built once here, against
// servers on 127.0.0.1 only, each on its own SQLite file.

var binary string

func TestMain(m *testing.M) {
	dir, err := os.MkdirTemp("", "dampfront-test-bin-")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	binary = filepath.Join(dir, "dampfront")
	build := exec.Command("go", "build", "-o", binary, ".")
	build.Stdout, build.Stderr = os.Stderr, os.Stderr
	if err := build.Run(); err != nil {
		fmt.Fprintln(os.Stderr, "build dampfront:", err)
		os.RemoveAll(dir)
		os.Exit(1)
	}
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}

// Time bounds of the process tests (generous for a loaded 2-core machine;
// they bound hangs, they do not measure speed).
const (
	commandTimeout = 60 * time.Second // one client command, a watch included
	demoTimeout    = 5 * time.Minute  // the whole demo: a job with its polish
	serverStart    = 30 * time.Second // until the address file appears
	serverStop     = 30 * time.Second // SIGTERM to exit
)

// result is one finished run of the binary.
type result struct {
	stdout, stderr string
	code           int
}

// dampfront runs the binary with args and extra environment "K=V" pairs.
func dampfront(t *testing.T, env []string, args ...string) result {
	t.Helper()
	return dampfrontWithin(t, commandTimeout, env, args...)
}

// dampfrontWithin is dampfront with another bound than commandTimeout,
// for a command that runs a whole job (the demo).
func dampfrontWithin(t *testing.T, timeout time.Duration, env []string, args ...string) result {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, binary, args...)
	cmd.Env = append(cleanEnv(), env...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err := cmd.Run()
	r := result{stdout: out.String(), stderr: errb.String()}
	var ee *exec.ExitError
	switch {
	case err == nil:
	case errors.As(err, &ee) && ctx.Err() == nil:
		r.code = ee.ExitCode()
	default:
		t.Fatalf("dampfront %s: %v (timeout %v)\nstdout:\n%s\nstderr:\n%s", strings.Join(args, " "), err, timeout, r.stdout, r.stderr)
	}
	return r
}

// mustRun runs the binary and fails the test unless the exit code is want.
func mustRun(t *testing.T, want int, env []string, args ...string) result {
	t.Helper()
	r := dampfront(t, env, args...)
	if r.code != want {
		t.Fatalf("dampfront %s: exit code %d, want %d\nstdout:\n%s\nstderr:\n%s", strings.Join(args, " "), r.code, want, r.stdout, r.stderr)
	}
	return r
}

// cleanEnv is the test process's environment without DAMPFRONT_ settings,
// so that a developer's shell cannot redirect the tests.
func cleanEnv() []string {
	var out []string
	for _, kv := range os.Environ() {
		if !strings.HasPrefix(kv, "DAMPFRONT_") {
			out = append(out, kv)
		}
	}
	return out
}

// server is a dampfront serve process.
type server struct {
	addr string
	cmd  *exec.Cmd
	logs *syncBuffer
	done chan struct{}
}

// startServer runs "dampfront serve" on database db at a free port of
// 127.0.0.1 and waits until it listens. The cleanup stops it with
// SIGTERM, or kills it after serverStop.
func startServer(t *testing.T, db string, env []string, args ...string) *server {
	t.Helper()
	addrFile := filepath.Join(t.TempDir(), "addr")
	all := append([]string{"serve", "--addr", "127.0.0.1:0", "--addr-file", addrFile, "--database", db}, args...)
	cmd := exec.Command(binary, all...)
	cmd.Env = append(cleanEnv(), env...)
	s := &server{cmd: cmd, logs: &syncBuffer{}, done: make(chan struct{})}
	cmd.Stdout, cmd.Stderr = s.logs, s.logs
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	go func() { _ = cmd.Wait(); close(s.done) }()
	t.Cleanup(func() {
		s.stop(t)
		if t.Failed() {
			t.Logf("server logs:\n%s", s.logs.String())
		}
	})
	deadline := time.Now().Add(serverStart)
	for time.Now().Before(deadline) {
		if b, err := os.ReadFile(addrFile); err == nil {
			s.addr = strings.TrimSpace(string(b))
			return s
		}
		select {
		case <-s.done:
			t.Fatalf("dampfront serve exited early:\n%s", s.logs.String())
		case <-time.After(20 * time.Millisecond):
		}
	}
	t.Fatalf("dampfront serve did not listen within %v:\n%s", serverStart, s.logs.String())
	return nil
}

// stop sends SIGTERM and waits, then kills.
func (s *server) stop(t *testing.T) {
	select {
	case <-s.done:
		return
	default:
	}
	_ = s.cmd.Process.Signal(syscall.SIGTERM)
	select {
	case <-s.done:
	case <-time.After(serverStop):
		t.Errorf("dampfront serve did not stop within %v of SIGTERM", serverStop)
		_ = s.cmd.Process.Kill()
		<-s.done
	}
}

// kill ends the server with SIGKILL, as a crash would.
func (s *server) kill() {
	_ = s.cmd.Process.Kill()
	<-s.done
}

// client returns the --addr flag pair of the server.
func (s *server) client(args ...string) []string {
	return append(args, "--addr", s.addr)
}

type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (b *syncBuffer) Write(p []byte) (int, error) {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.b.Write(p)
}

func (b *syncBuffer) String() string {
	b.mu.Lock()
	defer b.mu.Unlock()
	return b.b.String()
}

// firstLine is the first line of s.
func firstLine(s string) string {
	sc := bufio.NewScanner(strings.NewReader(s))
	if sc.Scan() {
		return sc.Text()
	}
	return ""
}

// testdataPath is a file of the repository's testdata/.
func testdataPath(name string) string { return filepath.Join("..", "..", "testdata", name) }

// writeSpec writes the demo job spec with the given text replacements to
// a temporary file and returns its path.
func writeSpec(t *testing.T, replacements ...string) string {
	t.Helper()
	return writeSpecOf(t, "demo-job.yaml", replacements...)
}

// writeSpecOf is writeSpec of another spec of testdata.
func writeSpecOf(t *testing.T, name string, replacements ...string) string {
	t.Helper()
	b, err := os.ReadFile(testdataPath(name))
	if err != nil {
		t.Fatal(err)
	}
	s := string(b)
	for i := 0; i+1 < len(replacements); i += 2 {
		if !strings.Contains(s, replacements[i]) {
			t.Fatalf("%s has no %q to replace", name, replacements[i])
		}
		s = strings.Replace(s, replacements[i], replacements[i+1], 1)
	}
	p := filepath.Join(t.TempDir(), "spec.yaml")
	if err := os.WriteFile(p, []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// cautionText is the caution as printed, to look for in outputs: the
// model's words, wrapped for a terminal.
var cautionText = caution

var timeNow = time.Now

func sleep(ms int) { time.Sleep(time.Duration(ms) * time.Millisecond) }

// seeded is a copy of spec with the search seed set to seed.
func seeded(spec *pb.JobSpec, seed uint64) *pb.JobSpec {
	out := proto.CloneOf(spec)
	if out.Search == nil {
		out.Search = &pb.SearchSettings{}
	}
	out.Search.Seed = &seed
	return out
}
