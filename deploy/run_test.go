package deploy

import (
	"bytes"
	"context"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
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

// The containers of the manifests and the compose file, run for real as
// far as this machine allows: each subcommand with the container's
// arguments and environment, but on 127.0.0.1 with a free port and on a
// SQLite file in a temporary directory instead of the PostgreSQL URL.
// A served API, and a worker's health endpoint, must answer the gRPC
// health service (grpc.health.v1,
// github.com/grpc/grpc/blob/master/doc/health-checking.md) as SERVING
// for every service name a probe asks about; every process must stop
// with exit code 0 on SIGTERM, as Kubernetes and compose stop it.

// runBound bounds each wait of these tests; start-up and a clean stop
// take about a second on two cores. It is a guard against a hang, not a
// timing assertion.
const runBound = 60 * time.Second

// runCase is one container to run.
type runCase struct {
	where    string
	sub      string
	args     []string
	env      map[string]string
	services []string // health service names probed
	tokens   string   // the tokens file's content, when serve has one
}

func runCases(t *testing.T) []runCase {
	t.Helper()
	var out []runCase
	ms := readManifests(t)
	for _, kind := range []string{"Deployment", "Job"} {
		for _, m := range byKind(t, ms, kind) {
			for _, c := range mustContainers(t, m) {
				rc := runCase{where: c.where, sub: c.sub, args: c.args, env: c.env}
				if c.sub == "serve" {
					if path := effective(t, "serve", c.args, c.env, "tokens").value; path != "" {
						rc.tokens = secretFile(t, ms, m, c, path)
					}
				}
				for _, probe := range []string{"readinessProbe", "livenessProbe"} {
					if g, ok := at(c.raw, probe, "grpc"); ok {
						svc, _ := g.(obj)["service"].(string)
						rc.services = append(rc.services, svc)
					}
				}
				out = append(out, rc)
			}
		}
	}
	for _, s := range dampfrontServices(t, readCompose(t)) {
		rc := runCase{where: composeFile + ": service " + s.name, sub: s.sub, args: s.args, env: s.env}
		if test, ok := at(s.raw, "healthcheck", "test"); ok {
			svc := ""
			for _, a := range strings_(t, rc.where, test.([]any)) {
				if v, ok := strings.CutPrefix(a, "-service="); ok {
					svc = v
				}
			}
			rc.services = append(rc.services, svc)
		}
		out = append(out, rc)
	}
	return out
}

func TestContainersRunOnLoopback(t *testing.T) {
	t.Parallel()
	bin := dampfront(t)
	for _, rc := range runCases(t) {
		t.Run(rc.where, func(t *testing.T) {
			t.Parallel()
			dir := t.TempDir()
			args := append([]string{rc.sub}, rc.args...)
			args = append(args, "--database="+filepath.Join(dir, "jobs.db"))
			addrFile := filepath.Join(dir, "addr")
			healthAddr := ""
			if rc.sub == "worker" && effective(t, "worker", rc.args, rc.env, "health-addr").value != "" {
				// The flag overrides the container's variable.
				healthAddr = "127.0.0.1:" + strconv.Itoa(freePort(t))
				args = append(args, "--health-addr="+healthAddr)
			}
			if rc.sub == "serve" {
				args = append(args, "--addr=127.0.0.1:0", "--addr-file="+addrFile)
				if rc.tokens != "" {
					tokensFile := filepath.Join(dir, "tokens.yaml")
					if err := os.WriteFile(tokensFile, []byte(rc.tokens), 0o600); err != nil {
						t.Fatal(err)
					}
					args = append(args, "--tokens="+tokensFile)
				}
			}
			cmd := exec.Command(bin, args...)
			cmd.Env = baseEnv(t)
			for k, v := range rc.env {
				if v != secretValue {
					cmd.Env = append(cmd.Env, k+"="+v)
				}
			}
			var out syncBuffer
			cmd.Stdout, cmd.Stderr = &out, &out
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			done := make(chan error, 1)
			go func() { done <- cmd.Wait() }()
			t.Cleanup(func() {
				if cmd.ProcessState == nil {
					cmd.Process.Kill()
					<-done
				}
			})

			switch rc.sub {
			case "migrate":
				waitExit(t, done, &out)
				if !strings.Contains(out.String(), "is migrated") {
					t.Errorf("migrate did not report a migrated database:\n%s", out.String())
				}
				return
			case "serve":
				addr := waitFile(t, addrFile, done, &out)
				checkHealth(t, addr, rc.services, rc.tokens != "")
			case "worker":
				waitOutput(t, "working", done, &out)
				checkWorkerHealth(t, healthAddr, rc.services)
			default:
				t.Fatalf("no run check for %s", rc.sub)
			}
			if err := cmd.Process.Signal(syscall.SIGTERM); err != nil {
				t.Fatal(err)
			}
			waitExit(t, done, &out)
		})
	}
}

// checkHealth asks the gRPC health service at addr, without a token as
// the kubelet and grpc-health-probe do, for each service name ("" is the
// server as a whole) and fails t unless each is SERVING. It also lists
// jobs without a token, which must be refused (Unauthenticated) when
// the server has tokens and served otherwise.
func checkHealth(t *testing.T, addr string, services []string, auth bool) {
	t.Helper()
	if len(services) == 0 {
		t.Fatal("the server is probed for no health service")
	}
	conn, ctx := dialHealth(t, addr)
	checkServing(t, ctx, conn, services)
	_, err := pb.NewDampfrontServiceClient(conn).ListJobs(ctx, &pb.ListJobsRequest{})
	switch code := status.Code(err); {
	case auth && code != codes.Unauthenticated:
		t.Errorf("ListJobs without a token on a server with tokens: %v, want Unauthenticated", err)
	case !auth && err != nil:
		t.Errorf("ListJobs on a server without tokens: %v", err)
	}
}

// checkWorkerHealth checks a worker's health endpoint at addr ("" when
// it has none) as checkHealth does a server's: each probed service name
// SERVING, and no API behind the port (Unimplemented). A worker probed
// without a health address, or given one that nothing probes, fails t.
func checkWorkerHealth(t *testing.T, addr string, services []string) {
	t.Helper()
	switch {
	case addr == "" && len(services) == 0:
		return
	case addr == "":
		t.Fatalf("the worker is probed for %q but has no --health-addr", services)
	case len(services) == 0:
		t.Fatalf("the worker serves health on --health-addr but nothing probes it")
	}
	conn, ctx := dialHealth(t, addr)
	checkServing(t, ctx, conn, services)
	if _, err := pb.NewDampfrontServiceClient(conn).ListJobs(ctx, &pb.ListJobsRequest{}); status.Code(err) != codes.Unimplemented {
		t.Errorf("ListJobs on the worker's health port: %v, want Unimplemented", err)
	}
}

// dialHealth connects to addr in plaintext, as the probes do, with a
// context bounded by runBound; both end with the test.
func dialHealth(t *testing.T, addr string) (*grpc.ClientConn, context.Context) {
	t.Helper()
	conn, err := grpc.NewClient(addr, grpc.WithTransportCredentials(insecure.NewCredentials()))
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { conn.Close() })
	ctx, cancel := context.WithTimeout(context.Background(), runBound)
	t.Cleanup(cancel)
	return conn, ctx
}

// checkServing fails t unless the health service answers SERVING for
// each service name.
func checkServing(t *testing.T, ctx context.Context, conn *grpc.ClientConn, services []string) {
	t.Helper()
	hc := healthpb.NewHealthClient(conn)
	for _, svc := range services {
		resp, err := hc.Check(ctx, &healthpb.HealthCheckRequest{Service: svc})
		if err != nil {
			t.Errorf("health of %q: %v", svc, err)
			continue
		}
		if resp.GetStatus() != healthpb.HealthCheckResponse_SERVING {
			t.Errorf("health of %q: %v, want SERVING", svc, resp.GetStatus())
		}
	}
}

// freePort is a TCP port of 127.0.0.1 that was free a moment ago.
func freePort(t *testing.T) int {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	return l.Addr().(*net.TCPAddr).Port
}

// waitExit waits for the process to end and fails t unless it exited 0.
func waitExit(t *testing.T, done <-chan error, out *syncBuffer) {
	t.Helper()
	select {
	case err := <-done:
		if err != nil {
			t.Fatalf("exited with %v:\n%s", err, out.String())
		}
	case <-time.After(runBound):
		t.Fatalf("still running after %v:\n%s", runBound, out.String())
	}
}

// waitFile waits for the address file of serve --addr-file.
func waitFile(t *testing.T, path string, done <-chan error, out *syncBuffer) string {
	t.Helper()
	deadline := time.Now().Add(runBound)
	for time.Now().Before(deadline) {
		if b, err := os.ReadFile(path); err == nil && len(b) > 0 {
			return strings.TrimSpace(string(b))
		}
		select {
		case err := <-done:
			t.Fatalf("exited (%v) before listening:\n%s", err, out.String())
		case <-time.After(20 * time.Millisecond):
		}
	}
	t.Fatalf("no address in %s after %v:\n%s", path, runBound, out.String())
	return ""
}

// waitOutput waits until the process has printed s.
func waitOutput(t *testing.T, s string, done <-chan error, out *syncBuffer) {
	t.Helper()
	deadline := time.Now().Add(runBound)
	for time.Now().Before(deadline) {
		if strings.Contains(out.String(), s) {
			return
		}
		select {
		case err := <-done:
			t.Fatalf("exited (%v) before printing %q:\n%s", err, s, out.String())
		case <-time.After(20 * time.Millisecond):
		}
	}
	t.Fatalf("did not print %q within %v:\n%s", s, runBound, out.String())
}

// syncBuffer is a bytes.Buffer safe for the process's writes and the
// test's reads.
type syncBuffer struct {
	mu sync.Mutex
	b  bytes.Buffer
}

func (s *syncBuffer) Write(p []byte) (int, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.Write(p)
}

func (s *syncBuffer) String() string {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.b.String()
}
