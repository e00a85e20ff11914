package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// readmeCommand returns the arguments of the first command of README.md's
// shell examples that starts with "dampfront "+sub, up to a shell "&&",
// "|", ">" or comment, with JOB replaced by job and paths under testdata/
// made relative to this package.
func readmeCommand(t *testing.T, sub, job string) []string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range strings.Split(string(b), "\n") {
		if !strings.HasPrefix(line, "dampfront "+sub+" ") {
			continue
		}
		var args []string
		for _, f := range strings.Fields(line)[1:] {
			if f == "&&" || f == "|" || f == ">" || strings.HasPrefix(f, "#") {
				break
			}
			switch {
			case f == "JOB":
				f = job
			case strings.HasPrefix(f, "testdata/"):
				f = testdataPath(strings.TrimPrefix(f, "testdata/"))
			}
			args = append(args, f)
		}
		return args
	}
	t.Fatalf("README.md has no example of dampfront %s", sub)
	return nil
}
