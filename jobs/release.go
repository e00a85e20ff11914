package jobs

import (
	"context"
	"encoding/json"
	"os"
	"strconv"
	"strings"
	"time"

	"github.com/riverqueue/river"
	"github.com/riverqueue/river/riverdriver"
	"github.com/riverqueue/river/rivertype"
)

// formatClientID builds the River client ID node/pid/nonce, which River
// records in each slice's attempted_by; releaseOrphans reads it back.
func formatClientID(node string, pid int, nonce string) string {
	return node + "/" + strconv.Itoa(pid) + "/" + nonce
}

// parseClientID splits an ID of formatClientID; ok is false for others.
func parseClientID(id string) (node string, pid int, nonce string, ok bool) {
	i := strings.LastIndexByte(id, '/')
	if i < 0 {
		return "", 0, "", false
	}
	nonce = id[i+1:]
	rest := id[:i]
	j := strings.LastIndexByte(rest, '/')
	if j < 0 {
		return "", 0, "", false
	}
	pid, err := strconv.Atoi(rest[j+1:])
	if err != nil {
		return "", 0, "", false
	}
	return rest[:j], pid, nonce, true
}

// orphanBatch is how many running slices one release pass inspects.
const orphanBatch = 1000

// releaseOrphans makes slices available again that River still shows as
// running but whose last attempt was made by a process of this node that
// is gone: one whose PID no longer exists, or one with this process's PID
// and another nonce (a container restarted with the same PID). River's
// own rescuer would pick them up only after RescueStuckJobsAfter; on
// restart of a single-process server that is needless waiting. Slices of
// other nodes, or of live processes here, are left to River's rescuer.
// As River's rescuer does, a slice whose attempts are all spent is
// discarded instead; Start then reaps its job (strand.go), so a worker
// killed mid-slice again and again cannot keep a job alive forever.
func (rq *riverQueue[TTx]) releaseOrphans(ctx context.Context) (int, error) {
	_, _, ownNonce, _ := parseClientID(rq.id)
	res, err := rq.client.JobList(ctx, river.NewJobListParams().
		Kinds(sliceKind).States(rivertype.JobStateRunning).First(orphanBatch))
	if err != nil {
		return 0, err
	}
	now := time.Now().UTC()
	p := &riverdriver.JobRescueManyParams{StuckHorizon: now.Add(24 * time.Hour)}
	for _, j := range res.Jobs {
		if len(j.AttemptedBy) == 0 {
			continue
		}
		node, pid, nonce, ok := parseClientID(j.AttemptedBy[len(j.AttemptedBy)-1])
		if !ok || node != rq.e.cfg.NodeID {
			continue
		}
		dead := (pid == os.Getpid() && nonce != ownNonce) || (pid != os.Getpid() && !processAlive(pid))
		if !dead {
			continue
		}
		msg, state, finalized := "released at start-up: the process of this node that ran the slice is gone",
			rivertype.JobStateAvailable, (*time.Time)(nil)
		if j.Attempt >= j.MaxAttempts {
			msg, state, finalized = "discarded at start-up: the process of this node that ran the slice's last attempt is gone",
				rivertype.JobStateDiscarded, &now
		}
		errData, err := json.Marshal(rivertype.AttemptError{At: now, Attempt: j.Attempt, Error: msg})
		if err != nil {
			return 0, err
		}
		p.ID = append(p.ID, j.ID)
		p.Error = append(p.Error, errData)
		p.FinalizedAt = append(p.FinalizedAt, finalized)
		p.ScheduledAt = append(p.ScheduledAt, now)
		p.State = append(p.State, string(state))
	}
	if len(p.ID) == 0 {
		return 0, nil
	}
	if _, err := rq.db.driver.GetExecutor().JobRescueMany(ctx, p); err != nil {
		return 0, err
	}
	return len(p.ID), nil
}
