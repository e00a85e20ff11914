package api

import (
	"bytes"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// pinnedTools are the code generators and their versions, as generate.sh
// pins them; the generated code records the plugin versions in its header,
// so any other version gives different bytes.
var pinnedTools = []struct{ name, version string }{
	{"buf", "1.75.0"},
	{"protoc-gen-go", "1.36.12"},
	{"protoc-gen-go-grpc", "1.6.2"},
}

// toolPath finds the generators where generate.sh installs them (GOBIN or
// GOPATH/bin) or on PATH, and skips the test when one is missing or at
// another version.
func toolPath(t *testing.T) string {
	t.Helper()
	var dirs []string
	if out, err := exec.Command("go", "env", "GOBIN", "GOPATH").Output(); err == nil {
		lines := strings.Split(strings.TrimSpace(string(out)), "\n")
		if len(lines) > 0 && strings.TrimSpace(lines[0]) != "" {
			dirs = append(dirs, strings.TrimSpace(lines[0]))
		}
		if len(lines) > 1 {
			dirs = append(dirs, filepath.Join(strings.TrimSpace(lines[1]), "bin"))
		}
	}
	path := strings.Join(append(dirs, os.Getenv("PATH")), string(os.PathListSeparator))
	for _, tool := range pinnedTools {
		cmd := exec.Command(tool.name, "--version")
		cmd.Env = append(os.Environ(), "PATH="+path)
		out, err := cmd.Output()
		if err != nil {
			t.Skipf("%s is not installed; run api/generate.sh --install-tools (installs buf v1.75.0, protoc-gen-go v1.36.12, protoc-gen-go-grpc v1.6.2)", tool.name)
		}
		f := strings.Fields(string(out))
		if len(f) == 0 || strings.TrimPrefix(f[len(f)-1], "v") != tool.version {
			t.Skipf("%s is at %q, not %s; run api/generate.sh --install-tools", tool.name, strings.TrimSpace(string(out)), tool.version)
		}
	}
	return path
}

// TestGeneratedCodeIsCurrent regenerates the Go code into a temporary
// directory and fails when it differs from the committed gen/ tree, file
// by file and byte for byte; it also runs buf lint on the protos.
func TestGeneratedCodeIsCurrent(t *testing.T) {
	t.Parallel()
	path := toolPath(t)
	run := func(args ...string) {
		t.Helper()
		cmd := exec.Command(args[0], args[1:]...)
		cmd.Env = append(os.Environ(), "PATH="+path)
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("%s: %v\n%s", strings.Join(args, " "), err, out)
		}
	}
	run("buf", "lint")
	tmp := t.TempDir()
	run("buf", "generate", "--template", "buf.gen.yaml", "-o", tmp)

	want := readTree(t, filepath.Join(tmp, "gen"))
	got := readTree(t, "gen")
	for name, b := range want {
		c, ok := got[name]
		switch {
		case !ok:
			t.Errorf("gen/%s is missing; run api/generate.sh", name)
		case !bytes.Equal(b, c):
			t.Errorf("gen/%s is stale; run api/generate.sh", name)
		}
	}
	for name := range got {
		if _, ok := want[name]; !ok {
			t.Errorf("gen/%s is not generated from the protos; remove it or run api/generate.sh", name)
		}
	}
}

// readTree returns the files under root by slash-separated relative path.
func readTree(t *testing.T, root string) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(root, p)
		out[filepath.ToSlash(rel)] = b
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}
