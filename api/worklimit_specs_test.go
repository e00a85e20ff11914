package api

import (
	"os"
	"path/filepath"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// Every spec this project ships or has stored (testdata/*-job.yaml, the
// demo's, and api/testdata/stored) stays within the default job-work
// limit now that the polish's rounds and the refinement count
// (study.Size); the work of each is logged.
func TestShippedSpecsWithinJobWorkLimit(t *testing.T) {
	t.Parallel()
	srv := &Server{opt: Options{}.withDefaults()}
	yamls, err := filepath.Glob(filepath.Join("..", "testdata", "*-job.yaml"))
	if err != nil || len(yamls) == 0 {
		t.Fatalf("no job specs in testdata: %v", err)
	}
	stored, err := filepath.Glob(filepath.Join("testdata", "stored", "*.jobspec.pb"))
	if err != nil || len(stored) == 0 {
		t.Fatalf("no stored specs: %v", err)
	}
	for _, path := range append(yamls, stored...) {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		spec := &pb.JobSpec{}
		if filepath.Ext(path) == ".pb" {
			err = proto.Unmarshal(b, spec)
		} else {
			err = DecodeText(b, spec)
		}
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		var p problems
		c, err := checkSpec(spec, "spec.", &p)
		if err != nil {
			t.Fatalf("%s: %v", path, err)
		}
		size := c.Size()
		t.Logf("%s: work %d (polish rounds %d, refinement %d), limit %d", path, size.Work, size.PolishRounds, size.Refine, srv.opt.MaxJobWork)
		if err := srv.checkJobWork(size); err != nil {
			t.Errorf("%s: %v", path, err)
		}
	}
}
