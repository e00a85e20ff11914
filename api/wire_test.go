package api

import (
	"bytes"
	"fmt"
	"slices"
	"strings"
	"testing"

	"google.golang.org/grpc"
	"google.golang.org/grpc/codes"
	"google.golang.org/grpc/mem"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// rawCodec sends a request's bytes as they are, so that a test can send
// what a broken or hostile client would.
type rawCodec struct{}

type rawMessage struct{ b []byte }

func (rawCodec) Name() string { return "proto" }
func (rawCodec) Marshal(v any) (mem.BufferSlice, error) {
	return mem.BufferSlice{mem.SliceBuffer(v.(*rawMessage).b)}, nil
}
func (rawCodec) Unmarshal(data mem.BufferSlice, v any) error {
	v.(*rawMessage).b = data.Materialize()
	return nil
}

// corrupt marshals m and replaces the first occurrence of old by new
// (of the same length, so that every length prefix stays right).
func corrupt(t *testing.T, m proto.Message, old, new string) []byte {
	t.Helper()
	b, err := proto.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	if len(old) != len(new) || !bytes.Contains(b, []byte(old)) {
		t.Fatalf("cannot replace %q by %q", old, new)
	}
	return bytes.Replace(b, []byte(old), []byte(new), 1)
}

// TestUndecodableRequests: a request that does not decode is
// InvalidArgument naming the field (gRPC's own answer is Internal with no
// field), in unary calls and in a stream.
func TestUndecodableRequests(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	spec := testSpec(3)
	spec.DisplayName = "utf8 check"
	spec.RoadCases[1].Name = "second case"
	whole, err := proto.Marshal(&pb.SubmitJobRequest{Spec: spec})
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, method string
		req          []byte
		field        string
		reason       string
	}{
		{"invalid UTF-8 in the display name", "SubmitJob", corrupt(t, &pb.SubmitJobRequest{Spec: spec}, "utf8", "u\xfft8"),
			"spec.display_name", "not valid UTF-8"},
		{"invalid UTF-8 in a road case name", "EvaluateSetups", corrupt(t, &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec}}, "second", "s\xc3cond"),
			"spec.road_cases[1].name", "not valid UTF-8"},
		{"invalid UTF-8 in a label", "SubmitJob", corrupt(t, &pb.SubmitJobRequest{Spec: spec}, "suite", "su\xffte"),
			"spec.labels", "not valid UTF-8"},
		{"truncated message", "SubmitJob", whole[:len(whole)-7], "spec", "truncated or malformed"},
		{"invalid UTF-8 in a job name", "GetJob", corrupt(t, &pb.GetJobRequest{Name: "jobs/abc"}, "abc", "a\xffc"),
			"name", "not valid UTF-8"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			var out rawMessage
			err := b.conn.Invoke(testContext(t), "/dampfront.v1.DampfrontService/"+tc.method, &rawMessage{tc.req}, &out, grpc.ForceCodecV2(rawCodec{}))
			checkOneViolation(t, tc.name, err, tc.field, tc.reason)
		})
	}
	t.Run("stream", func(t *testing.T) {
		t.Parallel()
		desc := &grpc.StreamDesc{StreamName: "WatchJob", ServerStreams: true}
		st, err := b.conn.NewStream(testContext(t), desc, "/dampfront.v1.DampfrontService/WatchJob", grpc.ForceCodecV2(rawCodec{}))
		if err != nil {
			t.Fatal(err)
		}
		if err := st.SendMsg(&rawMessage{corrupt(t, &pb.WatchJobRequest{Name: "jobs/abc"}, "abc", "a\xffc")}); err != nil {
			t.Fatal(err)
		}
		if err := st.CloseSend(); err != nil {
			t.Fatal(err)
		}
		var out rawMessage
		checkOneViolation(t, "stream", st.RecvMsg(&out), "name", "not valid UTF-8")
	})
}

func checkOneViolation(t *testing.T, what string, err error, field, reason string) {
	t.Helper()
	st := wantCode(t, what, err, codes.InvalidArgument, ReasonInvalidArgument)
	if got := violations(t, what, err); !slices.Equal(got, []string{field}) {
		t.Errorf("violations %q, want [%s]", got, field)
	}
	if !strings.Contains(st.Message(), reason) {
		t.Errorf("message %q, want %q in it", st.Message(), reason)
	}
}

// TestSpecSizeLimit: every call that carries a spec refuses one over the
// same limit (the engine's, 1 MiB by default), naming the field, before
// any work on it.
func TestSpecSizeLimit(t *testing.T) {
	t.Parallel()
	const limit = 64 << 10
	b := setup(t, Options{MaxSpecBytes: limit})
	big := testSpec(3)
	big.DisplayName = strings.Repeat("x", limit)
	small := testSpec(3)
	setups := []*pb.Setup{testSetup()}
	for _, tc := range []struct {
		name string
		call func(spec *pb.JobSpec) error
	}{
		{"SubmitJob", func(spec *pb.JobSpec) error {
			_, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec})
			return err
		}},
		{"EvaluateSetups", func(spec *pb.JobSpec) error {
			_, err := b.client.EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec}, Setups: setups})
			return err
		}},
		{"VerifySetup", func(spec *pb.JobSpec) error {
			_, err := b.client.VerifySetup(testContext(t), &pb.VerifySetupRequest{Source: &pb.VerifySetupRequest_Spec{Spec: spec}, Setup: setups[0], DurationS: 5})
			return err
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			checkOneViolation(t, tc.name, tc.call(big), "spec", fmt.Sprintf("at most %d allowed", limit))
			if err := tc.call(small); err != nil {
				t.Errorf("a spec under the limit: %v", err)
			}
		})
	}
}
