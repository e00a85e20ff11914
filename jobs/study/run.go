package study

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"math"
	"runtime"
	"sync"

	"dampfront/jobs"
	"dampfront/optimizer"
)

// Codec reads and writes the bytes the job engine stores for a study: the
// spec (with its defaults filled in) and the detail of each front member.
// The API gives the encoding in use, so that jobs stored by any version
// keep their meaning.
type Codec interface {
	DecodeSpec(b []byte) (*Spec, error)
	EncodeSolution(s *Solution) ([]byte, error)
	// EncodeRefined adds a front member's refined figures to its encoded
	// detail.
	EncodeRefined(detail []byte, p *RefinedPoint) ([]byte, error)
	// EncodeCheck encodes the check of a finished front and, for a spec
	// with a refinement, what it did or how far it is (nil without one):
	// the job's summary (jobs.Summarizer).
	EncodeCheck(c *FrontCheck, refined *RefineSummary) ([]byte, error)
}

// Opener opens the job engine's runs from stored specs and checkpoints:
// each Open decodes the spec, compiles it once and makes the optimiser's
// search, fresh or restored from the checkpoint. It implements
// jobs.RunOpener.
type Opener struct {
	// Codec decodes stored specs and encodes solution details; required.
	Codec Codec
	// Workers is the number of evaluations a run makes at once; 0 means
	// GOMAXPROCS. The front does not depend on it.
	Workers int
	// OnCompile, when set, is called once for every spec Open compiles.
	OnCompile func()

	// details keeps the encoded details of front members across the runs
	// this opener makes, so that a job resumed in its next slice does not
	// evaluate its whole front again.
	details detailCache
}

var (
	_ jobs.RunOpener  = (*Opener)(nil)
	_ jobs.Run        = (*run)(nil)
	_ jobs.Summarizer = (*run)(nil)
)

// Open returns the run of a stored spec, fresh when checkpoint is nil and
// restored from it otherwise.
func (o *Opener) Open(spec, checkpoint []byte) (jobs.Run, error) {
	s, err := o.Codec.DecodeSpec(spec)
	if err != nil {
		return nil, err
	}
	if o.OnCompile != nil {
		o.OnCompile()
	}
	pl, err := Compile(context.Background(), s)
	if err != nil {
		return nil, err
	}
	r, err := OpenRun(pl, o.workers(), checkpoint)
	if err != nil {
		return nil, err
	}
	r.codec, r.cache, r.specKey = o.Codec, &o.details, specKey(spec)
	return r, nil
}

func (o *Opener) workers() int {
	if o.Workers > 0 {
		return o.Workers
	}
	return runtime.GOMAXPROCS(0)
}

// OpenRun makes the search of a plan, restored from checkpoint unless it
// is nil. Its Front needs a codec: use Opener.Open for the engine's runs.
func OpenRun(pl *Plan, workers int, checkpoint []byte) (*run, error) {
	r := &run{plan: pl, workers: max(1, workers), refine: newRefineStage(pl)}
	settings := pl.Settings(workers, r.record)
	search, refined, err := splitCheckpoint(checkpoint)
	if err != nil {
		return nil, err
	}
	if search == nil {
		r.search, err = optimizer.New(pl.SearchProblem(), settings)
	} else {
		r.search, err = optimizer.Restore(pl.SearchProblem(), settings, search)
	}
	if err != nil {
		return nil, err
	}
	if err := r.refine.restore(refined); err != nil {
		return nil, err
	}
	if h := r.search.History(); len(h) > 0 {
		r.last = h[len(h)-1]
	}
	return r, nil
}

// run is one job's search as the engine drives it.
type run struct {
	plan    *Plan
	search  *optimizer.Search
	codec   Codec
	workers int
	// check is the check of the finished front, nil until the search is
	// done, polished (when the spec asks) and checked.
	check *FrontCheck
	// refine is the refinement stage, nil when the spec has none.
	refine *refineStage

	mu   sync.Mutex
	last optimizer.Progress // after the last completed generation

	// cache holds the encoded details of front members by spec and genes:
	// a member's detail never changes, and the front is asked for at
	// every checkpoint. nil caches nothing.
	cache   *detailCache
	specKey string
}

// record is the optimiser's progress callback.
func (r *run) record(p optimizer.Progress) {
	r.mu.Lock()
	r.last = p
	r.mu.Unlock()
}

// Step steps the search; once it is done, it polishes the archive (when
// the spec asks for it) and checks the front (see FrontCheck), and then
// refines the front a few points a step (when the spec asks for it,
// see Refinement) before it reports done. All are functions of the final
// archive and the seed, so a run cut anywhere, even during them, ends the
// same; the refined points are kept in the checkpoint.
func (r *run) Step(ctx context.Context, maxGenerations int) (bool, error) {
	done, err := r.search.Step(ctx, maxGenerations)
	if err != nil || !done {
		// A done search whose step was refused (its context ended) is not
		// a done run while the stages after it are still to come.
		return done && r.finished(), err
	}
	if err := r.finish(ctx); err != nil {
		return false, err
	}
	if r.refine != nil {
		return r.refine.step(ctx, r.plan, r.search.Front(), r.workers)
	}
	return true, nil
}

// finished reports whether the stages after the search (the polish and
// check, the refinement) are done.
func (r *run) finished() bool {
	return r.check != nil && (r.refine == nil || r.refine.summary != nil)
}

// finish polishes and checks a done search once.
func (r *run) finish(ctx context.Context) error {
	if r.check != nil {
		return nil
	}
	var polished *optimizer.PolishReport
	if p := r.plan.PolishSettings(r.workers); p != nil {
		rep, err := r.search.Polish(ctx, *p)
		if err != nil {
			return err
		}
		polished = &rep
	}
	fc, err := r.plan.CheckFront(ctx, r.search.Front(), polished, r.workers)
	if err != nil {
		return err
	}
	r.check = fc
	return nil
}

// Check returns the check of the finished front, nil until Step has
// reported done.
func (r *run) Check() *FrontCheck { return r.check }

// Summary is the encoded check of the finished front (jobs.Summarizer)
// with the refinement's summary, or while the refinement runs how far it
// is (RefineSummary.InProgress); nil before the check exists or without
// a codec.
func (r *run) Summary() ([]byte, error) {
	if r.check == nil || r.codec == nil {
		return nil, nil
	}
	return r.codec.EncodeCheck(r.check, r.refineSummary())
}

// refineSummary is the refinement's summary: what it did once done, how
// far it is while it runs (InProgress set), nil without a refinement or
// before it has begun.
func (r *run) refineSummary() *RefineSummary {
	switch {
	case r.refine == nil:
		return nil
	case r.refine.summary != nil:
		return r.refine.summary
	}
	return r.refine.progress()
}

// Refined returns the refined front points in front order and the
// refinement's summary, nil until the refinement is done or without one.
func (r *run) Refined() ([]*RefinedPoint, *RefineSummary) {
	if r.refine == nil || r.refine.summary == nil {
		return nil, nil
	}
	return r.refine.points, r.refine.summary
}

func (r *run) Checkpoint() ([]byte, error) {
	b, err := r.search.Checkpoint()
	if err != nil {
		return nil, err
	}
	return r.refine.wrapCheckpoint(b), nil
}

func (r *run) Progress() jobs.Progress {
	r.mu.Lock()
	p := r.last
	r.mu.Unlock()
	return jobs.Progress{
		Generation:  p.Generation,
		Generations: r.plan.settings.Generations,
		Evaluations: int64(p.Evaluations),
		Hypervolume: p.Hypervolume,
		Best:        append([]float64(nil), p.Best...),
	}
}

// Front returns the optimiser's archive with each member's detail (see
// Solution), encoded by the codec. Genes, objectives and violations are
// the optimiser's, bit for bit.
func (r *run) Front() ([]jobs.Solution, error) {
	front := r.search.Front()
	out := make([]jobs.Solution, len(front))
	for i, s := range front {
		key := r.specKey + geneKey(s.Genes)
		detail, ok := r.cache.get(key)
		if !ok {
			var err error
			if detail, err = r.codec.EncodeSolution(r.detail(s)); err != nil {
				return nil, err
			}
			r.cache.put(key, detail)
		}
		if pts, _ := r.Refined(); pts != nil {
			var err error
			if detail, err = r.codec.EncodeRefined(detail, pts[i]); err != nil {
				return nil, err
			}
		}
		out[i] = jobs.Solution{Index: i, Genes: s.Genes, Objectives: s.Objectives, Violations: s.Violations, Feasible: s.Feasible, Detail: detail}
	}
	return out, nil
}

// detail evaluates a front member in full.
func (r *run) detail(s optimizer.Solution) *Solution {
	sol := r.plan.Evaluate(r.plan.problem.Design().Decode(s.Genes))
	// The optimiser's values are the stored ones; a fresh evaluation
	// gives the same bits, and this keeps it so by construction.
	sol.Genes, sol.Objectives, sol.Violations, sol.Feasible = s.Genes, s.Objectives, s.Violations, s.Feasible
	if s.Feasible {
		sol.InfeasibleReason, sol.Shortfalls = "", nil
	} else if s.Reason != "" {
		sol.InfeasibleReason = s.Reason
	}
	return sol
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
