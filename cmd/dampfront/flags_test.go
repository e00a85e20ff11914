package main

import (
	"io"
	"strings"
	"testing"
)

// Flags and positional arguments may come in any order; "--" ends flags.
func TestParseInterspersed(t *testing.T) {
	t.Parallel()
	tests := []struct {
		args    []string
		wantPos []string
		format  string
	}{
		{[]string{"JOB"}, []string{"JOB"}, "table"},
		{[]string{"JOB", "--format", "json"}, []string{"JOB"}, "json"},
		{[]string{"--format=csv", "JOB"}, []string{"JOB"}, "csv"},
		{[]string{"A", "--format", "json", "B"}, []string{"A", "B"}, "json"},
		{[]string{"--", "--format"}, []string{"--format"}, "table"},
	}
	for _, tt := range tests {
		e := &env{stdout: io.Discard, stderr: io.Discard, getenv: func(string) string { return "" }}
		fs := newFlagSet(e, "x", "JOB...", "test")
		format := newFormat("table", "table", "csv", "json")
		fs.Var(format, "format", "")
		pos, err := fs.parse(tt.args, 1, -1)
		if err != nil {
			t.Errorf("%v: %v", tt.args, err)
			continue
		}
		if strings.Join(pos, "|") != strings.Join(tt.wantPos, "|") || format.value != tt.format {
			t.Errorf("%v: positional %v format %s, want %v %s", tt.args, pos, format.value, tt.wantPos, tt.format)
		}
	}
}
