package deploy

import (
	"net/url"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"dampfront/api"
	"dampfront/jobs"
)

// compose.yaml, parsed as generic maps (merge keys expanded by the YAML
// reader) and checked against the binary. Field meanings are those of the
// Compose specification (services, depends_on conditions,
// service_completed_successfully, healthcheck, deploy.replicas,
// stop_grace_period).

const composeFile = "compose.yaml"

func readCompose(t *testing.T) obj {
	t.Helper()
	docs := readYAMLDocs(t, composeFile)
	if len(docs) != 1 {
		t.Fatalf("%s: %d documents, want 1", composeFile, len(docs))
	}
	return docs[0]
}

// composeService is one service running the dampfront image.
type composeService struct {
	name string
	raw  obj
	sub  string
	args []string
	env  map[string]string
}

func dampfrontServices(t *testing.T, c obj) map[string]composeService {
	t.Helper()
	out := map[string]composeService{}
	for name, v := range object(t, composeFile, c, "services") {
		s := v.(obj)
		if img, _ := s["image"].(string); !strings.HasPrefix(img, "dampfront:") {
			continue
		}
		where := composeFile + ": service " + name
		cmd := strings_(t, where, list(t, where, s, "command"))
		if len(cmd) == 0 {
			t.Fatalf("%s: empty command", where)
		}
		env := map[string]string{}
		for k, v := range object(t, where, s, "environment") {
			sv, ok := v.(string)
			if !ok {
				t.Errorf("%s: %s = %v (%T); quote it, compose wants strings", where, k, v, v)
			}
			env[k] = sv
		}
		out[name] = composeService{name: name, raw: s, sub: cmd[0], args: cmd[1:], env: env}
	}
	return out
}

// The file says it is for development, before anything else.
func TestComposeIsMarkedForDevelopment(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile(composeFile)
	if err != nil {
		t.Fatal(err)
	}
	first := strings.SplitN(string(b), "\n", 2)[0]
	if !strings.Contains(strings.ToUpper(first), "FOR DEVELOPMENT") {
		t.Errorf("%s begins %q; its first line must say it is for development only", composeFile, first)
	}
	if name := str(t, composeFile, readCompose(t), "name"); !strings.Contains(name, "dev") {
		t.Errorf("project name %q does not say dev", name)
	}
}

// PostgreSQL, then migrate once, then one API server and two workers;
// every variable is one the subcommand reads and its value parses.
func TestComposeServicesMatchTheBinary(t *testing.T) {
	t.Parallel()
	c := readCompose(t)
	subs := subcommands(t)
	svcs := dampfrontServices(t, c)
	count := map[string]int{}
	for _, s := range svcs {
		where := composeFile + ": service " + s.name
		if !subs[s.sub] {
			t.Errorf("%s: runs %q, not a subcommand of dampfront", where, s.sub)
			continue
		}
		replicas := 1
		if r, ok := at(s.raw, "deploy", "replicas"); ok {
			replicas = int(r.(float64))
		}
		count[s.sub] += replicas
		checkEnvAndArgs(t, where, s.sub, s.args, s.env, nil)
		if df := str(t, where, s.raw, "build", "dockerfile"); df != "deploy/Dockerfile" {
			t.Errorf("%s: builds %q, want deploy/Dockerfile", where, df)
		}
		ctx := str(t, where, s.raw, "build", "context")
		if _, err := os.Stat(filepath.Join(ctx, "go.mod")); err != nil {
			t.Errorf("%s: build context %q is not the module root: %v", where, ctx, err)
		}
	}
	for sub, want := range map[string]int{"migrate": 1, "serve": 1, "worker": 2} {
		if count[sub] != want {
			t.Errorf("%d containers run %s, want %d", count[sub], sub, want)
		}
	}
	if svcs["api"].sub != "serve" || svcs["worker"].sub != "worker" || svcs["migrate"].sub != "migrate" {
		t.Fatalf("want services migrate, api and worker running migrate, serve and worker")
	}
	// The API server works no jobs: the workers do.
	if w := effective(t, "serve", svcs["api"].args, svcs["api"].env, "workers"); w.value != "0" {
		t.Errorf("the api service runs %s workers of its own, want 0", w.value)
	}
}

// Migrations run before serving: migrate waits for a healthy PostgreSQL
// and runs once; the API and the workers wait for it to complete.
func TestComposeMigratesBeforeServing(t *testing.T) {
	t.Parallel()
	c := readCompose(t)
	svcs := object(t, composeFile, c, "services")
	cond := func(svc, dep string) string {
		v, _ := at(svcs, svc, "depends_on", dep, "condition")
		s, _ := v.(string)
		return s
	}
	if got := cond("migrate", "postgres"); got != "service_healthy" {
		t.Errorf("migrate depends on postgres with condition %q, want service_healthy", got)
	}
	if _, ok := at(svcs, "postgres", "healthcheck", "test"); !ok {
		t.Error("postgres has no healthcheck, so service_healthy never holds")
	}
	for _, s := range []string{"api", "worker"} {
		if got := cond(s, "migrate"); got != "service_completed_successfully" {
			t.Errorf("%s depends on migrate with condition %q, want service_completed_successfully", s, got)
		}
	}
	if r, _ := at(svcs, "migrate", "restart"); r != "no" {
		t.Errorf("migrate has restart %v; a one-shot must not restart", r)
	}
}

// The API's address, published port and health check agree; so do the
// workers' health address and health check, and the workers publish
// nothing (the check runs inside the container).
func TestComposeAPIPortAndHealthCheck(t *testing.T) {
	t.Parallel()
	c := readCompose(t)
	svcs := dampfrontServices(t, c)
	a := svcs["api"]
	where := composeFile + ": service api"
	addr := effective(t, "serve", a.args, a.env, "addr")
	reachableHost(t, where, addr.value)
	port := portOf(t, where, addr.value)
	checkServeAuth(t, where, a.args, a.env, false)
	ports := strings_(t, where, list(t, where, a.raw, "ports"))
	if len(ports) != 1 {
		t.Fatalf("%s: ports %v, want one", where, ports)
	}
	parts := strings.Split(ports[0], ":")
	if len(parts) != 3 || parts[0] != "127.0.0.1" {
		t.Errorf("%s: publishes %q; for development publish on the host's loopback only (127.0.0.1:HOST:CONTAINER)", where, ports[0])
	}
	if cp, _ := strconv.Atoi(parts[len(parts)-1]); cp != port {
		t.Errorf("%s: publishes container port %s, the server listens on %d", where, parts[len(parts)-1], port)
	}
	checkComposeHealthCheck(t, where, a.raw, port)

	w := svcs["worker"]
	where = composeFile + ": service worker"
	health := effective(t, "worker", w.args, w.env, "health-addr")
	if health.value == "" {
		t.Fatalf("%s: no --health-addr (or $DAMPFRONT_HEALTH_ADDR): its health check would ask nothing", where)
	}
	checkComposeHealthCheck(t, where, w.raw, portOf(t, where, health.value))
	if _, ok := w.raw["ports"]; ok {
		t.Errorf("%s: publishes ports, but only its own health check needs its one", where)
	}
}

// checkComposeHealthCheck fails t unless the service's health check runs
// the image's grpc-health-probe against port on the container's
// loopback.
func checkComposeHealthCheck(t *testing.T, where string, svc obj, port int) {
	t.Helper()
	if v, _ := at(svc, "healthcheck", "disable"); v == true {
		t.Errorf("%s: the health check is disabled", where)
	}
	test := strings_(t, where, list(t, where, svc, "healthcheck", "test"))
	if len(test) < 2 || test[0] != "CMD" || test[1] != "/usr/local/bin/grpc-health-probe" {
		t.Fatalf("%s: healthcheck %q, want [CMD /usr/local/bin/grpc-health-probe ...]", where, test)
	}
	stages := readDockerfile(t)
	bs, _ := buildStage(t, stages)
	if copiedTo(finalStage(t, stages), bs.name, "/out/grpc-health-probe") != test[1] {
		t.Errorf("%s: the image has no %s", where, test[1])
	}
	checkProbeAddr(t, where, test[2:], port)
}

// The database URL reaches the postgres service with its user, password
// and database.
func TestComposeDatabaseURL(t *testing.T) {
	t.Parallel()
	c := readCompose(t)
	pg := object(t, composeFile, c, "services", "postgres", "environment")
	for _, s := range dampfrontServices(t, c) {
		where := composeFile + ": service " + s.name
		db := effective(t, s.sub, s.args, s.env, "database")
		u, err := url.Parse(db.value)
		if err != nil || u.Scheme != "postgres" {
			t.Errorf("%s: database %q is not a postgres:// URL (%v)", where, db.value, err)
			continue
		}
		pw, _ := u.User.Password()
		if u.Hostname() != "postgres" || u.User.Username() != pg["POSTGRES_USER"] || pw != pg["POSTGRES_PASSWORD"] || strings.TrimPrefix(u.Path, "/") != pg["POSTGRES_DB"] {
			t.Errorf("%s: database %q does not match the postgres service (%v)", where, db.value, pg)
		}
	}
}

// stop_grace_period outlasts each process's stop, as in
// TestManifestGracePeriods.
func TestComposeGracePeriods(t *testing.T) {
	t.Parallel()
	for _, s := range dampfrontServices(t, readCompose(t)) {
		if s.sub == "migrate" {
			continue
		}
		where := composeFile + ": service " + s.name
		grace := 10 * time.Second // compose's default
		if v, ok := s.raw["stop_grace_period"]; ok {
			grace = composeDuration(t, where, v)
		}
		workers, err := strconv.Atoi(effective(t, s.sub, s.args, s.env, "workers").value)
		if err != nil {
			t.Fatalf("%s: --workers: %v", where, err)
		}
		var need time.Duration
		if s.sub == "serve" {
			need = api.DefaultStopTimeout
		}
		if workers > 0 {
			need = max(need, duration(t, where, effective(t, s.sub, s.args, s.env, "stop-timeout").value)+jobs.DefaultFinalizeTimeout)
		}
		if grace <= need {
			t.Errorf("%s: stop_grace_period %v, not longer than the %v its process may take to stop", where, grace, need)
		}
	}
}
