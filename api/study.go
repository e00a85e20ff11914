package api

import (
	"context"
	"crypto/sha256"
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
// It implements jobs.RunOpener and jobs.SpecValidator.
type Opener struct {
	// Workers is the number of evaluations a study runs at once; 0 means
	// GOMAXPROCS. The front does not depend on it.
	Workers int

	// details keeps the encoded details of front members across the
	// studies this opener makes, so that a job resumed in its next slice
	// does not evaluate its whole front again.
	details detailCache
}

var (
	_ jobs.RunOpener     = (*Opener)(nil)
	_ jobs.SpecValidator = (*Opener)(nil)
	_ jobs.Run           = (*jobStudy)(nil)
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
func (o *Opener) Open(spec, checkpoint []byte) (jobs.Run, error) {
	s, err := unmarshalSpec(spec)
	if err != nil {
		return nil, err
	}
	pl, err := compile(s, "spec.")
	if err != nil {
		return nil, err
	}
	js, err := openStudy(pl, o.workers(), checkpoint)
	if err != nil {
		return nil, err
	}
	js.cache, js.specKey = &o.details, specKey(spec)
	return js, nil
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
	js := &jobStudy{plan: pl}
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
	opt  *optimizer.Search

	mu   sync.Mutex
	last optimizer.Progress // after the last completed generation

	// cache holds the encoded details of front members by spec and genes:
	// a member's detail never changes, and the front is asked for at
	// every checkpoint. nil caches nothing.
	cache   *detailCache
	specKey string
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
	for i, s := range front {
		key := js.specKey + geneKey(s.Genes)
		detail, ok := js.cache.get(key)
		if !ok {
			var err error
			if detail, err = js.detail(s); err != nil {
				return nil, err
			}
			js.cache.put(key, detail)
		}
		out[i] = jobs.Solution{Index: i, Genes: s.Genes, Objectives: s.Objectives, Violations: s.Violations, Feasible: s.Feasible, Detail: detail}
	}
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

// specKey identifies spec bytes in the detail cache.
func specKey(spec []byte) string {
	h := sha256.Sum256(spec)
	return string(h[:])
}

// maxCachedDetails bounds the detail cache: about 10 kB each with the
// default curve tabulation, so some 20 MB at most.
const maxCachedDetails = 2048

// detailCache maps spec and genes to an encoded solution detail. It is
// safe for concurrent use; a nil *detailCache caches nothing. When full
// it is emptied: the members of the fronts being run come back at the
// next checkpoint.
type detailCache struct {
	mu sync.Mutex
	m  map[string][]byte
}

func (c *detailCache) get(key string) ([]byte, bool) {
	if c == nil {
		return nil, false
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	b, ok := c.m[key]
	return b, ok
}

func (c *detailCache) put(key string, b []byte) {
	if c == nil {
		return
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.m == nil || len(c.m) >= maxCachedDetails {
		c.m = make(map[string][]byte)
	}
	c.m[key] = b
}
