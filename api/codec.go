package api

import (
	"fmt"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
)

// The job engine stores a spec and each front member's detail as opaque
// bytes. Their encoding is the API's, and has been since the first stored
// job: a spec is a deterministic protobuf encoding of a JobSpec with its
// defaults filled in (MarshalSpec), a detail a deterministic encoding of
// a Solution. GetJob returns the stored spec as it is, and GetFront the
// stored details; storedCodec gives the study package the same bytes.

// NewOpener returns the job engine's opener of runs (a jobs.RunOpener)
// over the stored encoding; workers is the number of evaluations a run
// makes at once, 0 for GOMAXPROCS.
func NewOpener(workers int) *study.Opener {
	return &study.Opener{Codec: storedCodec{}, Workers: workers}
}

// storedCodec is study.Codec over the stored encoding.
type storedCodec struct{}

var _ study.Codec = storedCodec{}

// DecodeSpec decodes stored spec bytes into the study's spec.
func (storedCodec) DecodeSpec(b []byte) (*study.Spec, error) {
	msg, err := unmarshalSpec(b)
	if err != nil {
		return nil, err
	}
	var p problems
	s := specFromProto(msg, "spec.", &p)
	if len(p) > 0 {
		return nil, fmt.Errorf("stored spec: %s", p.String())
	}
	return s, nil
}

// EncodeSolution encodes a solution's detail.
func (storedCodec) EncodeSolution(s *study.Solution) ([]byte, error) {
	return proto.MarshalOptions{Deterministic: true}.Marshal(solutionToProto(s))
}

// EncodeCheck encodes the check of a finished front and what the
// refinement did (nil without one), stored as the job's summary and read
// back by jobToProto (see encodeSummary).
func (storedCodec) EncodeCheck(c *study.FrontCheck, refined *study.RefineSummary) ([]byte, error) {
	return encodeSummary(frontCheckToProto(c), refineSummaryToProto(refined))
}

// EncodeRefined adds a front member's refined figures (Solution.refined)
// to its encoded detail.
func (storedCodec) EncodeRefined(detail []byte, p *study.RefinedPoint) ([]byte, error) {
	sol := &pb.Solution{}
	if err := proto.Unmarshal(detail, sol); err != nil {
		return nil, fmt.Errorf("solution detail does not decode: %w", err)
	}
	sol.Refined = refinedToProto(p)
	return proto.MarshalOptions{Deterministic: true}.Marshal(sol)
}

// MarshalSpec returns the bytes the engine stores for a spec: its
// defaults filled in, deterministically encoded, so that equal specs give
// equal bytes.
func MarshalSpec(spec *pb.JobSpec) ([]byte, error) {
	return marshalSpec(withDefaults(spec))
}

// marshalSpec encodes a spec whose defaults are filled in.
func marshalSpec(spec *pb.JobSpec) ([]byte, error) {
	return proto.MarshalOptions{Deterministic: true}.Marshal(spec)
}

// unmarshalSpec decodes stored spec bytes.
func unmarshalSpec(b []byte) (*pb.JobSpec, error) {
	s := &pb.JobSpec{}
	if err := proto.Unmarshal(b, s); err != nil {
		return nil, fmt.Errorf("spec is not a dampfront.v1.JobSpec: %w", err)
	}
	return s, nil
}
