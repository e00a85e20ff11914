package main

import (
	"context"
	"errors"
	"fmt"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
)

// checkAbout is the help text of check.
const checkAbout = `
Evaluates a candidate setup on a finished job's spec and compares it with
the job's stored front, for CI pipelines. It prints one line, PASS or FAIL
with the reason, then the caution, and exits with

  0  the setup meets every constraint of the job and is within --epsilon
     of the front,
  1  it does not,
  2  usage or input error (bad flags or setup file, unknown or unfinished
     job, server unreachable): no verdict.

The distance is the additive epsilon indicator with each objective divided
by the front's extent (max - min over the front): the setup fails when
some front solution is better in every objective by more than epsilon
times that extent. 0 demands a setup no front solution dominates.`

var checkCommand = &command{name: "check", synopsis: "[flags] JOB --setup FILE", minArgs: 1, maxArgs: 1, client: true,
	summary: "CI gate: does a setup meet a job's constraints and sit within epsilon of its front?", about: checkAbout, flags: bindCheck}

func bindCheck(fs *flagSet, _ *env) (runFunc, error) {
	f := &checkFlags{}
	fs.StringVar(&f.setupPath, "setup", "", "candidate setup `file` (a Setup message, YAML or JSON)")
	fs.Float64Var(&f.epsilon, "epsilon", 0.02, "allowed distance to the front, as a `fraction` of its extent in each objective")
	return f.run, nil
}

// checkFlags are check's own flags.
type checkFlags struct {
	setupPath string
	epsilon   float64
}

func (f *checkFlags) run(ctx context.Context, e *env, in *parsed) error {
	if f.setupPath == "" {
		return usagef("check", "--setup is required")
	}
	if !(f.epsilon >= 0) {
		return usagef("check", "--epsilon must be >= 0, got %g", f.epsilon)
	}
	verdict, err := check(ctx, e, in.client, jobName(in.args[0]), f.setupPath, f.epsilon)
	if err != nil {
		var ue *usageError
		if errors.As(err, &ue) {
			return err
		}
		return &exitError{code: exitUsage, msg: describeError(err)}
	}
	fmt.Fprintln(e.stdout, verdict.line)
	printCaution(e.stdout)
	if !verdict.pass {
		return &exitError{code: exitFailure}
	}
	return nil
}

type verdict struct {
	pass bool
	line string
}

func check(ctx context.Context, e *env, cf *clientFlags, name, setupPath string, epsilon float64) (*verdict, error) {
	setups, err := readSetups(e, []string{setupPath})
	if err != nil {
		return nil, err
	}
	c, err := cf.dial()
	if err != nil {
		return nil, err
	}
	defer c.Close()
	cctx, cancel := c.call(ctx)
	resp, err := c.svc.CompareSetup(cctx, &pb.CompareSetupRequest{Job: name, Setup: setups[0]})
	cancel()
	if err != nil {
		return nil, err
	}
	return judge(resp, epsilon), nil
}

// judge turns a comparison into the verdict line.
func judge(r *pb.CompareSetupResponse, epsilon float64) *verdict {
	against := fmt.Sprintf("front of %d solutions", r.GetFrontSize())
	if r.GetPartial() {
		against = "partial " + against
	}
	ev := r.GetEvaluation()
	if !ev.GetFeasible() {
		reason := ev.GetInfeasibleReason()
		var over []string
		for k, c := range r.GetConstraints() {
			if k < len(ev.GetViolations()) && ev.GetViolations()[k] > 0 {
				q := constraintQuantity(c.GetKind())
				over = append(over, fmt.Sprintf("%s over its limit %s %s by %.1f %%", q.label, tradeNum(q, c.GetLimit()), q.unit, pct(ev.GetViolations()[k])))
			}
		}
		if len(over) > 0 {
			reason = strings.Join(over, "; ")
		}
		if reason == "" {
			reason = "the evaluation failed"
		}
		return &verdict{false, "FAIL: constraints not met: " + reason}
	}
	eps := r.GetNormalizedAdditiveEpsilon()
	var gaps []string
	for k, g := range r.GetObjectiveGaps() {
		if k < len(r.GetObjectives()) {
			q := objectiveQuantity(r.GetObjectives()[k].GetKind())
			gaps = append(gaps, fmt.Sprintf("%s %s %s", q.label, signedNum(q.trade(g), q.prec), q.unit))
		}
	}
	gapText := strings.Join(gaps, ", ")
	if eps > epsilon {
		return &verdict{false, fmt.Sprintf("FAIL: solution %d of the %s is better in every objective by at least %.2f %% of the front's extent (allowed %.2f %%); candidate vs it: %s",
			r.GetNearestIndex(), against, pct(eps), pct(epsilon), gapText)}
	}
	if eps <= 0 {
		return &verdict{true, fmt.Sprintf("PASS: constraints met; no solution of the %s dominates it (epsilon %s %% of the extent; nearest solution %d: %s)",
			against, num(pct(eps), 2), r.GetNearestIndex(), gapText)}
	}
	return &verdict{true, fmt.Sprintf("PASS: constraints met; solution %d of the %s is better in every objective, by at least %.2f %% of the front's extent (allowed %.2f %%); candidate vs it: %s",
		r.GetNearestIndex(), against, pct(eps), pct(epsilon), gapText)}
}
