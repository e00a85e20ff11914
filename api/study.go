package api

import (
	"context"
	"encoding/binary"
	"fmt"
	"math"
	"runtime"
	"sync"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/optimizer"
)

// Opener builds the job engine's studies from stored specs: the spec
// bytes are a deterministic protobuf encoding of a JobSpec with its
// defaults filled in (see MarshalSpec), the checkpoint is the optimiser's.
// It implements jobs.StudyOpener and jobs.SpecValidator.
type Opener struct {
	// Workers is the number of evaluations a study runs at once; 0 means
	// GOMAXPROCS. The front does not depend on it.
	Workers int
}

var (
	_ jobs.StudyOpener   = (*Opener)(nil)
	_ jobs.SpecValidator = (*Opener)(nil)
	_ jobs.Study         = (*jobStudy)(nil)
)

// MarshalSpec returns the bytes the engine stores for a spec: its
// defaults filled in, deterministically encoded, so that equal specs give
// equal bytes.
func MarshalSpec(spec *pb.JobSpec) ([]byte, error) {
	return proto.MarshalOptions{Deterministic: true}.Marshal(withDefaults(spec))
}

// unmarshalSpec decodes stored spec bytes.
func unmarshalSpec(b []byte) (*pb.JobSpec, error) {
	s := &pb.JobSpec{}
	if err := proto.Unmarshal(b, s); err != nil {
		return nil, fmt.Errorf("spec is not a dampfront.v1.JobSpec: %w", err)
	}
	return s, nil
}

// ValidateSpec checks spec bytes as Open would; problems are a
// *jobs.InvalidArgumentError with paths under "spec.".
func (o *Opener) ValidateSpec(spec []byte) error {
	s, err := unmarshalSpec(spec)
	if err != nil {
		return &jobs.InvalidArgumentError{Violations: []jobs.FieldError{{Field: "spec", Reason: err.Error()}}}
	}
	if _, err := compile(s, "spec."); err != nil {
		return statusToJobsError(err)
	}
	return nil
}

// Open returns the study of a stored spec, fresh when checkpoint is nil
// and restored from it otherwise.
func (o *Opener) Open(spec, checkpoint []byte) (jobs.Study, error) {
	s, err := unmarshalSpec(spec)
	if err != nil {
		return nil, err
	}
	pl, err := compile(s, "spec.")
	if err != nil {
		return nil, err
	}
	return openStudy(pl, o.workers(), checkpoint)
}

func (o *Opener) workers() int {
	if o.Workers > 0 {
		return o.Workers
	}
	return runtime.GOMAXPROCS(0)
}

// openStudy makes the optimiser study of a plan, restored from
// checkpoint unless it is nil.
func openStudy(pl *plan, workers int, checkpoint []byte) (*jobStudy, error) {
	js := &jobStudy{plan: pl, details: map[string][]byte{}}
	settings := pl.optimizerSettings(workers, js.record)
	var err error
	if checkpoint == nil {
		js.opt, err = optimizer.New(pl.problem(), settings)
	} else {
		js.opt, err = optimizer.Restore(pl.problem(), settings, checkpoint)
	}
	if err != nil {
		return nil, err
	}
	if h := js.opt.History(); len(h) > 0 {
		js.last = h[len(h)-1]
	}
	return js, nil
}

// jobStudy is one job's search as the engine drives it.
type jobStudy struct {
	plan *plan
	opt  *optimizer.Study

	mu   sync.Mutex
	last optimizer.Progress // after the last completed generation

	// details caches the encoded detail of front members by their genes'
	// bits: a member's detail never changes, and the front is asked for
	// at every checkpoint.
	details map[string][]byte
}

// record is the optimiser's progress callback.
func (js *jobStudy) record(p optimizer.Progress) {
	js.mu.Lock()
	js.last = p
	js.mu.Unlock()
}

func (js *jobStudy) Step(ctx context.Context, maxGenerations int) (bool, error) {
	return js.opt.Step(ctx, maxGenerations)
}

func (js *jobStudy) Checkpoint() ([]byte, error) { return js.opt.Checkpoint() }

func (js *jobStudy) Progress() jobs.Progress {
	js.mu.Lock()
	p := js.last
	js.mu.Unlock()
	return jobs.Progress{
		Generation:  p.Generation,
		Generations: js.plan.settings.Generations,
		Evaluations: int64(p.Evaluations),
		Hypervolume: p.Hypervolume,
		Best:        append([]float64(nil), p.Best...),
	}
}

// Front returns the optimiser's archive with each member's detail: a
// dampfront.v1.Solution with its metrics on every road case, modes and
// damper curves. Genes, objectives and violations are the optimiser's,
// bit for bit.
func (js *jobStudy) Front() ([]jobs.Solution, error) {
	front := js.opt.Front()
	out := make([]jobs.Solution, len(front))
	seen := make(map[string][]byte, len(front))
	for i, s := range front {
		key := geneKey(s.Genes)
		detail, ok := js.details[key]
		if !ok {
			var err error
			detail, err = js.detail(s)
			if err != nil {
				return nil, err
			}
		}
		seen[key] = detail
		out[i] = jobs.Solution{Index: i, Genes: s.Genes, Objectives: s.Objectives, Violations: s.Violations, Feasible: s.Feasible, Detail: detail}
	}
	js.details = seen
	return out, nil
}

// detail evaluates a front member in full and encodes it.
func (js *jobStudy) detail(s optimizer.Solution) ([]byte, error) {
	pl := js.plan
	setup := pl.study.Design().Decode(s.Genes)
	sol := pl.evaluate(setup)
	// The optimiser's values are the stored ones; a fresh evaluation
	// gives the same bits, and this keeps it so by construction.
	sol.Genes, sol.Objectives, sol.Violations, sol.Feasible = s.Genes, s.Objectives, s.Violations, s.Feasible
	if s.Feasible {
		sol.InfeasibleReason = ""
	} else if s.Reason != "" {
		sol.InfeasibleReason = s.Reason
	}
	return proto.MarshalOptions{Deterministic: true}.Marshal(sol)
}

// geneKey identifies a gene vector by its bits.
func geneKey(x []float64) string {
	b := make([]byte, 8*len(x))
	for i, v := range x {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
	}
	return string(b)
}
