package api

import (
	"errors"
	"slices"

	"google.golang.org/protobuf/encoding/protowire"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs/study"
	"dampfront/model"
)

// refinementFromProto converts the refinement of a spec; absent is none.
func refinementFromProto(r *pb.Refinement) study.Refinement {
	if r == nil {
		return study.Refinement{}
	}
	return study.Refinement{Enabled: r.GetEnabled(), Duration: r.GetDurationS(), Seed: r.Seed, Sigmas: r.GetSigmas()}
}

// fillRefinementDefaults writes the study's defaults d into a refinement
// that is given; an absent one stays absent, so a spec without one keeps
// its stored bytes.
func fillRefinementDefaults(r *pb.Refinement, d *study.Refinement) {
	if r == nil || !d.Enabled {
		return
	}
	if r.DurationS == 0 {
		r.DurationS = d.Duration
	}
	if r.Seed == nil {
		r.Seed = proto.Uint64(*d.Seed)
	}
	if r.Sigmas == 0 {
		r.Sigmas = d.Sigmas
	}
}

// refineSourceToProto converts where a refined figure comes from.
func refineSourceToProto(s model.RefineSource) pb.RefineSource {
	switch s {
	case model.RefineTimeDomain:
		return pb.RefineSource_REFINE_SOURCE_TIME_DOMAIN
	case model.RefineLinear:
		return pb.RefineSource_REFINE_SOURCE_LINEAR
	case model.RefineTransient:
		return pb.RefineSource_REFINE_SOURCE_TRANSIENT
	}
	return pb.RefineSource_REFINE_SOURCE_UNSPECIFIED
}

func refineSourcesToProto(s []model.RefineSource) []pb.RefineSource {
	out := make([]pb.RefineSource, len(s))
	for i, v := range s {
		out[i] = refineSourceToProto(v)
	}
	return out
}

// refinedToProto converts a refined front point.
func refinedToProto(p *study.RefinedPoint) *pb.RefinedSolution {
	out := &pb.RefinedSolution{
		Objectives: slices.Clone(p.Objectives), ObjectiveErrors: slices.Clone(p.ObjectiveErrors),
		ObjectiveSources: refineSourcesToProto(p.ObjectiveSource),
		Violations:       slices.Clone(p.Violations), ViolationErrors: slices.Clone(p.ViolationErrors),
		ViolationSources: refineSourcesToProto(p.ViolationSource),
		Feasible:         p.Feasible, Rank: int32(p.Rank), Unsettled: p.Unsettled,
		FeasibilityUnsettled: p.FeasibilityUnsettled, Failed: p.Failed,
	}
	for i := range p.Cases {
		out.Cases = append(out.Cases, verifiedCaseToProto(&p.Cases[i]))
	}
	return out
}

// refineSummaryToProto converts what the refinement did, or how far it
// is; nil is nil. The fields of a refinement in progress are set only
// while it is, so that a done one encodes to the bytes it always had.
func refineSummaryToProto(s *study.RefineSummary) *pb.RefinementSummary {
	if s == nil {
		return nil
	}
	out := &pb.RefinementSummary{Points: int32(s.Points), Failed: int32(s.Failed), OffFront: int32(s.OffFront),
		Infeasible: int32(s.Infeasible), Unsettled: int32(s.Unsettled), DurationS: s.Duration, Seed: s.Seed, Sigmas: s.Sigmas}
	if s.InProgress {
		out.InProgress, out.PointsChecked = true, int32(s.Checked)
	}
	return out
}

// refinementInProgress is the refinement summary of a job's stored
// summary b while the refinement runs (or of a job stopped before it
// ended), nil when there is none in progress or b does not decode.
func refinementInProgress(b []byte) *pb.RefinementSummary {
	if len(b) == 0 {
		return nil
	}
	if _, rs, err := decodeSummary(b); err == nil && rs.GetInProgress() {
		return rs
	}
	return nil
}

// The job's stored summary. Without a refinement it is the front check's
// deterministic encoding (a FrontCheck), as every job stored it before
// the refinement existed. With one it is
//
//	0x00, uvarint length n, the FrontCheck's n bytes, the
//	RefinementSummary's bytes
//
// (both deterministic). A protobuf encoding never starts with 0x00 (a tag
// of field 0 is invalid), so the first byte tells the two apart.
const summaryEnvelope = 0x00

// encodeSummary encodes a front check and, when not nil, a refinement
// summary.
func encodeSummary(fc *pb.FrontCheck, rs *pb.RefinementSummary) ([]byte, error) {
	det := proto.MarshalOptions{Deterministic: true}
	b, err := det.Marshal(fc)
	if err != nil || rs == nil {
		return b, err
	}
	out := []byte{summaryEnvelope}
	out = protowire.AppendVarint(out, uint64(len(b)))
	out = append(out, b...)
	return det.MarshalAppend(out, rs)
}

// decodeSummary decodes a stored summary (see encodeSummary); the
// refinement summary is nil when there is none.
func decodeSummary(b []byte) (*pb.FrontCheck, *pb.RefinementSummary, error) {
	fc := &pb.FrontCheck{}
	if len(b) == 0 || b[0] != summaryEnvelope {
		return fc, nil, proto.Unmarshal(b, fc)
	}
	n, k := protowire.ConsumeVarint(b[1:])
	if k < 0 || uint64(len(b)-1-k) < n {
		return nil, nil, errors.New("summary envelope is truncated")
	}
	rest := b[1+k:]
	if err := proto.Unmarshal(rest[:n], fc); err != nil {
		return nil, nil, err
	}
	rs := &pb.RefinementSummary{}
	if err := proto.Unmarshal(rest[n:], rs); err != nil {
		return nil, nil, err
	}
	return fc, rs, nil
}
