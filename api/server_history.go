package api

import (
	"context"
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// historyPointsDefault is the number of samples GetTransientHistory
// returns when the request gives none.
const historyPointsDefault = 2000

// GetTransientHistory simulates one setup on one manoeuvre or kerb case.
func (s *Server) GetTransientHistory(ctx context.Context, req *pb.GetTransientHistoryRequest) (*pb.GetTransientHistoryResponse, error) {
	release, err := s.acquire()
	if err != nil {
		return nil, err
	}
	defer release()
	var p problems
	setup := setupArgument(req.GetSetup(), "setup", &p)
	if req.GetMaxPoints() < 0 {
		p.add("max_points", "must be 0 (the default) or more, got %d", req.GetMaxPoints())
	}
	spec, job := requestSource(req)
	pl, err := s.sourcePlan(ctx, spec, job, 1, &p)
	if err != nil {
		return nil, err
	}
	e := pl.Evaluator()
	idx := -1
	for i := 0; i < e.TransientCases(); i++ {
		if name, _ := e.TransientCase(i); name == req.GetCaseName() || (req.GetCaseName() == "" && i == 0) {
			idx = i
			break
		}
	}
	if idx < 0 {
		p.add("case_name", "no manoeuvre or kerb case named %q in the spec (it has %d)", req.GetCaseName(), e.TransientCases())
		return nil, invalidArgument(p)
	}
	h, err := e.History(setup, idx)
	if err != nil {
		return nil, toStatus(fmt.Errorf("case %q: %w", req.GetCaseName(), err), nil)
	}
	return historyToProto(h, int(req.GetMaxPoints())), nil
}

// historyToProto converts a history, keeping every k-th sample so that
// at most maxPoints remain (0: historyPointsDefault).
func historyToProto(h *model.TransientHistory, maxPoints int) *pb.GetTransientHistoryResponse {
	if maxPoints == 0 {
		maxPoints = historyPointsDefault
	}
	k := max(1, (len(h.Time)+maxPoints-1)/maxPoints)
	pick := func(vs []float64) []float64 {
		out := make([]float64, 0, len(vs)/k+1)
		for i := 0; i < len(vs); i += k {
			out = append(out, vs[i])
		}
		return out
	}
	return &pb.GetTransientHistoryResponse{
		CaseName: h.Case, Kind: h.Kind.String(), TimeS: pick(h.Time), RollRad: pick(h.Roll), PitchRad: pick(h.Pitch),
		LltdFront: pick(h.LLTDFront), TyreLoadFlN: pick(h.TyreLoad[0]), TyreLoadFrN: pick(h.TyreLoad[1]),
		TyreLoadRlN: pick(h.TyreLoad[2]), TyreLoadRrN: pick(h.TyreLoad[3]), AxMPerS2: pick(h.Ax), AyMPerS2: pick(h.Ay),
	}
}
