package jobs_test

import (
	"context"
	"encoding/binary"
	"fmt"
	"log"
	"log/slog"
	"os"
	"path/filepath"
	"time"

	"dampfront/jobs"
)

// countStudy is the smallest Run: it counts generations up to n.
type countStudy struct{ gen, n int }

func (s *countStudy) Step(ctx context.Context, max int) (bool, error) {
	for i := 0; i < max && s.gen < s.n; i++ {
		if err := ctx.Err(); err != nil {
			return false, err
		}
		s.gen++
	}
	return s.gen >= s.n, nil
}

func (s *countStudy) Checkpoint() ([]byte, error) {
	return binary.AppendUvarint(nil, uint64(s.gen)), nil
}

func (s *countStudy) Progress() jobs.Progress {
	return jobs.Progress{Generation: s.gen, Generations: s.n}
}

func (s *countStudy) Front() ([]jobs.Solution, error) {
	return []jobs.Solution{{Genes: []float64{float64(s.gen)}, Objectives: []float64{1 / float64(s.gen+1)}, Feasible: true}}, nil
}

type countOpener struct{}

func (countOpener) Open(spec, checkpoint []byte) (jobs.Run, error) {
	n, _ := binary.Uvarint(spec)
	s := &countStudy{n: int(n)}
	if checkpoint != nil {
		g, _ := binary.Uvarint(checkpoint)
		s.gen = int(g)
	}
	return s, nil
}

// Example shows the engine as the server wires it: open on a SQLite file,
// start, submit, watch to the end, read the front, stop.
func Example() {
	dir, err := os.MkdirTemp("", "dampfront-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)

	ctx := context.Background()
	e, err := jobs.Open(ctx, jobs.Config{
		DatabaseURL:       filepath.Join(dir, "jobs.db"),
		Workers:           1,
		SliceDuration:     time.Second,
		FetchPollInterval: 50 * time.Millisecond,
		Logger:            slog.New(slog.DiscardHandler),
	}, countOpener{})
	if err != nil {
		log.Fatal(err)
	}
	defer e.Close()
	if _, err := e.Start(ctx); err != nil {
		log.Fatal(err)
	}
	defer e.Stop(ctx)

	job, err := e.Submit(ctx, &jobs.SubmitParams{Spec: binary.AppendUvarint(nil, 1000), Labels: map[string]string{"car": "demo"}})
	if err != nil {
		log.Fatal(err)
	}
	updates, err := e.Watch(ctx, job.ID)
	if err != nil {
		log.Fatal(err)
	}
	var last *jobs.Job
	for last = range updates {
	}
	fmt.Println(last.State, last.Progress.Generation, "of", last.Progress.Generations)

	front, err := e.Front(ctx, &jobs.FrontGetParams{JobID: job.ID})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(front.Total, "solution, genes", front.Solutions[0].Genes, "partial:", front.Partial)
	// Output:
	// succeeded 1000 of 1000
	// 1 solution, genes [1000] partial: false
}
