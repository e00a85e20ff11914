package deploy

import (
	"bufio"
	"debug/elf"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// The Dockerfile, read as text: no Docker engine runs here to build it.
// Instructions and their forms are those of the Dockerfile reference
// (docs.docker.com/reference/dockerfile): FROM ... AS name starts a
// stage, a trailing backslash continues a line, "#" at the start of a
// line is a comment, and a JSON array is the exec form.

type instruction struct {
	line int
	cmd  string // upper case
	args string
}

type stage struct {
	from, name string
	ins        []instruction
	args       map[string]string // ARG defaults, for ${NAME}
}

// last returns the arguments of the stage's last cmd instruction, or "".
func (s *stage) last(cmd string) string {
	for i := len(s.ins) - 1; i >= 0; i-- {
		if s.ins[i].cmd == cmd {
			return s.ins[i].args
		}
	}
	return ""
}

// expand substitutes ${NAME} and $NAME from the stage's ARG defaults.
func (s *stage) expand(v string) string {
	return os.Expand(v, func(k string) string { return s.args[k] })
}

func readDockerfile(t *testing.T) []*stage {
	t.Helper()
	f, err := os.Open("Dockerfile")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var stages []*stage
	global := &stage{args: map[string]string{}}
	cur := global
	sc := bufio.NewScanner(f)
	n := 0
	var pending strings.Builder
	start := 0
	for sc.Scan() {
		n++
		line := sc.Text()
		trimmed := strings.TrimSpace(line)
		if strings.HasPrefix(trimmed, "#") || (trimmed == "" && pending.Len() == 0) {
			continue
		}
		if pending.Len() == 0 {
			start = n
		}
		if cont, ok := strings.CutSuffix(trimmed, `\`); ok {
			pending.WriteString(cont + " ")
			continue
		}
		pending.WriteString(trimmed)
		text := pending.String()
		pending.Reset()
		cmd, args, _ := strings.Cut(text, " ")
		in := instruction{line: start, cmd: strings.ToUpper(cmd), args: strings.TrimSpace(args)}
		if in.cmd == "FROM" {
			f := strings.Fields(in.args)
			cur = &stage{from: f[0], args: map[string]string{}}
			if len(f) == 3 && strings.EqualFold(f[1], "AS") {
				cur.name = f[2]
			}
			stages = append(stages, cur)
			continue
		}
		if in.cmd == "ARG" {
			k, v, _ := strings.Cut(in.args, "=")
			cur.args[k] = v
		}
		cur.ins = append(cur.ins, in)
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	if len(stages) < 2 {
		t.Fatalf("Dockerfile has %d stages, want a build stage and a runtime stage", len(stages))
	}
	return stages
}

func finalStage(t *testing.T, stages []*stage) *stage { return stages[len(stages)-1] }

// buildStage returns the stage whose RUN builds ./cmd/dampfront.
func buildStage(t *testing.T, stages []*stage) (*stage, instruction) {
	t.Helper()
	for _, s := range stages {
		for _, in := range s.ins {
			if in.cmd == "RUN" && strings.Contains(in.args, "go build") && strings.Contains(in.args, "./cmd/dampfront") {
				return s, in
			}
		}
	}
	t.Fatal("Dockerfile: no stage runs go build ... ./cmd/dampfront")
	return nil, instruction{}
}

// envAt returns the value of an ENV variable set in s before line, or
// on the RUN itself ("RUN NAME=value go ...").
func envAt(s *stage, name string, run instruction) (string, bool) {
	if m := regexp.MustCompile(`(?:^|\s)` + name + `=(\S+)`).FindStringSubmatch(run.args); m != nil && !strings.HasPrefix(run.args, "[") {
		return m[1], true
	}
	val, found := "", false
	for _, in := range s.ins {
		if in.line >= run.line {
			break
		}
		if in.cmd != "ENV" {
			continue
		}
		for _, kv := range strings.Fields(in.args) {
			if k, v, ok := strings.Cut(kv, "="); ok && k == name {
				val, found = strings.Trim(v, `"`), true
			}
		}
	}
	return val, found
}

// execForm parses a JSON-array instruction argument.
func execForm(t *testing.T, in string) []string {
	t.Helper()
	var out []string
	if err := json.Unmarshal([]byte(in), &out); err != nil {
		t.Fatalf("Dockerfile: %q is not the exec form (a JSON array): %v", in, err)
	}
	return out
}

// copiedTo returns the destination in the final stage of the file the
// build stage wrote at src, or "".
func copiedTo(final *stage, from, src string) string {
	for _, in := range final.ins {
		if in.cmd != "COPY" {
			continue
		}
		f := strings.Fields(in.args)
		if len(f) == 4 && f[0] == "--from="+from && f[1] == src {
			return f[3]
		}
		if len(f) == 3 && f[0] == "--from="+from && f[1] == src {
			return f[2]
		}
	}
	return ""
}

var imageRef = regexp.MustCompile(`^([a-z0-9./_-]+)(?::([A-Za-z0-9._-]+))?(?:@(sha256:[0-9a-f]{64}))?$`)

// The bases are pinned (a tag other than latest, or a digest); the build
// runs on Go 1.26 on Debian bookworm and the runtime is distroless
// static or a Debian slim image.
func TestDockerfileBases(t *testing.T) {
	t.Parallel()
	stages := readDockerfile(t)
	for _, s := range stages {
		m := imageRef.FindStringSubmatch(s.from)
		if m == nil {
			t.Errorf("FROM %q is not an image reference", s.from)
			continue
		}
		if (m[2] == "" || m[2] == "latest") && m[3] == "" {
			t.Errorf("FROM %q is not pinned: give a version tag (and in production a digest)", s.from)
		}
	}
	b := regexp.MustCompile(`^golang:1\.26(\.\d+)?-bookworm(@sha256:[0-9a-f]{64})?$`)
	if bs, _ := buildStage(t, stages); !b.MatchString(bs.from) {
		t.Errorf("the build stage is FROM %q, want golang:1.26 on bookworm", bs.from)
	}
	final := finalStage(t, stages)
	r := regexp.MustCompile(`^(gcr\.io/distroless/static-debian12(:[a-z0-9-]+)?|debian:bookworm(-\d+)?-slim)(@sha256:[0-9a-f]{64})?$`)
	if !r.MatchString(final.from) {
		t.Errorf("the runtime stage is FROM %q, want distroless static or debian slim", final.from)
	}
}

// The binary is built with CGO_ENABLED=0, and a binary built so is
// static: the ELF file has no program interpreter (PT_INTERP) and needs
// no shared library (DT_NEEDED), as the System V ABI defines them and
// Go's debug/elf reads them.
func TestDockerfileStaticBuild(t *testing.T) {
	t.Parallel()
	stages := readDockerfile(t)
	bs, run := buildStage(t, stages)
	if v, ok := envAt(bs, "CGO_ENABLED", run); !ok || v != "0" {
		t.Errorf("line %d: go build runs with CGO_ENABLED=%q (set %v), want 0", run.line, v, ok)
	}
	out := regexp.MustCompile(`-o\s+(\S+)`).FindStringSubmatch(run.args)
	if out == nil {
		t.Fatalf("line %d: go build without -o", run.line)
	}
	if dst := copiedTo(finalStage(t, stages), bs.name, out[1]); dst == "" {
		t.Errorf("the runtime stage does not copy %s from stage %q", out[1], bs.name)
	}

	f, err := elf.Open(dampfront(t))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	for _, p := range f.Progs {
		if p.Type == elf.PT_INTERP {
			t.Error("the CGO_ENABLED=0 binary has a program interpreter: it is dynamically linked")
		}
	}
	if libs, err := f.ImportedLibraries(); err != nil || len(libs) > 0 {
		t.Errorf("the CGO_ENABLED=0 binary needs shared libraries %v (%v)", libs, err)
	}
}

// grpc-health-probe is built at a pinned version, statically, and copied
// into the runtime stage.
func TestDockerfileHealthProbeBuild(t *testing.T) {
	t.Parallel()
	stages := readDockerfile(t)
	bs, _ := buildStage(t, stages)
	var install instruction
	for _, in := range bs.ins {
		if in.cmd == "RUN" && strings.Contains(in.args, "github.com/grpc-ecosystem/grpc-health-probe@") {
			install = in
		}
	}
	if install.cmd == "" {
		t.Fatal("the build stage does not go install github.com/grpc-ecosystem/grpc-health-probe")
	}
	args := bs.expand(install.args)
	if !regexp.MustCompile(`grpc-health-probe@v\d+\.\d+\.\d+(\s|$)`).MatchString(args) {
		t.Errorf("line %d: %q does not pin a release of grpc-health-probe", install.line, args)
	}
	if v, ok := envAt(bs, "CGO_ENABLED", install); !ok || v != "0" {
		t.Errorf("line %d: grpc-health-probe is built with CGO_ENABLED=%q, want 0", install.line, v)
	}
	gobin := regexp.MustCompile(`GOBIN=(\S+)`).FindStringSubmatch(args)
	if gobin == nil {
		t.Fatalf("line %d: no GOBIN for the probe", install.line)
	}
	if copiedTo(finalStage(t, stages), bs.name, gobin[1]+"/grpc-health-probe") == "" {
		t.Errorf("the runtime stage does not copy %s/grpc-health-probe", gobin[1])
	}
}

// The image runs as a numeric non-root user.
func TestDockerfileRunsAsNonRoot(t *testing.T) {
	t.Parallel()
	final := finalStage(t, readDockerfile(t))
	user := final.last("USER")
	if user == "" {
		t.Fatal("the runtime stage sets no USER: it would run as root")
	}
	name := strings.SplitN(user, ":", 2)[0]
	if name == "root" || name == "0" {
		t.Errorf("USER %q is root", user)
	}
	if uid := imageUID(t); uid == 0 {
		t.Errorf("USER %q is uid 0", user)
	}
}

// ENTRYPOINT is the copied binary, CMD a real subcommand, and the health
// check asks the gRPC health service on the port the server listens on,
// which is the one exposed.
func TestDockerfileEntrypointAndHealthCheck(t *testing.T) {
	t.Parallel()
	stages := readDockerfile(t)
	final := finalStage(t, stages)
	bs, run := buildStage(t, stages)
	out := regexp.MustCompile(`-o\s+(\S+)`).FindStringSubmatch(run.args)[1]
	bin := copiedTo(final, bs.name, out)
	ep := execForm(t, final.last("ENTRYPOINT"))
	if len(ep) != 1 || ep[0] != bin {
		t.Errorf("ENTRYPOINT %q, want [%q]", ep, bin)
	}
	cmd := execForm(t, final.last("CMD"))
	if len(cmd) == 0 || !subcommands(t)[cmd[0]] {
		t.Errorf("CMD %q is not a dampfront subcommand", cmd)
	}

	// The address: ENV DAMPFRONT_ADDR, read by serve.
	addr, ok := envAt(final, "DAMPFRONT_ADDR", instruction{line: 1 << 30})
	if !ok {
		t.Fatal("the runtime stage sets no DAMPFRONT_ADDR: serve would listen on loopback only")
	}
	if helpOf(t, "serve").envFlags["DAMPFRONT_ADDR"] != "addr" {
		t.Error("serve does not read DAMPFRONT_ADDR for --addr")
	}
	reachableHost(t, "Dockerfile ENV DAMPFRONT_ADDR", addr)
	port := portOf(t, "Dockerfile ENV DAMPFRONT_ADDR", addr)
	if exp := final.last("EXPOSE"); strings.TrimSuffix(exp, "/tcp") != strconv.Itoa(port) {
		t.Errorf("EXPOSE %q, the server listens on %s", exp, addr)
	}

	hc := final.last("HEALTHCHECK")
	_, form, ok := strings.Cut(hc, "CMD ")
	if !ok {
		t.Fatalf("HEALTHCHECK %q has no CMD", hc)
	}
	probe := execForm(t, form)
	if want := copiedTo(final, bs.name, "/out/grpc-health-probe"); probe[0] != want || want == "" {
		t.Errorf("HEALTHCHECK runs %q, want the copied grpc-health-probe %q", probe[0], want)
	}
	checkProbeAddr(t, "Dockerfile HEALTHCHECK", probe[1:], port)
}

// checkProbeAddr fails t unless grpc-health-probe's -addr flag reaches port
// on the container's loopback.
func checkProbeAddr(t *testing.T, where string, args []string, port int) {
	t.Helper()
	for _, a := range args {
		if v, ok := strings.CutPrefix(a, "-addr="); ok {
			if p := portOf(t, where, v); p != port {
				t.Errorf("%s: probes port %d, the server listens on %d", where, p, port)
			}
			return
		}
	}
	t.Errorf("%s: grpc-health-probe without -addr=HOST:PORT", where)
}

// The build context's ignore file keeps every file the build needs: the
// module files and the Go and embedded files of every package the
// binary is built from (go list -deps).
func TestDockerignoreKeepsTheSources(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("Dockerfile.dockerignore")
	if err != nil {
		t.Fatal(err)
	}
	var patterns []string
	for _, l := range strings.Split(string(b), "\n") {
		if l = strings.TrimSpace(l); l != "" && !strings.HasPrefix(l, "#") {
			patterns = append(patterns, l)
		}
	}
	cmd := exec.Command("go", "list", "-deps", "-f", `{{if .Module}}{{if eq .Module.Path "dampfront"}}{{.Dir}}|{{join .GoFiles ","}}|{{join .EmbedFiles ","}}{{end}}{{end}}`, "dampfront/cmd/dampfront")
	cmd.Dir = ".."
	cmd.Env = append(os.Environ(), "CGO_ENABLED=0")
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("go list: %v", err)
	}
	root, err := filepath.Abs("..")
	if err != nil {
		t.Fatal(err)
	}
	need := []string{"go.mod", "go.sum"}
	for _, line := range strings.Split(strings.TrimSpace(string(out)), "\n") {
		parts := strings.Split(line, "|")
		if len(parts) != 3 {
			continue
		}
		rel, err := filepath.Rel(root, parts[0])
		if err != nil {
			t.Fatal(err)
		}
		for _, f := range append(strings.Split(parts[1], ","), strings.Split(parts[2], ",")...) {
			if f != "" {
				need = append(need, filepath.ToSlash(filepath.Join(rel, f)))
			}
		}
	}
	if len(need) < 10 {
		t.Fatalf("go list found only %v", need)
	}
	for _, f := range need {
		if p := ignoredBy(patterns, f); p != "" {
			t.Errorf("Dockerfile.dockerignore pattern %q drops %s, which the build needs", p, f)
		}
	}
}

// ignoredBy returns the pattern that excludes path or one of its parent
// directories, or "". It handles the forms the ignore file uses: a path
// pattern from the context root, and "**/" for any depth (Docker's
// .dockerignore rules, which follow filepath.Match).
func ignoredBy(patterns []string, path string) string {
	segs := strings.Split(path, "/")
	for _, p := range patterns {
		rest, any := strings.CutPrefix(p, "**/")
		for i := 1; i <= len(segs); i++ {
			prefix := strings.Join(segs[:i], "/")
			if ok, _ := filepath.Match(p, prefix); ok {
				return p
			}
			if !any {
				continue
			}
			for j := 0; j < i; j++ {
				if ok, _ := filepath.Match(rest, strings.Join(segs[j:i], "/")); ok {
					return p
				}
			}
		}
	}
	return ""
}
