package deploy

import (
	"bytes"
	"fmt"
	"maps"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"sync"
	"testing"
)

// The dampfront binary, built once for all tests of the package with
// CGO_ENABLED=0 as the Dockerfile builds it (without its -trimpath and
// -ldflags, which change neither the flags nor the linking, so that the
// build shares the cache of the other packages' tests), and what its
// --help texts say.

var (
	buildOnce sync.Once
	binPath   string
	buildErr  error
	buildDir  string
)

func TestMain(m *testing.M) {
	code := m.Run()
	if buildDir != "" {
		os.RemoveAll(buildDir)
	}
	os.Exit(code)
}

// dampfront returns the path of the binary, building it on first use.
func dampfront(t *testing.T) string {
	t.Helper()
	buildOnce.Do(func() {
		buildDir, buildErr = os.MkdirTemp("", "dampfront-deploy-test-")
		if buildErr != nil {
			return
		}
		binPath = filepath.Join(buildDir, "dampfront")
		cmd := exec.Command("go", "build", "-o", binPath, "dampfront/cmd/dampfront")
		cmd.Dir = ".."
		cmd.Env = append(os.Environ(), "CGO_ENABLED=0")
		if out, err := cmd.CombinedOutput(); err != nil {
			buildErr = fmt.Errorf("go build ./cmd/dampfront: %v\n%s", err, out)
		}
	})
	if buildErr != nil {
		t.Fatal(buildErr)
	}
	return binPath
}

// usage is what "dampfront SUBCOMMAND --help" says: the flags with their
// defaults and the environment variables they read.
type usage struct {
	flags    map[string]string // flag name -> default as printed ("" when none)
	envFlags map[string]string // $DAMPFRONT_X -> the flag it sets
}

var (
	usageMu    sync.Mutex
	usageCache = map[string]*usage{}
)

// flagLine is a flag's first line in flag.PrintDefaults's output, "  -name type".
var flagLine = regexp.MustCompile(`^  -([a-z][a-z0-9-]*)`)

// envRef and defaultRef find, in a flag's text, the variable it reads and
// its default, as flags.go writes them: "($DAMPFRONT_X)" and
// `(default "x")` or "(default 30s)".
var (
	envRef     = regexp.MustCompile(`\(\$(DAMPFRONT_[A-Z0-9_]+)\)`)
	defaultRef = regexp.MustCompile(`\(default ("[^"]*"|[^)]*)\)\s*$`)
)

// helpOf runs "dampfront sub --help" and parses it.
func helpOf(t *testing.T, sub string) *usage {
	t.Helper()
	usageMu.Lock()
	defer usageMu.Unlock()
	if u, ok := usageCache[sub]; ok {
		return u
	}
	out, code := runBinary(t, nil, sub, "--help")
	if code != 0 {
		t.Fatalf("dampfront %s --help: exit code %d\n%s", sub, code, out)
	}
	u := &usage{flags: map[string]string{}, envFlags: map[string]string{}}
	var cur string
	var text strings.Builder
	flush := func() {
		if cur == "" {
			return
		}
		s := strings.Join(strings.Fields(text.String()), " ")
		if m := defaultRef.FindStringSubmatch(s); m != nil {
			u.flags[cur] = strings.Trim(m[1], `"`)
		}
		for _, m := range envRef.FindAllStringSubmatch(s, -1) {
			u.envFlags[m[1]] = cur
		}
	}
	inFlags := false
	for _, line := range strings.Split(out, "\n") {
		if line == "Flags:" {
			inFlags = true
			continue
		}
		if !inFlags {
			continue
		}
		if m := flagLine.FindStringSubmatch(line); m != nil {
			flush()
			cur = m[1]
			u.flags[cur] = ""
			text.Reset()
			continue
		}
		text.WriteString(" " + line)
	}
	flush()
	if len(u.flags) == 0 {
		t.Fatalf("dampfront %s --help lists no flags:\n%s", sub, out)
	}
	usageCache[sub] = u
	return u
}

// subcommands returns the subcommand names "dampfront help" lists.
func subcommands(t *testing.T) map[string]bool {
	t.Helper()
	out, code := runBinary(t, nil, "help")
	if code != 0 {
		t.Fatalf("dampfront help: exit code %d\n%s", code, out)
	}
	names := map[string]bool{}
	in := false
	for _, line := range strings.Split(out, "\n") {
		switch {
		case line == "Subcommands:":
			in = true
		case in && strings.HasPrefix(line, "  "):
			names[strings.Fields(line)[0]] = true
		case in:
			in = false
		}
	}
	if len(names) == 0 {
		t.Fatalf("dampfront help lists no subcommands:\n%s", out)
	}
	return names
}

// runBinary runs the binary with exactly env as its environment (plus
// HOME and PATH) and returns its combined output and exit code.
func runBinary(t *testing.T, env map[string]string, args ...string) (string, int) {
	t.Helper()
	cmd := exec.Command(dampfront(t), args...)
	cmd.Env = baseEnv(t)
	for k, v := range env {
		cmd.Env = append(cmd.Env, k+"="+v)
	}
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	err := cmd.Run()
	if err != nil {
		if _, ok := err.(*exec.ExitError); !ok {
			t.Fatalf("run dampfront %v: %v", args, err)
		}
	}
	return out.String(), cmd.ProcessState.ExitCode()
}

// baseEnv is the environment every run starts from: none of the test
// process's DAMPFRONT_ variables leak in.
func baseEnv(t *testing.T) []string {
	return []string{"HOME=" + t.TempDir(), "PATH=" + os.Getenv("PATH")}
}

// setting is what a container is given for one flag.
type setting struct {
	value  string // the flag's value, or the variable's literal value
	source string // "flag", "env", "secret" (a value from a Secret, unknown here) or "default"
}

// effective returns what a container running sub with args and env
// (name -> literal value; a Secret's values as secretValue) gets for the
// flag name: the flag in args, else the variable the flag reads, else
// the flag's default from --help.
func effective(t *testing.T, sub string, args []string, env map[string]string, name string) setting {
	t.Helper()
	u := helpOf(t, sub)
	def, ok := u.flags[name]
	if !ok {
		t.Fatalf("dampfront %s has no flag --%s", sub, name)
	}
	for i, a := range args {
		for _, p := range []string{"-" + name, "--" + name} {
			if a == p && i+1 < len(args) {
				return setting{args[i+1], "flag"}
			}
			if v, ok := strings.CutPrefix(a, p+"="); ok {
				return setting{v, "flag"}
			}
		}
	}
	for envName, flag := range u.envFlags {
		if flag != name {
			continue
		}
		if v, ok := env[envName]; ok {
			if v == secretValue {
				return setting{v, "secret"}
			}
			return setting{v, "env"}
		}
	}
	return setting{def, "default"}
}

// secretValue stands for a variable whose value comes from a Secret.
const secretValue = "<from a Secret>"

// checkEnvAndArgs fails t unless every variable in env is one that sub
// reads (its --help names it) and the binary accepts args and env: it
// runs "dampfront sub ARGS --help" with env, which parses every flag and
// every variable's value (an integer, a duration) and then stops. A
// Secret's value is replaced by stand-in, which must be valid for it.
func checkEnvAndArgs(t *testing.T, where, sub string, args []string, env map[string]string, standIn map[string]string) {
	t.Helper()
	u := helpOf(t, sub)
	runEnv := map[string]string{}
	for name, v := range env {
		if _, ok := u.envFlags[name]; !ok {
			t.Errorf("%s: variable %s is not read by dampfront %s (its --help names %s)", where, name, sub, sortedKeys(u.envFlags))
		}
		if v == secretValue {
			s, ok := standIn[name]
			if !ok {
				t.Errorf("%s: no stand-in for the Secret's value of %s", where, name)
			}
			v = s
		}
		runEnv[name] = v
	}
	out, code := runBinary(t, runEnv, append(append([]string{sub}, args...), "--help")...)
	if code != 0 {
		t.Errorf("%s: dampfront %s %s --help with its environment: exit code %d\n%s", where, sub, strings.Join(args, " "), code, out)
	}
}

func sortedKeys[V any](m map[string]V) []string { return slices.Sorted(maps.Keys(m)) }

// hasFlag reports whether args set the boolean flag name.
func hasFlag(args []string, name string) bool {
	for _, a := range args {
		if a == "-"+name || a == "--"+name || a == "-"+name+"=true" || a == "--"+name+"=true" {
			return true
		}
	}
	return false
}

// checkServeAuth applies serve's rule (serve --help; cmd/dampfront/auth.go)
// to a serve container listening on the non-loopback addr: it must have
// a tokens file, or say --insecure-no-auth, which production forbids. It
// returns the tokens file's path, or "".
func checkServeAuth(t *testing.T, where string, args []string, env map[string]string, production bool) string {
	t.Helper()
	u := helpOf(t, "serve")
	for _, f := range []string{"tokens", "insecure-no-auth"} {
		if _, ok := u.flags[f]; !ok {
			t.Fatalf("serve has no --%s; update this check to the binary's authentication", f)
		}
	}
	tokens := effective(t, "serve", args, env, "tokens")
	insecure := hasFlag(args, "insecure-no-auth")
	switch {
	case tokens.value != "" && insecure:
		t.Errorf("%s: both a tokens file and --insecure-no-auth, which serve refuses", where)
	case tokens.value == "" && !insecure:
		t.Errorf("%s: no tokens file and no --insecure-no-auth: serve refuses a non-loopback address so", where)
	case production && tokens.value == "":
		t.Errorf("%s: serves without authentication (--insecure-no-auth)", where)
	}
	return tokens.value
}
