package main

import (
	"fmt"
	"net/http"
	"path/filepath"
	"strings"
	"testing"

	"google.golang.org/protobuf/encoding/protojson"

	pb "dampfront/api/gen/dampfront/v1"
)

// worker --metrics-addr serves Prometheus /metrics of the worker's own
// slices: a job submitted through a serve --workers 0 on the same SQLite
// file and worked by the worker alone shows in the worker's counters
// with exactly the job's generations and evaluations, and the job counts
// of the database (the API server's series) are not there.
func TestWorkerMetrics(t *testing.T) {
	t.Parallel()
	dir := t.TempDir()
	db := filepath.Join(dir, "metrics.db")
	s := startServer(t, db, nil, "--workers", "0")
	addr := fmt.Sprintf("127.0.0.1:%d", freePort(t))
	w := startWorker(t, db, "metrics-node", nil, "--metrics-addr", addr)
	if logs := w.logs.String(); !strings.Contains(logs, "http://"+addr+"/metrics") {
		t.Errorf("the worker's start log does not name its metrics URL:\n%s", logs)
	}
	spec := writeSpec(t, "generations: 30", "generations: 5")
	id := firstLine(mustRun(t, exitOK, nil, s.client("submit", spec, "--watch", "--quiet")...).stdout)
	var job pb.Job
	if err := protojson.Unmarshal([]byte(mustRun(t, exitOK, nil, s.client("get", id, "--format", "json")...).stdout), &job); err != nil {
		t.Fatal(err)
	}

	code, metrics := httpGet(t, "http://"+addr+"/metrics")
	if code != http.StatusOK {
		t.Fatalf("/metrics: %d", code)
	}
	for _, c := range []struct {
		series string
		want   float64
	}{
		{`dampfront_generations_total`, 5},
		{`dampfront_evaluations_total`, float64(job.GetProgress().GetEvaluations())},
		{`dampfront_slice_duration_seconds_count{outcome="succeeded"}`, 1},
	} {
		if got := metricValue(t, metrics, c.series); got != c.want {
			t.Errorf("%s = %v, want %v", c.series, got, c.want)
		}
	}
	if strings.Contains(metrics, "dampfront_jobs{") {
		t.Errorf("the worker's metrics carry the database's job counts, which are the API server's:\n%.1000s", metrics)
	}
	if code, _ := httpGet(t, "http://"+addr+"/"); code != http.StatusNotFound {
		t.Errorf("GET / on the metrics port: %d, want 404 (only /metrics is served)", code)
	}
}
