// Package api is the gRPC face of dampfront: the protobuf definitions of
// package dampfront.v1 (proto/, generated Go code in gen/dampfront/v1),
// the conversion between those messages and the Go types of the study
// (dampfront/jobs/study) and the model, the encoding of what the job
// engine stores, and the DampfrontService handlers.
//
// # Layout
//
//	proto/dampfront/v1/*.proto   the API (buf lint clean, STANDARD rules)
//	gen/dampfront/v1/            generated code, committed; ./generate.sh
//	convert*.go                  protobuf <-> study and model, field paths of errors
//	codec.go                     the stored spec and solution bytes; NewOpener
//	spec_plan.go                 a request's spec checked, limited, compiled
//	server*.go                   the service over a jobs engine
//
// # Wiring
//
// A serve command opens the job engine with the study package's opener
// over the stored encoding (NewOpener, which builds the runs from stored
// specs), starts it, and serves a Server over it:
//
//	engine, _ := jobs.Open(ctx, cfg, api.NewOpener(0))
//	engine.Start(ctx)
//	srv, _ := api.NewServer(engine, api.Options{})
//	srv.Serve(ctx, lis) // until ctx ends; then GracefulStop, Stop after Options.StopTimeout
//	engine.Stop(stopCtx)
//
// Serve registers the standard health service and server reflection
// beside DampfrontService; Register and NewGRPCServer do the same for a
// caller that runs its own grpc.Server.
//
// # Units
//
// Messages carry SI values, the unit in every physical field's name
// (sprung_mass_kg, tyre_rate_n_per_m); nothing in this package converts to
// trade units. Damping ratios and factors are dimensionless.
//
// # Errors
//
// Every handler returns a status with a canonical code and an ErrorInfo of
// domain "dampfront" (AIP-193). Input problems are InvalidArgument with a
// BadRequest holding one field violation per bad field; its path is the
// field's path in the request, such as
// "spec.vehicle.corners[2].tyre_rate_n_per_m", whichever layer (this
// package, the study, the model, the optimiser or the job engine) found
// the problem. Limits are ResourceExhausted, checked before the work they
// bound.
package api

//go:generate ./generate.sh
