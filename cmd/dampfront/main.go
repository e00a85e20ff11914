// Command dampfront is the one binary of the dampfront service: the gRPC
// server with its embedded worker, a worker alone, and the client
// subcommands that submit damper-ratio searches, watch them, and print
// fronts, evaluations, CI checks and damper curves. Run "dampfront help"
// for the list of subcommands and "dampfront SUBCOMMAND --help" for each.
package main

import (
	"context"
	"os"
	"os/signal"
	"syscall"
)

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := run(ctx, os.Args[1:], &env{stdin: os.Stdin, stdout: os.Stdout, stderr: os.Stderr, getenv: os.Getenv})
	stop()
	os.Exit(code)
}
