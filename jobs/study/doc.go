// Package study is the one home of a job's study: the job spec in plain
// Go types (Spec), every default a spec leaves out (defaults.go), one
// validation of all of it (Validate), its compilation into the model's
// problem and the optimiser's settings (Compile, Plan), the resumable run
// the job engine drives (Opener, a jobs.RunOpener), and the detail of a
// solution (Solution: metrics per road case, modes, damper curves).
//
// It imports no protobuf. The API converts its messages to and from these
// types and maps errors to statuses; how stored specs and solution
// details are encoded is given to the Opener as a Codec, so that the
// bytes of jobs already stored keep their meaning.
//
// Errors about a spec are *model.ValidationError values whose field paths
// are relative to the spec, in the model's lower_snake_case names (for
// example "vehicle.corners[2].tyre_rate_n_per_m", "search.population_size",
// "design_space.base.front.knee_bump"); the API maps them to its own.
//
// A new kind of road case, objective or constraint enters in three places:
// the model (its type, validation and per-case value), a field of Spec or
// of a model type the Spec holds (with its default in defaults.go and its
// size in Size when it adds work), and the API's conversion. Validate and
// Compile pick it up through the model's validators and constructors.
package study
