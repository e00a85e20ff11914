package api_test

import (
	"context"
	"log"
	"net"
	"os/signal"
	"syscall"
	"time"

	"dampfront/api"
	"dampfront/jobs"
)

// Example_serve wires the service the way a serve command does: the job
// engine opens its database with the API's study opener, starts working,
// and the server serves until SIGTERM or SIGINT, then stops gracefully
// before the engine checkpoints and stops.
func Example_serve() {
	ctx, stop := signal.NotifyContext(context.Background(), syscall.SIGTERM, syscall.SIGINT)
	defer stop()

	engine, err := jobs.Open(ctx, jobs.Config{DatabaseURL: "dampfront.db", Workers: 1}, api.NewOpener(0))
	if err != nil {
		log.Fatal(err)
	}
	defer engine.Close()
	if _, err := engine.Start(ctx); err != nil {
		log.Fatal(err)
	}
	srv, err := api.NewServer(engine, api.Options{MaxJobWork: 20_000_000, StopTimeout: 10 * time.Second})
	if err != nil {
		log.Fatal(err)
	}
	lis, err := net.Listen("tcp", "127.0.0.1:7443")
	if err != nil {
		log.Fatal(err)
	}
	if err := srv.Serve(ctx, lis); err != nil {
		log.Print(err)
	}
	stopCtx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	if err := engine.Stop(stopCtx); err != nil {
		log.Print(err)
	}
}
