package jobs

import (
	"context"
	"testing"
	"time"
)

// BenchmarkSliceHandOver measures the cost of one slice boundary: a job
// whose slices each run one generation of a toy that takes no time, so
// nearly all of the time per slice is the engine's: take the job, open the
// study from its checkpoint, checkpoint again with the front, queue the
// next slice and complete this one in one transaction, and River's fetch
// of the next slice. The slice clock fires at once, but asynchronously,
// so a slice runs a few generations; ns/slice is the figure to read.
func BenchmarkSliceHandOver(b *testing.B) {
	for _, be := range backends {
		b.Run(be.name, func(b *testing.B) {
			url := be.url(b)
			cfg := testConfig(url)
			cfg.Workers = 1
			cfg.SliceDuration = time.Nanosecond // every slice runs one Step, then hands over
			cfg.FetchPollInterval = 5 * time.Millisecond
			opener := &toyOpener{}
			e, err := Open(context.Background(), cfg, opener)
			if err != nil {
				b.Fatal(err)
			}
			defer e.Close()
			if _, err := e.Start(context.Background()); err != nil {
				b.Fatal(err)
			}
			defer e.Stop(context.Background())
			spec := toySpec{Generations: b.N, Size: 100, Seed: 1}
			b.ReportAllocs()
			b.ResetTimer()
			start := time.Now()
			j, err := e.Submit(context.Background(), &SubmitParams{Spec: spec.bytes()})
			if err != nil {
				b.Fatal(err)
			}
			for {
				got, err := e.Get(context.Background(), j.ID)
				if err != nil {
					b.Fatal(err)
				}
				if got.State.Terminal() {
					if got.State != StateSucceeded {
						b.Fatalf("job ended %+v", got)
					}
					b.ReportMetric(float64(time.Since(start).Nanoseconds())/float64(got.Slices), "ns/slice")
					b.ReportMetric(float64(got.Slices), "slices")
					break
				}
				time.Sleep(time.Millisecond)
			}
		})
	}
}

// BenchmarkCheckpoint measures one checkpoint inside a slice: optimiser
// state, progress and a front of 100 solutions of 4 genes and 2
// objectives each, in one transaction.
func BenchmarkCheckpoint(b *testing.B) {
	for _, be := range backends {
		b.Run(be.name, func(b *testing.B) {
			ctx := context.Background()
			var s Store
			if be.name == "sqlite" {
				s = newTestSQLiteStore(b)
			} else {
				s = newTestPostgresStore(b)
			}
			if _, err := s.JobInsert(ctx, &JobInsertParams{ID: "j", Spec: []byte("x"), Now: time.Now()}); err != nil {
				b.Fatal(err)
			}
			if _, err := s.JobStart(ctx, &JobStartParams{ID: "j", Lease: "l", Now: time.Now()}); err != nil {
				b.Fatal(err)
			}
			front := make([]Solution, 100)
			for i := range front {
				front[i] = Solution{Index: i, Genes: []float64{0.2, 0.4, 0.6, 0.8}, Objectives: []float64{1, 2}, Violations: []float64{0}, Feasible: true, Detail: make([]byte, 512)}
			}
			data := make([]byte, 100*4*8*3) // population, parents and archive of 4-gene members
			b.ReportAllocs()
			b.ResetTimer()
			for i := range b.N {
				err := s.Tx(ctx, func(ctx context.Context, tx Store) error {
					if err := tx.CheckpointSave(ctx, &CheckpointSaveParams{JobID: "j", Lease: "l", Data: data, Progress: Progress{Generation: i}, Now: time.Now()}); err != nil {
						return err
					}
					return tx.FrontPut(ctx, &FrontPutParams{JobID: "j", Lease: "l", Solutions: front})
				})
				if err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
