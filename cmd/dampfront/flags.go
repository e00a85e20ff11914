package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"strconv"
	"strings"
	"time"
)

// flagSet is a subcommand's flag.FlagSet with its usage text: the
// synopsis, what the subcommand does, then the flags. Parse errors give a
// *usageError (exit code 2); --help prints the usage on stdout and ends
// the subcommand with exit code 0.
type flagSet struct {
	*flag.FlagSet
	name     string
	synopsis string
	about    string
	out      io.Writer
}

// newFlagSet makes the flags of subcommand name; synopsis follows
// "dampfront name", about is the paragraph under it.
func newFlagSet(e *env, name, synopsis, about string) *flagSet {
	fs := &flagSet{FlagSet: flag.NewFlagSet(name, flag.ContinueOnError), name: name, synopsis: synopsis, about: about, out: e.stdout}
	fs.SetOutput(io.Discard) // parse errors are reported by finish, usage by printUsage
	return fs
}

func (fs *flagSet) printUsage(w io.Writer) {
	fmt.Fprintf(w, "Usage: dampfront %s %s\n\n%s\n", fs.name, fs.synopsis, strings.TrimSpace(fs.about))
	n := 0
	fs.VisitAll(func(*flag.Flag) { n++ })
	if n == 0 {
		return
	}
	fmt.Fprintln(w, "\nFlags:")
	fs.SetOutput(w)
	fs.PrintDefaults()
	fs.SetOutput(io.Discard)
}

// errHelp ends a subcommand after --help with exit code 0.
var errHelp = &exitError{code: exitOK}

// parse parses args, flags and positional arguments in any order (a lone
// "--" ends the flags), and checks the number of positional arguments.
func (fs *flagSet) parse(args []string, minArgs, maxArgs int) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				fs.printUsage(fs.out)
				return nil, errHelp
			}
			return nil, usagef(fs.name, "%v", err)
		}
		rest := fs.Args()
		if len(rest) == 0 {
			break
		}
		if len(args) > len(rest) && args[len(args)-len(rest)-1] == "--" {
			pos = append(pos, rest...)
			break
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
	switch {
	case len(pos) < minArgs:
		return nil, usagef(fs.name, "missing argument")
	case maxArgs >= 0 && len(pos) > maxArgs:
		return nil, usagef(fs.name, "unexpected argument %q", pos[maxArgs])
	}
	return pos, nil
}

// envOr returns $key, or def when it is unset or empty.
func envOr(e *env, key, def string) string {
	if v := e.getenv(key); v != "" {
		return v
	}
	return def
}

// envDefaults reads flag defaults from $DAMPFRONT_* variables for
// subcommand cmd; err keeps the first malformed value as a usage error.
type envDefaults struct {
	e   *env
	cmd string
	err error
}

// envValue is envOr for a value that parse reads; a malformed one is a
// usage error saying that it is not what.
func envValue[T any](d *envDefaults, key string, def T, parse func(string) (T, error), what string) T {
	v := d.e.getenv(key)
	if v == "" {
		return def
	}
	x, err := parse(v)
	if err != nil {
		if d.err == nil {
			d.err = usagef(d.cmd, "$%s=%q is not %s", key, v, what)
		}
		return def
	}
	return x
}

func (d *envDefaults) int(key string, def int) int {
	return envValue(d, key, def, strconv.Atoi, "an integer")
}

func (d *envDefaults) bool(key string, def bool) bool {
	return envValue(d, key, def, strconv.ParseBool, "true or false")
}

func (d *envDefaults) duration(key string, def time.Duration) time.Duration {
	return envValue(d, key, def, time.ParseDuration, "a duration (e.g. 90s, 2m)")
}

// stringList is a flag that may be given several times.
type stringList []string

func (l *stringList) String() string     { return strings.Join(*l, ",") }
func (l *stringList) Set(s string) error { *l = append(*l, s); return nil }

// labelFlag collects key=value pairs, given several times or comma-separated.
type labelFlag map[string]string

func (l labelFlag) String() string {
	var parts []string
	for k, v := range l {
		parts = append(parts, k+"="+v)
	}
	return strings.Join(parts, ",")
}

func (l labelFlag) Set(s string) error {
	for _, kv := range strings.Split(s, ",") {
		k, v, ok := strings.Cut(kv, "=")
		if !ok || k == "" {
			return fmt.Errorf("label %q is not key=value", kv)
		}
		l[k] = v
	}
	return nil
}

// rangeFlag is MIN,MAX.
type rangeFlag struct {
	min, max float64
	set      bool
}

func (r *rangeFlag) String() string {
	if !r.set {
		return ""
	}
	return fmt.Sprintf("%g,%g", r.min, r.max)
}

func (r *rangeFlag) Set(s string) error {
	a, b, ok := strings.Cut(s, ",")
	if !ok {
		return fmt.Errorf("%q is not MIN,MAX", s)
	}
	lo, err1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
	hi, err2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
	if err1 != nil || err2 != nil {
		return fmt.Errorf("%q is not MIN,MAX with two numbers", s)
	}
	if hi < lo {
		return fmt.Errorf("%q has MAX below MIN", s)
	}
	r.min, r.max, r.set = lo, hi, true
	return nil
}

// formatFlag is one of a fixed set of output formats.
type formatFlag struct {
	value   string
	allowed []string
}

func newFormat(def string, allowed ...string) *formatFlag {
	return &formatFlag{value: def, allowed: allowed}
}

func (f *formatFlag) String() string { return f.value }

func (f *formatFlag) Set(s string) error {
	for _, a := range f.allowed {
		if s == a {
			f.value = s
			return nil
		}
	}
	return fmt.Errorf("%q is not one of %s", s, strings.Join(f.allowed, ", "))
}
