package main

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

var updateHelp = flag.Bool("update-help", false, "write testdata/help.golden again from the current binary's help texts")

// The help texts are the user's manual at the terminal: every
// subcommand's --help and "help NAME", the top usage, and the usage error
// of an unknown flag stay byte for byte as recorded in
// testdata/help.golden (recorded from the binary itself; the expected
// bytes are the project's own, no outside source). The environment is
// empty, so defaults read from $DAMPFRONT_* are the built-in ones.
func TestHelpTextsUnchanged(t *testing.T) {
	t.Parallel()
	var got bytes.Buffer
	record := func(args ...string) {
		var out, errOut bytes.Buffer
		e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errOut, getenv: func(string) string { return "" }}
		code := run(context.Background(), args, e)
		fmt.Fprintf(&got, "=== dampfront %s\n--- exit %d\n--- stdout\n%s--- stderr\n%s", strings.Join(args, " "), code, out.String(), errOut.String())
	}
	record()
	record("help")
	for _, c := range commands {
		record(c.name, "--help")
		record("help", c.name)
		record(c.name, "--no-such-flag")
	}
	// verify --parallel defaults to the number of CPUs of the machine.
	perCPU := fmt.Sprintf("one per CPU by default (default %d)", runtime.NumCPU())
	text := strings.ReplaceAll(got.String(), perCPU, "one per CPU by default (default NCPU)")
	path := filepath.Join("testdata", "help.golden")
	if *updateHelp {
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if text != string(want) {
		gl, wl := strings.Split(text, "\n"), strings.Split(string(want), "\n")
		for i := range min(len(gl), len(wl)) {
			if gl[i] != wl[i] {
				t.Fatalf("help texts differ from %s at line %d:\ngot:  %q\nwant: %q", path, i+1, gl[i], wl[i])
			}
		}
		t.Fatalf("help texts differ from %s in length: %d lines, want %d", path, len(gl), len(wl))
	}
}
