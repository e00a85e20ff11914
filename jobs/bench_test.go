package jobs

import (
	"context"
	"errors"
	"fmt"
	"maps"
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

// BenchmarkScrapeRead measures the store reads of one metrics scrape
// (api's storeCollector.read) on a store of n jobs: read=list is how the
// collector read them before Store.JobCounts, paging through every job
// and reading each running job's checkpoint; read=counts is the one
// JobCounts call it makes now. The jobs are mostly succeeded, as after
// months of overnight batches, with 4 running (2 workers on each of 2
// machines), each with a spec of 1078 bytes (the size of the stored
// testdata/demo-job.yaml) and two labels.
func BenchmarkScrapeRead(b *testing.B) {
	for _, be := range backends {
		b.Run(be.name, func(b *testing.B) {
			for _, n := range []int{2000, 20000} {
				b.Run(fmt.Sprintf("jobs=%d", n), func(b *testing.B) {
					ctx := context.Background()
					var s Store
					if be.name == "sqlite" {
						s = newTestSQLiteStore(b)
					} else {
						s = newTestPostgresStore(b)
					}
					now := time.Now()
					fillScrapeStore(ctx, b, s, n, now)
					if be.name == "postgres" {
						// Each job's row was rewritten at every transition in
						// one transaction, leaving dead versions in the table
						// and the state index; a database some months old has
						// had them vacuumed and its statistics taken.
						if _, err := s.(*sqlStore).q.exec(ctx, `VACUUM ANALYZE dampfront_job, dampfront_checkpoint`); err != nil {
							b.Fatal(err)
						}
					}
					reads := []struct {
						name string
						read func(context.Context, Store, time.Time) (map[State]int, time.Duration, error)
					}{
						{"list", readByListing},
						{"counts", readByCounts},
					}
					// Both reads must agree before either is timed.
					wantCounts, wantAge, err := readByListing(ctx, s, now)
					if err != nil {
						b.Fatal(err)
					}
					for _, r := range reads {
						b.Run("read="+r.name, func(b *testing.B) {
							counts, age, err := r.read(ctx, s, now)
							if err != nil || !maps.Equal(counts, wantCounts) || age != wantAge {
								b.Fatalf("read %s = %v, %v, %v; the listing gives %v, %v", r.name, counts, age, err, wantCounts, wantAge)
							}
							b.ReportAllocs()
							for b.Loop() {
								if _, _, err := r.read(ctx, s, now); err != nil {
									b.Fatal(err)
								}
							}
						})
					}
				})
			}
		})
	}
}

// fillScrapeStore stores n jobs in one transaction: 4 running with a
// checkpoint, and of the others 1 in 100 queued, 1 in 50 failed, 1 in 100
// cancelled before it started, the rest succeeded.
func fillScrapeStore(ctx context.Context, b *testing.B, s Store, n int, now time.Time) {
	b.Helper()
	spec := make([]byte, 1078)
	for i := range spec {
		spec[i] = byte(i * 7)
	}
	labels := map[string]string{"car": "demo-gt", "night": "2026-03-01"}
	err := s.Tx(ctx, func(ctx context.Context, tx Store) error {
		for i := range n {
			id := fmt.Sprintf("job-%06d", i)
			at := now.Add(time.Duration(i-n) * time.Minute)
			if _, err := tx.JobInsert(ctx, &JobInsertParams{ID: id, Spec: spec, Labels: labels, Now: at}); err != nil {
				return err
			}
			switch {
			case i%100 == 4: // queued
				continue
			case i%100 == 6: // cancelled before it started
				if _, err := tx.JobCancelRequest(ctx, &JobCancelRequestParams{ID: id, Now: at}); err != nil {
					return err
				}
				continue
			}
			if _, err := tx.JobStart(ctx, &JobStartParams{ID: id, Lease: "l", Now: at}); err != nil {
				return err
			}
			if i < 4 { // running, last checkpoint i+1 minutes ago
				if err := tx.CheckpointSave(ctx, &CheckpointSaveParams{JobID: id, Lease: "l", Data: []byte{1},
					Now: now.Add(-time.Duration(i+1) * time.Minute)}); err != nil {
					return err
				}
				continue
			}
			end := StateSucceeded
			if i%50 == 5 {
				end = StateFailed
			}
			if _, err := tx.JobFinish(ctx, &JobFinishParams{ID: id, Lease: "l", State: end, Now: at.Add(time.Minute)}); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		b.Fatal(err)
	}
}

// readByListing is api's storeCollector.read as it was before
// Store.JobCounts, the baseline of BenchmarkScrapeRead.
func readByListing(ctx context.Context, s Store, now time.Time) (map[State]int, time.Duration, error) {
	counts := map[State]int{}
	for _, st := range States {
		counts[st] = 0 // as JobCounts gives them, for the comparison; the collector read 0 for a missing state
	}
	var running []*Job
	token := ""
	for {
		res, err := s.JobList(ctx, &JobListParams{PageSize: MaxPageSize, PageToken: token})
		if err != nil {
			return nil, 0, err
		}
		for _, j := range res.Jobs {
			counts[j.State]++
			if j.State == StateRunning {
				running = append(running, j)
			}
		}
		if token = res.NextPageToken; token == "" {
			break
		}
	}
	var oldest time.Duration
	for _, j := range running {
		since := j.StartedAt
		cp, err := s.CheckpointGet(ctx, &CheckpointGetParams{JobID: j.ID})
		switch {
		case err == nil:
			since = cp.SavedAt
		case errors.Is(err, ErrNotFound):
		default:
			return nil, 0, err
		}
		if !since.IsZero() {
			oldest = max(oldest, now.Sub(since))
		}
	}
	return counts, oldest, nil
}

// readByCounts is api's storeCollector.read now.
func readByCounts(ctx context.Context, s Store, now time.Time) (map[State]int, time.Duration, error) {
	res, err := s.JobCounts(ctx, &JobCountsParams{})
	if err != nil {
		return nil, 0, err
	}
	var age time.Duration
	if !res.OldestRunningSince.IsZero() {
		age = max(0, now.Sub(res.OldestRunningSince))
	}
	return res.ByState, age, nil
}
