package api

import (
	"fmt"
	"strings"
	"time"

	"google.golang.org/protobuf/proto"
	"google.golang.org/protobuf/types/known/timestamppb"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/jobs"
	"dampfront/jobs/study"
)

// jobStates pairs the engine's states with the enum.
var jobStates = map[jobs.State]pb.JobState{
	jobs.StateQueued:    pb.JobState_JOB_STATE_QUEUED,
	jobs.StateRunning:   pb.JobState_JOB_STATE_RUNNING,
	jobs.StateSucceeded: pb.JobState_JOB_STATE_SUCCEEDED,
	jobs.StateFailed:    pb.JobState_JOB_STATE_FAILED,
	jobs.StateCancelled: pb.JobState_JOB_STATE_CANCELLED,
}

type protoState pb.JobState

func stateToProto(s jobs.State) protoState { return protoState(jobStates[s]) }

// display is the state in lower case without its prefix ("running").
func (s protoState) display() string {
	return strings.ToLower(strings.TrimPrefix(pb.JobState(s).String(), "JOB_STATE_"))
}

// stateFromProto returns the engine's state of an enum value.
func stateFromProto(s pb.JobState) (jobs.State, bool) {
	for k, v := range jobStates {
		if v == s {
			return k, true
		}
	}
	return "", false
}

// jobNamePrefix starts every job's resource name.
const jobNamePrefix = "jobs/"

// jobName is the resource name of a job ID.
func jobName(id string) string { return jobNamePrefix + id }

// parseJobName accepts "jobs/{job_id}" or a bare job ID and records a
// problem at field otherwise.
func parseJobName(name, field string, p *problems) string {
	id := strings.TrimPrefix(name, jobNamePrefix)
	switch {
	case name == "":
		p.add(field, "is required: a job name \"jobs/{job_id}\" or a job ID")
	case id == "" || strings.ContainsAny(id, "/ \t\n"):
		p.add(field, "must be \"jobs/{job_id}\" or a job ID, got %q", name)
	}
	return id
}

// jobToProto converts a stored job; full includes the spec.
func jobToProto(j *jobs.Job, full bool) (*pb.Job, error) {
	spec := &pb.JobSpec{}
	if err := proto.Unmarshal(j.Spec, spec); err != nil {
		return nil, fmt.Errorf("stored spec of job %q does not decode: %w", j.ID, err)
	}
	out := &pb.Job{
		Name:            jobName(j.ID),
		JobId:           j.ID,
		DisplayName:     spec.GetDisplayName(),
		State:           jobStates[j.State],
		Labels:          j.Labels,
		Seed:            spec.GetSearch().GetSeed(), // the one seed of a job, in its stored spec
		CreateTime:      timestamp(j.CreatedAt),
		StartTime:       timestamp(j.StartedAt),
		FinishTime:      timestamp(j.FinishedAt),
		Progress:        progressToProto(&j.Progress),
		ErrorMessage:    j.Error,
		Partial:         j.Partial,
		CancelRequested: j.CancelRequested,
		UncertainCars:   uncertainCars(spec),
	}
	if full {
		out.Spec = spec
	}
	if len(j.Summary) > 0 && j.State == jobs.StateSucceeded {
		var err error
		if out.FrontCheck, out.RefinementSummary, err = decodeSummary(j.Summary); err != nil {
			return nil, fmt.Errorf("stored front check of job %q does not decode: %w", j.ID, err)
		}
	} else {
		// A job refining, or stopped while it refined: how far the
		// refinement is, as of the last checkpoint.
		out.RefinementSummary = refinementInProgress(j.Summary)
	}
	return out, nil
}

// frontCheckToProto converts the check of a finished front.
func frontCheckToProto(c *study.FrontCheck) *pb.FrontCheck {
	return &pb.FrontCheck{
		Points: int32(c.Points), Polished: int32(c.Polished), PolishEvaluations: int32(c.PolishEvaluations),
		Twins: int32(c.Twins), Neighbours: int32(c.Neighbours), Radius: c.Radius, MarginFraction: c.Margin,
		BeatenByTwin: int32(c.BeatenByTwin), BeatenByNeighbour: int32(c.BeatenByNeighbour), Beaten: int32(c.Beaten),
		Evaluations: int32(c.Evaluations), PolishRounds: int32(c.PolishRounds), PolishReplaced: int32(c.PolishReplaced),
	}
}

func progressToProto(p *jobs.Progress) *pb.Progress {
	return &pb.Progress{
		Generation:     int32(p.Generation),
		Generations:    int32(p.Generations),
		Evaluations:    p.Evaluations,
		Hypervolume:    p.Hypervolume,
		BestObjectives: p.Best,
		UpdateTime:     timestamp(p.UpdatedAt),
	}
}

// timestamp converts a time; the zero time is "not set".
func timestamp(t time.Time) *timestamppb.Timestamp {
	if t.IsZero() {
		return nil
	}
	return timestamppb.New(t)
}
