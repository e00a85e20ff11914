package web

import (
	"context"
	"fmt"
	"net/http"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"dampfront/api"
	"dampfront/api/apitest"
	"dampfront/jobs"
)

// TestJobPageFront checks what the job page shows of a 3-objective front
// of 300 solutions (more than plot's sparseFront, so drawn translucent):
// the chart's title names the job by its display name, not its ID; the
// selected solution is boxed and labelled on the chart; road speeds are
// in m/s, the unit of the spec and the command line. Then a running job
// with a checkpointed front shows that front, partial.
func TestJobPageFront(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithTimeout(context.Background(), testTimeout)
	defer cancel()
	db := filepath.Join(t.TempDir(), "jobs.db")
	spec, err := apitest.DemoSpec(filepath.Join("..", "..", "testdata", "demo-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	name, err := apitest.SeedDatabase(ctx, db, spec, 300, 5)
	if err != nil {
		t.Fatal(err)
	}
	id := strings.TrimPrefix(name, "jobs/")
	b := setupOn(t, db, 0, api.Options{})

	res, body := get(t, b, "/jobs/"+id+"?solution=11")
	wantStatus(t, "job page", res, body, http.StatusOK)
	chart := regexp.MustCompile(`(?s)id="front-chart">(.*?)</svg>`).FindStringSubmatch(body)
	if chart == nil {
		t.Fatalf("no front chart on the page:\n%.1500s", body)
	}
	if !strings.Contains(chart[1], "Pareto front, "+spec.GetDisplayName()) || strings.Contains(chart[1], id) {
		t.Errorf("the front chart's title does not name the job %q (or shows its ID)", spec.GetDisplayName())
	}
	if !strings.Contains(chart[1], ">#11<") {
		t.Error("the selected solution 11 is not labelled on the front chart")
	}
	// The demo's adjustment band (bump 0.3-1.0, rebound 0.5-1.4) is
	// narrower than the seeded ratios' range (0.2-1.6): solutions outside
	// it are flagged in their own column.
	if !strings.Contains(body, "Out of adjuster range") {
		t.Error("no out-of-band column on the page of a front with solutions outside the adjuster range")
	}
	if !strings.Contains(body, "Ashgrove Ring, fast sweepers at 55 m/s") || strings.Contains(body, "km/h") {
		t.Errorf("road speeds are not in m/s:\n%.1500s", body)
	}

	// A running job that has checkpointed a front: the job is taken by a
	// lease, as a worker would, and the seeded front stored under it.
	run := b.submit(t, spec)
	st := b.engine.Store()
	page, err := st.FrontGet(ctx, &jobs.FrontGetParams{JobID: id, PageSize: 20})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.JobStart(ctx, &jobs.JobStartParams{ID: run.GetJobId(), Lease: "w", Now: run.GetCreateTime().AsTime()}); err != nil {
		t.Fatal(err)
	}
	if err := st.FrontPut(ctx, &jobs.FrontPutParams{JobID: run.GetJobId(), Lease: "w", Solutions: page.Solutions}); err != nil {
		t.Fatal(err)
	}
	res, body = get(t, b, "/jobs/"+run.GetJobId())
	wantStatus(t, "running job page", res, body, http.StatusOK)
	for _, want := range []string{`id="front-chart"><svg`, "The front so far", "Partial front", fmt.Sprintf("%d solutions.", len(page.Solutions))} {
		if !strings.Contains(body, want) {
			t.Errorf("the running job's page lacks %q", want)
		}
	}
}
