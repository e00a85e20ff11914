package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"
)

// env is what a subcommand may touch of the outside world, so that tests
// could run one in process; the binary passes the real streams.
type env struct {
	stdin          io.Reader
	stdout, stderr io.Writer
	getenv         func(string) string
}

// command is one subcommand, declared: its help text, the bounds of its
// positional arguments, whether it talks to a server, and its own flags.
// The dispatcher (start) makes the flag set, adds the client flags,
// parses, and runs it with what it parsed.
type command struct {
	name     string
	summary  string // its line in "dampfront help"
	synopsis string // follows "dampfront NAME" in the usage line
	about    string // the paragraph under the usage line
	// minArgs and maxArgs bound the positional arguments; maxArgs -1
	// leaves them unbounded.
	minArgs, maxArgs int
	client           bool // adds the client flags (--addr, --timeout, TLS, token)
	// flags declares the subcommand's own flags on fs and returns the run
	// that reads them once parsed; without flags, run is used.
	flags func(fs *flagSet, e *env) (runFunc, error)
	run   runFunc
}

// runFunc runs a subcommand after its flags are parsed.
type runFunc func(ctx context.Context, e *env, in *parsed) error

// parsed is what the dispatcher parsed for a subcommand.
type parsed struct {
	fs     *flagSet     // the flag set, for the flags' Visit
	client *clientFlags // the client flags, nil unless the command is a client
	args   []string     // the positional arguments, within the command's bounds
}

// start makes c's flag set, parses args and runs c.
func (c *command) start(ctx context.Context, e *env, args []string) error {
	fs := newFlagSet(e, c.name, c.synopsis, c.about)
	in := &parsed{fs: fs}
	if c.client {
		in.client = addClientFlags(fs, e)
	}
	run := c.run
	if c.flags != nil {
		var err error
		if run, err = c.flags(fs, e); err != nil {
			return err
		}
	}
	pos, err := fs.parse(args, c.minArgs, c.maxArgs)
	if err != nil {
		return err
	}
	in.args = pos
	return run(ctx, e, in)
}

// commands lists the subcommands in the order "help" shows them.
var commands []*command

func init() {
	commands = []*command{
		serveCommand, workerCommand, migrateCommand, tokenCommand,
		submitCommand, watchCommand, listCommand, getCommand, cancelCommand,
		frontCommand, evalCommand, historyCommand, checkCommand, curvesCommand, sheetCommand, handCommand, verifyCommand, spectrumCommand, plotCommand,
		demoCommand,
	}
}

// Exit codes.
const (
	exitOK      = 0
	exitFailure = 1 // the work failed, or a check did not pass
	exitUsage   = 2 // bad flags or arguments, or unusable input
)

// exitError ends the program with a code and, unless empty, a message.
type exitError struct {
	code int
	msg  string
}

func (e *exitError) Error() string { return e.msg }

// usageError is a bad flag or argument: exit code 2, the message and a
// pointer to --help.
type usageError struct {
	cmd string
	msg string
}

func (e *usageError) Error() string { return e.msg }

func usagef(cmd, format string, args ...any) error {
	return &usageError{cmd: cmd, msg: fmt.Sprintf(format, args...)}
}

// run dispatches args to a subcommand and turns its error into an exit code.
func run(ctx context.Context, args []string, e *env) int {
	if len(args) == 0 {
		topUsage(e.stderr)
		return exitUsage
	}
	name := args[0]
	switch name {
	case "help", "-h", "-help", "--help":
		if len(args) > 1 && name == "help" {
			if c := lookup(args[1]); c != nil {
				return finish(e, c.name, c.start(ctx, e, []string{"--help"}))
			}
			fmt.Fprintf(e.stderr, "dampfront: unknown subcommand %q\n", args[1])
			return exitUsage
		}
		topUsage(e.stdout)
		return exitOK
	}
	c := lookup(name)
	if c == nil {
		fmt.Fprintf(e.stderr, "dampfront: unknown subcommand %q\n\n", name)
		topUsage(e.stderr)
		return exitUsage
	}
	return finish(e, c.name, c.start(ctx, e, args[1:]))
}

func finish(e *env, name string, err error) int {
	if err == nil {
		return exitOK
	}
	var ue *usageError
	if errors.As(err, &ue) {
		synopsis := ""
		if c := lookup(name); c != nil {
			synopsis = c.synopsis
		}
		fmt.Fprintf(e.stderr, "dampfront %s: %s\nUsage: dampfront %s %s\nRun 'dampfront %s --help' for the flags.\n", name, plainLines(ue.msg), name, synopsis, name)
		return exitUsage
	}
	var xe *exitError
	if errors.As(err, &xe) {
		if xe.msg != "" {
			fmt.Fprintf(e.stderr, "dampfront %s: %s\n", name, plainLines(xe.msg))
		}
		return xe.code
	}
	fmt.Fprintf(e.stderr, "dampfront %s: %s\n", name, plainLines(describeError(err)))
	var fe *inputFileError
	if errors.As(err, &fe) || inputError(err) {
		return exitUsage
	}
	return exitFailure
}

func lookup(name string) *command {
	for _, c := range commands {
		if c.name == name {
			return c
		}
	}
	return nil
}

func topUsage(w io.Writer) {
	fmt.Fprint(w, `dampfront searches front and rear, bump and rebound damping ratios of a race
car on a linear four-post model and returns Pareto fronts of grip (tyre load
variation) against platform (ride-height variation).

Usage: dampfront SUBCOMMAND [flags] [arguments]

Subcommands:
`)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, c := range commands {
		fmt.Fprintf(tw, "  %s\t%s\n", c.name, c.summary)
	}
	tw.Flush()
	fmt.Fprint(w, `
Run 'dampfront SUBCOMMAND --help' for the flags of one. Client subcommands
reach the server at --addr or $DAMPFRONT_ADDR (default `+defaultAddr+`),
with the bearer token in $DAMPFRONT_TOKEN and, over TLS, the server's CA
certificate in --tls-ca or $DAMPFRONT_TLS_CA.
Exit codes: 0 success, 1 failure (or a check that did not pass), 2 usage or
input error.
`)
	fmt.Fprintln(w)
	fmt.Fprintln(w, strings.TrimSpace(caution))
}
