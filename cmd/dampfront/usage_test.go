package main

import (
	"strings"
	"testing"
)

// Usage and input errors exit with code 2 before any server is reached:
// the address below has no server behind it (port 9 is the discard
// service, not served here), so a test that got as far as dialling would
// fail with another message or code.
func TestUsageErrorsExit2(t *testing.T) {
	t.Parallel()
	noServer := "--addr=127.0.0.1:9"
	tests := []struct {
		name string
		env  []string
		args []string
		want string // in stderr
	}{
		{"no subcommand", nil, nil, "Usage: dampfront SUBCOMMAND"},
		{"unknown subcommand", nil, []string{"frobnicate"}, `unknown subcommand "frobnicate"`},
		{"help of unknown", nil, []string{"help", "frobnicate"}, `unknown subcommand "frobnicate"`},
		{"unknown flag", nil, []string{"list", "--bogus", noServer}, "flag provided but not defined: -bogus"},
		{"front without job", nil, []string{"front", noServer}, "missing argument\nUsage: dampfront front [flags] JOB\n"},
		{"front two jobs", nil, []string{"front", "a", "b", noServer}, `unexpected argument "b"`},
		{"front bad format", nil, []string{"front", "a", "--format", "xml", noServer}, `"xml" is not one of table, csv, json`},
		{"front negative rows", nil, []string{"front", "a", "--rows", "-1", noServer}, "--rows must not be negative"},
		{"list bad state", nil, []string{"list", "--state", "sleeping", noServer}, `--state "sleeping"`},
		{"list bad label", nil, []string{"list", "--label", "car", noServer}, `label "car" is not key=value`},
		{"submit without spec", nil, []string{"submit", noServer}, "Usage: dampfront submit [flags] SPEC\n"},
		{"submit quiet and json", nil, []string{"submit", "x.yaml", "--watch", "--quiet", "--json", noServer}, "--quiet and --json exclude each other"},
		{"submit bad seed", nil, []string{"submit", testdataPath("demo-job.yaml"), "--seed", "-3", noServer}, `--seed "-3"`},
		{"watch without job", nil, []string{"watch", noServer}, "Usage: dampfront watch [flags] JOB\n"},
		{"cancel without job", nil, []string{"cancel", noServer}, "Usage: dampfront cancel [flags] JOB...\n"},
		{"eval without setup", nil, []string{"eval", "--job", "a", noServer}, "--setup is required"},
		{"eval without source", nil, []string{"eval", "--setup", "s.yaml", noServer}, "give either --spec"},
		{"eval both sources", nil, []string{"eval", "--setup", "s.yaml", "--job", "a", "--spec", "x.yaml", noServer}, "give either --spec"},
		{"check without setup", nil, []string{"check", "a", noServer}, "--setup is required"},
		{"check negative epsilon", nil, []string{"check", "a", "--setup", "s.yaml", "--epsilon", "-0.1", noServer}, "--epsilon must be >= 0"},
		{"check epsilon not a number", nil, []string{"check", "a", "--setup", "s.yaml", "--epsilon", "tiny", noServer}, `invalid value "tiny"`},
		{"curves two targets", nil, []string{"curves", "a", "--solution", "1", "--balanced", noServer}, "at most one of --solution, --balanced and --setup"},
		{"curves negative solution", nil, []string{"curves", "a", "--solution", "-2", noServer}, "--solution must be a front index >= 0"},
		{"curves half band", nil, []string{"curves", "a", "--adjust-bump", "0.3,1.0", noServer}, "give both --adjust-bump and --adjust-rebound"},
		{"curves reversed band", nil, []string{"curves", "a", "--adjust-bump", "1.0,0.3", "--adjust-rebound", "0.5,1.4", noServer}, "has MAX below MIN"},
		{"serve bad log format", nil, []string{"serve", "--log-format", "xml", "--addr", "127.0.0.1:0"}, `--log-format "xml"`},
		{"serve bad env workers", []string{"DAMPFRONT_WORKERS=two"}, []string{"serve", "--addr", "127.0.0.1:0"}, `$DAMPFRONT_WORKERS="two" is not an integer`},
		{"serve bad env duration", []string{"DAMPFRONT_SLICE=long"}, []string{"serve", "--addr", "127.0.0.1:0"}, `$DAMPFRONT_SLICE="long" is not a duration`},
		{"serve positional", nil, []string{"serve", "extra"}, `unexpected argument "extra"`},
		{"worker without workers", nil, []string{"worker", "--workers", "0"}, "--workers must be at least 1"},
		{"demo negative workers", nil, []string{"demo", "--eval-workers", "-1"}, "--eval-workers must not be negative"},
		// Input files are read and checked before the server is dialled.
		{"spec not yaml", nil, []string{"submit", testdataPath("bad/not-yaml.yaml"), noServer}, "not YAML or JSON"},
		{"spec misspelt field", nil, []string{"submit", testdataPath("bad/misspelt-field.yaml"), noServer}, `unknown field "sprung_mass"`},
		{"spec missing file", nil, []string{"submit", "no-such-spec.yaml", noServer}, "no-such-spec.yaml"},
		{"setup missing file", nil, []string{"check", "a", "--setup", "no-such-setup.yaml", noServer}, "no-such-setup.yaml"},
		{"setup is a spec", nil, []string{"eval", "--job", "a", "--setup", testdataPath("demo-job.yaml"), noServer}, "not a dampfront.v1.Setup"},
		{"roads not a list", nil, []string{"eval", "--spec", testdataPath("demo-job.yaml"), "--roads", testdataPath("candidate-setup.yaml"), "--setup", testdataPath("candidate-setup.yaml"), noServer}, "must be a list of RoadCase"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			t.Parallel()
			r := mustRun(t, exitUsage, tt.env, tt.args...)
			if !strings.Contains(r.stderr, tt.want) {
				t.Errorf("stderr does not contain %q:\n%s", tt.want, r.stderr)
			}
		})
	}
}

// Every subcommand answers --help on standard output with its synopsis
// and exit code 0, and "dampfront help NAME" does the same.
func TestHelpOnEverySubcommand(t *testing.T) {
	t.Parallel()
	for _, c := range commands {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			for _, args := range [][]string{{c.name, "--help"}, {c.name, "-h"}, {"help", c.name}} {
				r := mustRun(t, exitOK, nil, args...)
				if !strings.HasPrefix(r.stdout, "Usage: dampfront "+c.name+" ") {
					t.Errorf("%v: stdout does not start with the usage line:\n%s", args, r.stdout)
				}
			}
		})
	}
	r := mustRun(t, exitOK, nil, "help")
	for _, c := range commands {
		if !strings.Contains(r.stdout, "  "+c.name+" ") {
			t.Errorf("dampfront help does not list %s:\n%s", c.name, r.stdout)
		}
	}
}

// A client with no server behind its address fails with exit code 1 (no
// input error) and says the server is unavailable; check, which keeps
// exit code 1 for a failed check, gives 2.
func TestNoServer(t *testing.T) {
	t.Parallel()
	addr := "--addr=127.0.0.1:9"
	r := mustRun(t, exitFailure, nil, "list", addr, "--timeout", "2s")
	if !strings.Contains(r.stderr, "unavailable") {
		t.Errorf("list without a server: stderr does not say unavailable:\n%s", r.stderr)
	}
	mustRun(t, exitUsage, nil, "check", "a", "--setup", testdataPath("candidate-setup.yaml"), addr, "--timeout", "2s")
}

// token new --help tells how to revoke a token as the server does it: a
// SIGHUP reloads the tokens file (TestServeReloadsOnSIGHUP), no restart.
func TestTokenHelpRevokesWithSIGHUP(t *testing.T) {
	t.Parallel()
	r := mustRun(t, exitOK, nil, "token", "new", "--help")
	if !strings.Contains(r.stdout, "SIGHUP") || strings.Contains(r.stdout, "restart the server") {
		t.Errorf("token new --help does not say that SIGHUP revokes a deleted token:\n%s", r.stdout)
	}
}
