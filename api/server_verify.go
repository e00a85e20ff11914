package api

import (
	"context"
	"errors"
	"math"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// MaxVerifyDuration is the longest record VerifySetup takes per road
// case, s: five times the default, about 1 s of one core per case on the
// demo car, so one call stays within a default call deadline.
const MaxVerifyDuration = 600.0

// VerifySetup runs model.Verify for one setup on the car and road cases
// of a spec given in the request or of a stored job. It takes one of the
// synchronous-evaluation slots (ResourceExhausted when none is free). The
// check cannot be interrupted: a call that ends early (its deadline, a
// cancel) returns at once, and its slot is freed when the check is done,
// so that abandoned calls cannot pile up work beyond the slots.
func (s *Server) VerifySetup(ctx context.Context, req *pb.VerifySetupRequest) (*pb.VerifySetupResponse, error) {
	release, err := s.acquire()
	if err != nil {
		return nil, err
	}
	released := false
	defer func() {
		if !released {
			release()
		}
	}()
	var p problems
	setup := setupArgument(req.GetSetup(), "setup", &p)
	if req.GetSetup() == nil {
		p = problems{{Field: "setup", Reason: "is required"}}
	}
	duration := req.GetDurationS()
	switch {
	case duration == 0:
		duration = model.DefaultDuration
	case !(duration > 0) || math.IsInf(duration, 0) || duration > MaxVerifyDuration:
		p.add("duration_s", "must be a number of seconds in (0, %g], got %g", MaxVerifyDuration, duration)
	}
	seed := uint64(1)
	if req.Seed != nil {
		seed = req.GetSeed()
	}
	spec, job := requestSource(req)
	pl, err := s.sourcePlan(ctx, spec, job, 0, &p)
	if err != nil {
		return nil, err
	}
	ev := pl.Evaluator()
	cases := pl.RoadCases()
	opt := model.VerifyOptions{
		Time:  model.TimeOptions{Duration: duration, WarnThreshold: ev.WarnThreshold()},
		Model: pl.EvaluatorOptions(),
		Seed:  seed,
	}
	type result struct {
		rep *model.VerifyReport
		err error
	}
	done := make(chan result, 1)
	released = true // from here the check's goroutine frees the slot
	go func() {
		defer release()
		rep, err := model.Verify(*ev.Vehicle(), cases, setup, opt)
		done <- result{rep, err}
	}()
	var r result
	select {
	case r = <-done:
	case <-ctx.Done():
		return nil, toStatus(ctx.Err(), nil)
	}
	if r.err != nil {
		var q problems
		q.mergeModel(under(""), r.err)
		var ve *model.ValidationError
		if errors.As(r.err, &ve) {
			return nil, q.err()
		}
		return nil, toStatus(r.err, nil)
	}
	return verifyReportToProto(r.rep, duration, ev.WarnThreshold()), nil
}

// verifyReportToProto converts a Verify report.
func verifyReportToProto(rep *model.VerifyReport, duration, threshold float64) *pb.VerifySetupResponse {
	out := &pb.VerifySetupResponse{Seed: rep.Seed, DurationS: duration, Caution: model.Caution,
		Verdict: verdictToProto(rep.Verdict()), VerdictSigmas: model.VerdictSigmas}
	for i := range rep.Cases {
		c := &rep.Cases[i]
		vc := verifiedCaseToProto(c)
		vc.Warnings = c.Frequency.WarningStrings(threshold)
		out.Cases = append(out.Cases, vc)
	}
	return out
}

// verifiedCaseToProto converts the check of one road case: its name,
// step, settling time, rows and verdict (no warnings).
func verifiedCaseToProto(c *model.VerifyCase) *pb.VerifiedCase {
	vc := &pb.VerifiedCase{RoadCase: c.Case, StepS: c.Time.Step, SettleS: c.Time.Settle, Verdict: verdictToProto(c.Verdict())}
	for _, r := range c.Rows {
		se := r.StatError
		if math.IsInf(se, 0) || math.IsNaN(se) {
			se = 0
		}
		vc.Metrics = append(vc.Metrics, &pb.VerifiedMetric{Metric: r.Metric, FrequencyDomain: r.Frequency,
			TimeDomain: r.Time, Difference: r.Diff, RelativeDifference: r.RelDiff, StatisticalError: se,
			Verdict: verdictToProto(r.Verdict())})
	}
	return vc
}

// verdictToProto converts a verdict of the time-domain check.
func verdictToProto(v model.Verdict) pb.Verdict {
	switch v {
	case model.VerdictHolds:
		return pb.Verdict_VERDICT_HOLDS
	case model.VerdictDiffers:
		return pb.Verdict_VERDICT_DIFFERS
	case model.VerdictNotJudged:
		return pb.Verdict_VERDICT_NOT_JUDGED
	}
	return pb.Verdict_VERDICT_UNSPECIFIED
}
