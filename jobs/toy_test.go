package jobs

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"sync/atomic"
	"time"
)

// toySpec configures toyStudy, a deterministic stand-in for the optimiser:
// each generation applies the logistic map x <- r x (1 - x), r = 3.99, to
// every member of a population. The map is chaotic at this r (May 1976,
// "Simple mathematical models with very complicated dynamics", Nature
// 261:459, doi:10.1038/261459a0), so a checkpoint that lost a single bit,
// a generation applied twice or half applied, gives a visibly different
// final front.
type toySpec struct {
	Generations int   `json:"generations"`
	Size        int   `json:"size"`
	Seed        int64 `json:"seed"`
	// StepDelay is the wall time each generation takes, so that slices
	// and checkpoints fall in the middle of a run.
	StepDelay time.Duration `json:"step_delay"`
	// FailAt makes Step fail on reaching this generation (0: never).
	FailAt int `json:"fail_at"`
	// LongStepAt makes the generation of this number take LongStep
	// instead of StepDelay (0: none), as one long stage of a study does.
	LongStepAt int           `json:"long_step_at,omitempty"`
	LongStep   time.Duration `json:"long_step,omitempty"`
}

func (s toySpec) bytes() []byte {
	b, err := json.Marshal(s)
	if err != nil {
		panic(err)
	}
	return b
}

// toyOpener counts the generations its studies execute, so a test can
// tell a resume from the last checkpoint from a restart from scratch.
type toyOpener struct {
	executed atomic.Int64
	opened   atomic.Int64
}

var errToySpec = errors.New("toy: bad spec")

func (o *toyOpener) Open(spec, checkpoint []byte) (Run, error) {
	var s toySpec
	if err := json.Unmarshal(spec, &s); err != nil || s.Generations <= 0 || s.Size <= 0 {
		return nil, fmt.Errorf("%w: %s", errToySpec, spec)
	}
	o.opened.Add(1)
	st := &toyStudy{spec: s, opener: o, x: make([]float64, s.Size)}
	if checkpoint == nil {
		for i := range st.x {
			// Start points spread over (0, 1) by the golden-ratio
			// sequence, shifted by the seed.
			st.x[i] = math.Mod(0.1+0.6180339887498949*float64(i+1)+1e-3*float64(s.Seed%997), 0.98) + 0.01
		}
		return st, nil
	}
	if len(checkpoint) != 16+8*s.Size {
		return nil, fmt.Errorf("toy: checkpoint of %d bytes for size %d", len(checkpoint), s.Size)
	}
	st.gen = int(binary.LittleEndian.Uint64(checkpoint))
	st.evals = int64(binary.LittleEndian.Uint64(checkpoint[8:]))
	for i := range st.x {
		st.x[i] = math.Float64frombits(binary.LittleEndian.Uint64(checkpoint[16+8*i:]))
	}
	return st, nil
}

type toyStudy struct {
	spec   toySpec
	opener *toyOpener
	gen    int
	evals  int64
	x      []float64
}

func (s *toyStudy) Step(ctx context.Context, n int) (bool, error) {
	for range n {
		if s.gen >= s.spec.Generations {
			return true, nil
		}
		if s.spec.FailAt > 0 && s.gen+1 >= s.spec.FailAt {
			return false, fmt.Errorf("toy: generation %d diverged", s.gen+1)
		}
		next := make([]float64, len(s.x))
		for i, x := range s.x {
			next[i] = 3.99 * x * (1 - x)
		}
		delay := s.spec.StepDelay
		if s.spec.LongStepAt > 0 && s.gen+1 == s.spec.LongStepAt {
			delay = s.spec.LongStep
		}
		if delay > 0 {
			t := time.NewTimer(delay)
			select {
			case <-ctx.Done():
				t.Stop()
				return false, ctx.Err() // the generation in progress is discarded
			case <-t.C:
			}
		} else if ctx.Err() != nil {
			return false, ctx.Err()
		}
		s.x = next
		s.gen++
		s.evals += int64(len(s.x))
		s.opener.executed.Add(1)
	}
	return s.gen >= s.spec.Generations, nil
}

func (s *toyStudy) Checkpoint() ([]byte, error) {
	b := make([]byte, 16+8*len(s.x))
	binary.LittleEndian.PutUint64(b, uint64(s.gen))
	binary.LittleEndian.PutUint64(b[8:], uint64(s.evals))
	for i, x := range s.x {
		binary.LittleEndian.PutUint64(b[16+8*i:], math.Float64bits(x))
	}
	return b, nil
}

// objectives of member x: (x, 1 - sqrt(x)), ZDT1's shape with g = 1
// (Zitzler, Deb & Thiele 2000, Evol. Comput. 8(2):173,
// doi:10.1162/106365600568202); every member is then non-dominated.
func toyObjectives(x float64) []float64 { return []float64{x, 1 - math.Sqrt(x)} }

func (s *toyStudy) Progress() Progress {
	best := []float64{math.Inf(1), math.Inf(1)}
	for _, x := range s.x {
		f := toyObjectives(x)
		best[0], best[1] = math.Min(best[0], f[0]), math.Min(best[1], f[1])
	}
	return Progress{Generation: s.gen, Generations: s.spec.Generations, Evaluations: s.evals, Hypervolume: float64(s.gen) / float64(s.spec.Generations), Best: best}
}

func (s *toyStudy) Front() ([]Solution, error) {
	front := make([]Solution, len(s.x))
	for i, x := range s.x {
		front[i] = Solution{
			Index:      i,
			Genes:      []float64{x},
			Objectives: toyObjectives(x),
			Violations: []float64{math.Max(0, x-0.99)},
			Feasible:   x <= 0.99,
			Detail:     []byte(fmt.Sprintf(`{"generation":%d}`, s.gen)),
		}
	}
	return front, nil
}

// toyFrontAt runs the toy straight through to generation gen, without the
// engine, and returns its front: the reference every engine run must
// reproduce bit for bit.
func toyFrontAt(spec toySpec, gen int) []Solution {
	spec.StepDelay = 0
	spec.Generations = gen
	s, err := (&toyOpener{}).Open(spec.bytes(), nil)
	if err != nil {
		panic(err)
	}
	for {
		done, err := s.Step(context.Background(), 1000)
		if err != nil {
			panic(err)
		}
		if done {
			break
		}
	}
	front, _ := s.Front()
	return front
}
