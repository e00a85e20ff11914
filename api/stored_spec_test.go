package api

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
)

// The files in testdata/stored are specs as an earlier version of the
// server stored them (deterministic protobuf JobSpec bytes with its
// defaults filled in), each with the digest of the front that version
// computed for it. A stored job must open and resume to the same front,
// bit for bit, whatever the code that runs it now: these are the bytes
// in the databases of running servers.

// storedSpecs names the stored specs and how each was made.
var storedSpecs = []struct {
	name string
	spec func() *pb.JobSpec
}{
	{"small-6gen", func() *pb.JobSpec { return testSpec(6) }},
	{"islands-knees", func() *pb.JobSpec {
		s := testSpec(5)
		s.Search.Islands, s.Search.MigrationEvery = 2, 2
		s.DesignSpace = &pb.DesignSpace{FrontKneeMPerS: &pb.Range{Min: 0.03, Max: 0.08}, Symmetric: false}
		s.Objectives = []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_FRONT_PLATFORM, Aggregation: pb.Aggregation_AGGREGATION_WORST, FrontTargetShiftM: -0.002}}
		return s
	}},
}

// frontDigest is the SHA-256 of a front: every float's bits, the
// feasibility flags and the detail bytes, in order.
func frontDigest(front []jobs.Solution) string {
	h := sha256.New()
	var b [8]byte
	put := func(xs []float64) {
		binary.LittleEndian.PutUint64(b[:], uint64(len(xs)))
		h.Write(b[:])
		for _, x := range xs {
			binary.LittleEndian.PutUint64(b[:], math.Float64bits(x))
			h.Write(b[:])
		}
	}
	for _, s := range front {
		put(s.Genes)
		put(s.Objectives)
		put(s.Violations)
		if s.Feasible {
			h.Write([]byte{1})
		} else {
			h.Write([]byte{0})
		}
		binary.LittleEndian.PutUint64(b[:], uint64(len(s.Detail)))
		h.Write(b[:])
		h.Write(s.Detail)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// asStored returns front with each solution's detail as the version the
// stored digests were taken with wrote it: without the aero platform
// figures of each road case (CaseMetrics.aero and reference_points, which
// came later; the test car has aero, so they are there), re-encoded as
// the codec encodes (deterministic). Every other byte must be as stored.
func asStored(t *testing.T, front []jobs.Solution) []jobs.Solution {
	t.Helper()
	out := make([]jobs.Solution, len(front))
	for i, s := range front {
		var sol pb.Solution
		if err := proto.Unmarshal(s.Detail, &sol); err != nil {
			t.Fatal(err)
		}
		for _, m := range sol.GetCaseMetrics() {
			if m.GetAero() == nil {
				t.Fatalf("solution %d, %s: no aero figures on a car with aero", i, m.GetRoadCase())
			}
			m.Aero, m.ReferencePoints = nil, nil
		}
		b, err := proto.MarshalOptions{Deterministic: true}.Marshal(&sol)
		if err != nil {
			t.Fatal(err)
		}
		out[i] = s
		out[i].Detail = b
	}
	return out
}

// TestStoredSpecsResumeBitIdentical opens each stored spec, runs it in
// one go and in steps of two generations through checkpoints, and wants
// the front the earlier version stored the digest of.
// DAMPFRONT_WRITE_STORED=1 writes the files instead (only ever from the
// version whose bytes they are meant to keep).
func TestStoredSpecsResumeBitIdentical(t *testing.T) {
	t.Parallel()
	dir := filepath.Join("testdata", "stored")
	for _, c := range storedSpecs {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			spec, want := readStored(t, dir, c.name, "DAMPFRONT_WRITE_STORED", c.spec)
			// Today's encoding of the same spec is the same bytes: equal
			// specs keep giving equal stored specs across versions.
			if now, err := MarshalSpec(c.spec()); err != nil || string(now) != string(spec) {
				t.Errorf("MarshalSpec today gives other bytes than the stored spec (err %v)", err)
			}
			oneGo, resumed := frontOf(t, spec, 100, false), frontOf(t, spec, 2, true)
			if got := frontDigest(asStored(t, oneGo)); got != strings.TrimSpace(string(want)) {
				t.Errorf("front of the stored spec run in one go: digest %s, stored %s", got, want)
			}
			if got := frontDigest(asStored(t, resumed)); got != strings.TrimSpace(string(want)) {
				t.Errorf("front of the stored spec resumed every 2 generations: digest %s, stored %s", got, want)
			}
			// The figures newer than the stored digests are as
			// reproducible: the whole details agree bit for bit.
			if a, b := frontDigest(oneGo), frontDigest(resumed); a != b {
				t.Errorf("whole details: run in one go %s, resumed %s", a, b)
			}
		})
	}
}

// readStored reads a stored spec and the digest of its front from dir
// (NAME.jobspec.pb, NAME.front.sha256). With the environment variable
// env set to 1 it first writes both from spec() as this version encodes
// and runs it (only ever from the version whose bytes they are meant to
// keep).
func readStored(t *testing.T, dir, name, env string, spec func() *pb.JobSpec) (specBytes, want []byte) {
	t.Helper()
	specPath, digestPath := filepath.Join(dir, name+".jobspec.pb"), filepath.Join(dir, name+".front.sha256")
	if os.Getenv(env) == "1" {
		b, err := MarshalSpec(spec())
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(specPath, b, 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(digestPath, []byte(frontDigest(frontOf(t, b, 100, false))+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	specBytes, err := os.ReadFile(specPath)
	if err != nil {
		t.Fatal(err)
	}
	want, err = os.ReadFile(digestPath)
	if err != nil {
		t.Fatal(err)
	}
	return specBytes, want
}
