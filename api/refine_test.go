package api

import (
	"bytes"
	"context"
	"math"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/jobs/study"
	"dampfront/model"
)

// refineSpec is the test job with a refinement on a short record (10 s a
// case, enough for the comparisons here, which are exact, not
// statistical) and a seed of its own.
func refineSpec(t *testing.T) []byte {
	t.Helper()
	spec := testSpec(4)
	spec.Refinement = &pb.Refinement{Enabled: true, DurationS: 10, Seed: proto.Uint64(11)}
	b, err := MarshalSpec(spec)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// runWithSummary runs a study from its spec to the end in steps of step
// generations, reopening it from its checkpoint after every step when
// resume is set, and returns its front and its summary's bytes.
func runWithSummary(t *testing.T, spec []byte, step int, resume bool) ([]jobs.Solution, []byte) {
	t.Helper()
	o := NewOpener(2)
	st, err := o.Open(spec, nil)
	if err != nil {
		t.Fatal(err)
	}
	for {
		done, err := st.Step(context.Background(), step)
		if err != nil {
			t.Fatal(err)
		}
		if done {
			break
		}
		if resume {
			ck, err := st.Checkpoint()
			if err != nil {
				t.Fatal(err)
			}
			if st, err = o.Open(spec, ck); err != nil {
				t.Fatal(err)
			}
		}
	}
	f, err := st.Front()
	if err != nil {
		t.Fatal(err)
	}
	sum, err := st.(jobs.Summarizer).Summary()
	if err != nil {
		t.Fatal(err)
	}
	return f, sum
}

// TestRefinementMatchesVerify refines a seeded job's front and checks
// every point's refined figures against the time-domain check that
// `verify JOB --all --seed 11 --duration 10` runs (model.VerifySetups on
// the car and road cases of api.SpecToModel, the CLI's path): every row
// of every case equal with ==, and the refined grip objective equal to
// its definition (DESIGN.md "Optimisation": RMS over the corners of the
// normalised tyre-load sd, weighted mean square over the cases) read
// from those rows, within 1e-12 relative (rounding of a different
// summation order only). Then the same job cut after every step and
// reopened from its checkpoint gives the same front and summary, byte
// for byte.
func TestRefinementMatchesVerify(t *testing.T) {
	t.Parallel()
	spec := refineSpec(t)
	front, summary := runWithSummary(t, spec, 100, false)
	if len(front) == 0 {
		t.Fatal("empty front")
	}
	msg, err := unmarshalSpec(spec)
	if err != nil {
		t.Fatal(err)
	}
	in, err := SpecToModel(msg)
	if err != nil {
		t.Fatal(err)
	}
	var setups []model.Setup
	var refined []*pb.RefinedSolution
	for _, s := range front {
		sol := &pb.Solution{}
		if err := proto.Unmarshal(s.Detail, sol); err != nil {
			t.Fatal(err)
		}
		if sol.GetRefined() == nil {
			t.Fatalf("solution %d has no refined figures", s.Index)
		}
		// The refined figures are appended to the stored detail
		// (EncodeRefined): the bytes must be what the protobuf library's
		// deterministic encoding of the whole solution gives.
		if whole, err := (proto.MarshalOptions{Deterministic: true}).Marshal(sol); err != nil || !bytes.Equal(whole, s.Detail) {
			t.Fatalf("solution %d: stored detail is not the deterministic encoding of the whole solution (%v)", s.Index, err)
		}
		su, err := SetupToModel(sol.GetSetup(), "setup")
		if err != nil {
			t.Fatal(err)
		}
		setups, refined = append(setups, su), append(refined, sol.GetRefined())
	}
	opt := model.VerifyOptions{Time: model.TimeOptions{Duration: 10, WarnThreshold: 0.01}, Model: in.Options, Seed: 11}
	reps, err := model.VerifySetups(context.Background(), in.Vehicle, in.RoadCases, setups, opt, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i, rep := range reps {
		r := refined[i]
		if len(r.GetCases()) != len(rep.Cases) {
			t.Fatalf("point %d: %d refined cases, verify has %d", i, len(r.GetCases()), len(rep.Cases))
		}
		var sum, wsum float64
		for c, vc := range rep.Cases {
			got := r.GetCases()[c]
			if got.GetRoadCase() != vc.Case || got.GetStepS() != vc.Time.Step || got.GetSettleS() != vc.Time.Settle || len(got.GetMetrics()) != len(vc.Rows) {
				t.Fatalf("point %d case %d: refined case differs from verify's in its name, step, settle or rows", i, c)
			}
			for k, row := range vc.Rows {
				m := got.GetMetrics()[k]
				if m.GetMetric() != row.Metric || m.GetFrequencyDomain() != row.Frequency || m.GetTimeDomain() != row.Time ||
					m.GetDifference() != row.Diff || m.GetRelativeDifference() != row.RelDiff || m.GetStatisticalError() != row.StatError {
					t.Errorf("point %d case %d: row %s differs from verify's", i, c, row.Metric)
				}
			}
			g := 0.0
			for k := range 4 {
				x := vc.Time.TyreLoadSD[k] / vc.Time.StaticTyreLoad[k]
				g += x * x / 4
			}
			w := in.RoadCases[c].Weight
			if w == 0 {
				w = 1
			}
			sum += w * g
			wsum += w
		}
		want := math.Sqrt(sum / wsum)
		if got := r.GetObjectives()[0]; math.Abs(got-want) > 1e-12*want {
			t.Errorf("point %d: refined grip %.17g, from verify's rows %.17g", i, got, want)
		}
		if r.GetObjectiveSources()[0] != pb.RefineSource_REFINE_SOURCE_TIME_DOMAIN || !(r.GetObjectiveErrors()[0] > 0) {
			t.Errorf("point %d: grip source %v, error %g; want time domain with an error > 0", i, r.GetObjectiveSources()[0], r.GetObjectiveErrors()[0])
		}
		if r.GetRank() < 1 {
			t.Errorf("point %d: rank %d", i, r.GetRank())
		}
	}
	fc, rs, err := decodeSummary(summary)
	if err != nil || fc == nil || rs == nil || int(rs.GetPoints()) != len(front) || rs.GetSeed() != 11 || rs.GetDurationS() != 10 || rs.GetSigmas() != model.VerdictSigmas {
		t.Fatalf("summary %v, %v, %v", fc, rs, err)
	}

	sliced, slicedSummary := runWithSummary(t, spec, 1, true)
	if len(sliced) != len(front) || !bytes.Equal(summary, slicedSummary) {
		t.Fatalf("resumed run: %d points (want %d), summaries equal %v", len(sliced), len(front), bytes.Equal(summary, slicedSummary))
	}
	for i := range front {
		if !bytes.Equal(front[i].Detail, sliced[i].Detail) || geneKey(front[i].Objectives) != geneKey(sliced[i].Objectives) {
			t.Errorf("solution %d differs after cuts and resumes", i)
		}
	}
}

// TestSummaryEnvelope: a summary without a refinement is the front
// check's bytes alone (as every stored job has it), one with a refinement
// decodes back to both.
func TestSummaryEnvelope(t *testing.T) {
	t.Parallel()
	fc := &pb.FrontCheck{Points: 12, Beaten: 1}
	plain, err := encodeSummary(fc, nil)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := proto.MarshalOptions{Deterministic: true}.Marshal(fc)
	if !bytes.Equal(plain, want) {
		t.Fatal("a summary without a refinement is not the front check's encoding")
	}
	rs := &pb.RefinementSummary{Points: 12, Unsettled: 3, Seed: 5}
	b, err := encodeSummary(fc, rs)
	if err != nil {
		t.Fatal(err)
	}
	gfc, grs, err := decodeSummary(b)
	if err != nil || !proto.Equal(gfc, fc) || !proto.Equal(grs, rs) {
		t.Fatalf("decoded %v, %v, %v", gfc, grs, err)
	}
	if _, _, err := decodeSummary(b[:3]); err == nil {
		t.Error("a truncated envelope decodes")
	}
}

// TestEncodeRefinedBytes: EncodeRefined appends the refined figures to a
// detail with no field at or above refined's and decodes and encodes any
// other; either way the bytes must be the protobuf library's
// deterministic encoding of the whole solution.
func TestEncodeRefinedBytes(t *testing.T) {
	t.Parallel()
	p := &study.RefinedPoint{Rank: 1, Feasible: true}
	p.Objectives = []float64{0.1}
	for _, tc := range []struct {
		name string
		sol  *pb.Solution
	}{
		{"plain", &pb.Solution{Index: 3, Objectives: []float64{0.2}}},
		{"robust, a later field", &pb.Solution{Index: 3, Robust: &pb.RobustObjectives{Mean: []float64{0.3}}}},
		{"refined already", &pb.Solution{Index: 3, Refined: &pb.RefinedSolution{Rank: 2}}},
	} {
		detail, err := proto.MarshalOptions{Deterministic: true}.Marshal(tc.sol)
		if err != nil {
			t.Fatal(err)
		}
		got, err := storedCodec{}.EncodeRefined(detail, p)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		whole := proto.Clone(tc.sol).(*pb.Solution)
		whole.Refined = refinedToProto(p)
		want, _ := proto.MarshalOptions{Deterministic: true}.Marshal(whole)
		if !bytes.Equal(got, want) {
			t.Errorf("%s: stored bytes differ from the whole solution's deterministic encoding", tc.name)
		}
	}
	if _, err := (storedCodec{}).EncodeRefined([]byte{0xff}, p); err == nil {
		t.Error("a detail that does not decode is accepted")
	}
}
