// Package jobs is dampfront's durable job engine: it stores job specs,
// runs their optimisation runs as chains of bounded slices on River,
// checkpoints them, and keeps their progress and Pareto fronts, in the
// embedded SQLite file (default) or in PostgreSQL (many workers on many
// hosts sharing one database).
//
// The package knows the optimiser only through Run and RunOpener, and
// the API only through opaque spec and detail bytes; the wiring code
// implements those. It imports neither dampfront/api nor the optimiser;
// of dampfront/model it uses only the text check of labels (TextProblem).
//
// # Data flow
//
//	Submit(spec, labels)
//	  tx { dampfront_job row (queued) + labels; River job "dampfront_slice" #1 }
//
//	a worker fetches slice n (River)
//	  JobStart: job -> running, lease := client/river-job/attempt/snoozes
//	  Open(spec, last checkpoint or nil) -> Run
//	  loop Step(ctx, StepGenerations) until
//	      done | SliceDuration elapsed | cancel flag seen | engine stopping
//	    every ProgressInterval:   progress (lease-checked)
//	    every CheckpointInterval: tx { checkpoint + progress, front }
//	  end of slice, one transaction:
//	    done:       checkpoint + progress, front, job -> succeeded, complete slice n
//	    cancelled:  checkpoint + progress, front, job -> cancelled (partial), complete slice n
//	    otherwise:  checkpoint + progress, front, insert slice n+1, complete slice n
//
//	Get, List, Watch (polls), Front (terminal jobs only) read the tables.
//
// Because the checkpoint, the next slice and the completion of the
// current one commit together, a job is never lost and has at most one
// queued or running slice: after a crash the slice is still "running" in
// River's table and is run again from the last checkpoint, either by
// River's rescuer (RescueStuckJobsAfter = SliceDuration + SliceGrace +
// RescueMargin, finite: River never rescues a job with timeout -1) or, at
// once, by Start on the same node, which releases slices whose process is
// gone. Every write of a slice run carries its lease; a run that has been
// superseded by a rescued one gets ErrFailedPrecondition and writes
// nothing, so the stored checkpoint always belongs to one run.
//
// A slice whose attempts run out (MaxAttempts: its workers killed
// mid-slice again and again, or its runs failing) is discarded by River.
// Its job then goes on with a fresh slice from its last checkpoint, at
// most MaxRequeues times, and then fails with the reason, keeping the
// front of that checkpoint (partial). The worker of a failing last
// attempt settles the job itself; when no worker saw the end (the last
// attempt's worker was killed, and River's rescuer or a restart of its
// node discarded the slice), the job is stranded: queued or running with
// no slice in River's queue. Every working engine reaps stranded jobs at
// Start and every ReapInterval (strand.go); a fence on the job's requeue
// count keeps two engines from settling one job twice.
//
// A slice run that fails because the database is unreachable or full
// (IsUnavailable) is snoozed for RetryDelay rather than retried: River
// runs it again without spending one of MaxAttempts, so a database
// outage of any length delays jobs and fails none.
//
// Determinism: the engine hands the run exactly the bytes its last
// Checkpoint returned and never keeps a half-run generation (Run.Step
// must stop at a generation boundary), so a seeded job ends with the same
// front, bit for bit, in one slice, in many, or across a kill and resume.
// Floats are stored as IEEE 754 bits, not decimals.
//
// Cancellation sets a flag in dampfront_job; the running slice polls it
// every CancelPollInterval (and a Cancel in the same process interrupts
// it directly). The cancelled job keeps the front of its last generation,
// marked partial. A job with no slice running (queued, between slices,
// or stranded) is cancelled by Cancel itself, with the front of its last
// checkpoint, and its queued slice is cancelled in River; a stranded job
// with the flag set is cancelled by the reaper. Stop (for SIGTERM) makes every running slice stop after
// its current generation, checkpoint and queue its next slice, within
// StopTimeout; then their contexts are cancelled.
//
// # Tables
//
// River's own (river_job, river_leader, ...) and, prefixed dampfront_:
// job (spec, state, times, error, partial, cancel flag, lease, progress),
// job_label (for filtering), checkpoint (one per job), front (one row per
// solution) and migration (applied versions). Migrations are embedded SQL
// files, numbered, one directory per backend (migrations/sqlite,
// migrations/postgres), applied by Open. Times are stored as int64
// nanoseconds since the Unix epoch, UTC.
//
// # Errors
//
// Input problems are *InvalidArgumentError values naming each bad field
// (errors.Is ErrInvalidArgument); unknown IDs *NotFoundError (ErrNotFound);
// operations the job's state forbids, such as the front of a running job
// or the cancel of a finished one, *PreconditionError
// (ErrFailedPrecondition). The API layer maps these to gRPC codes.
package jobs
