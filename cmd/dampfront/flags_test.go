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

// --gc-percent: 50 by default, 0 (the runtime's own) when GOGC is set,
// $DAMPFRONT_GC_PERCENT or the flag over both, a negative value refused
// naming the flag.
func TestGCPercentFlag(t *testing.T) {
	t.Parallel()
	for _, tt := range []struct {
		env  map[string]string
		args []string
		want int
		bad  string
	}{
		{nil, nil, defaultGCPercent, ""},
		{map[string]string{"GOGC": "200"}, nil, 0, ""},
		{map[string]string{"GOGC": "200", "DAMPFRONT_GC_PERCENT": "80"}, nil, 80, ""},
		{map[string]string{"GOGC": "200"}, []string{"--gc-percent", "30"}, 30, ""},
		{nil, []string{"--gc-percent", "-1"}, 0, "--gc-percent must not be negative"},
	} {
		e := &env{stdout: io.Discard, stderr: io.Discard, getenv: func(k string) string { return tt.env[k] }}
		fs := newFlagSet(e, "serve", "", "test")
		ef, err := addEngineFlags(fs, e, true)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := fs.parse(tt.args, 0, 0); err != nil {
			t.Fatalf("%v: %v", tt.args, err)
		}
		err = ef.check("serve")
		if tt.bad != "" {
			if err == nil || !strings.Contains(err.Error(), tt.bad) {
				t.Errorf("%v %v: error %v, want one saying %q", tt.env, tt.args, err, tt.bad)
			}
			continue
		}
		if err != nil || ef.gcPercent != tt.want {
			t.Errorf("%v %v: --gc-percent %d (%v), want %d", tt.env, tt.args, ef.gcPercent, err, tt.want)
		}
	}
}
