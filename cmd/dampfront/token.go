package main

import (
	"context"
	"crypto/rand"
	"fmt"

	"dampfront/api"
)

// tokenAbout is the help text of token.
const tokenAbout = `
Makes a new random bearer token (256 bits from the system's cryptographic
source) and prints two lines on standard output: the token, for its user
to set as $DAMPFRONT_TOKEN, and the entry of the server's tokens file
(serve --tokens), which holds the token's SHA-256 only. The token is
stored nowhere and cannot be shown again. To revoke it, delete its entry
from the tokens file and send the server SIGHUP (kill -HUP PID): it reads
the file again and refuses the token from its next call on, without a
restart.

Roles: reader reads jobs, fronts and watches; submitter also submits,
evaluates, compares, draws curves and cancels the jobs it submitted; admin
may do everything, cancel any job included. Jobs record the submitting
token's name in their label dampfront.owner.`

var tokenCommand = &command{name: "token", synopsis: "new --name NAME --role ROLE", minArgs: 1, maxArgs: 1,
	summary: "make a bearer token for a client and its line for the server's tokens file", about: tokenAbout, flags: bindToken}

func bindToken(fs *flagSet, _ *env) (runFunc, error) {
	name := fs.String("name", "", "`name` of the token, who or what uses it: 1 to 63 of a-z, 0-9, '.', '_', '-'")
	role := fs.String("role", "", "`role` of the token: reader, submitter or admin")
	return func(_ context.Context, e *env, in *parsed) error { return runToken(e, in.args[0], *name, *role) }, nil
}

func runToken(e *env, action, name, role string) error {
	if action != "new" {
		return usagef("token", "unknown action %q; the only one is new", action)
	}
	if name == "" || role == "" {
		return usagef("token", "--name and --role are required")
	}
	if err := api.CheckTokenName(name); err != nil {
		return usagef("token", "--name: %v", err)
	}
	r, err := api.ParseRole(role)
	if err != nil {
		return usagef("token", "--role: %v", err)
	}
	tok, err := api.NewToken(rand.Reader)
	if err != nil {
		return err
	}
	fmt.Fprintln(e.stdout, tok)
	fmt.Fprintf(e.stdout, "- {name: %q, role: %q, sha256: %q}\n", name, r.String(), api.HashToken(tok))
	fmt.Fprintln(e.stderr, "dampfront token: line 1 is the token, for its user only ($DAMPFRONT_TOKEN); line 2 goes in the server's tokens file.")
	return nil
}
