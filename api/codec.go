package api

import (
	"fmt"

	"google.golang.org/protobuf/encoding/protowire"
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
// to its encoded detail. A protobuf message followed by more fields
// decodes as their merge, and the deterministic encoding writes the
// fields in number order, so while the detail holds no field at or above
// refined's (21) the encoding of field 21 alone is appended: the bytes of
// the whole solution encoded at once, without decoding the detail
// (decoding and encoding every detail again made some 30 MB of garbage
// when a 586-point refined front was saved). Any other detail is decoded,
// given the figures and encoded again.
func (storedCodec) EncodeRefined(detail []byte, p *study.RefinedPoint) ([]byte, error) {
	det := proto.MarshalOptions{Deterministic: true}
	top, err := highestField(detail)
	if err != nil {
		return nil, fmt.Errorf("solution detail does not decode: %w", err)
	}
	if top >= refinedField {
		sol := &pb.Solution{}
		if err := proto.Unmarshal(detail, sol); err != nil {
			return nil, fmt.Errorf("solution detail does not decode: %w", err)
		}
		sol.Refined = refinedToProto(p)
		return det.Marshal(sol)
	}
	b, err := det.Marshal(&pb.Solution{Refined: refinedToProto(p)})
	if err != nil {
		return nil, err
	}
	return append(append(make([]byte, 0, len(detail)+len(b)), detail...), b...), nil
}

// refinedField is Solution.refined's field number.
var refinedField = (&pb.Solution{}).ProtoReflect().Descriptor().Fields().ByName("refined").Number()

// highestField returns the highest field number at the top level of an
// encoded message (0 for an empty one).
func highestField(b []byte) (protowire.Number, error) {
	var top protowire.Number
	for len(b) > 0 {
		num, typ, n := protowire.ConsumeTag(b)
		if n < 0 {
			return 0, protowire.ParseError(n)
		}
		b = b[n:]
		n = protowire.ConsumeFieldValue(num, typ, b)
		if n < 0 {
			return 0, protowire.ParseError(n)
		}
		b = b[n:]
		top = max(top, num)
	}
	return top, nil
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
