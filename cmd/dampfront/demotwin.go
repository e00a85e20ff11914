package main

import (
	"context"
	"fmt"
	"strings"

	"dampfront/api"
)

// printTwins prints the front's balanced point bal (an index into the
// front's solutions) and the two solutions of largest split beside their
// bump = rebound twins: what each one's split buys, in every objective;
// nothing for a job without manoeuvres or kerbs.
func printTwins(ctx context.Context, e *env, c *client, name string, fd *frontData, bal int) error {
	if spec := fd.job.GetSpec(); len(spec.GetManoeuvres())+len(spec.GetKerbs()) == 0 {
		return nil // on random roads alone the twins differ only by the jacking
	}
	sols := fd.front.GetSolutions()
	objs := fd.front.GetObjectives()
	fmt.Fprintf(e.stdout, "\nWhat sets the split: the balanced point and the two of largest split beside their twins with bump = rebound\n"+
		"on each axle (the same sum, so the same on the random roads; the manoeuvres, the kerb and the jacking tell them apart):\n")
	for _, i := range api.SplitPicks(sols, bal, 2) {
		sol := sols[i]
		cctx, cancel := c.call(ctx)
		tc, err := api.CompareTwin(cctx, c.svc, name, sol, sols)
		cancel()
		if err != nil {
			return err
		}
		fmt.Fprintf(e.stdout, "  solution %d: %s\n    %s\n", sol.GetIndex(), setupText(sol.GetSetup()), objectivesText(sol.GetObjectives(), objs))
		if tc.Own {
			fmt.Fprintf(e.stdout, "    bump = rebound on both axles: it is its own twin\n")
			continue
		}
		fmt.Fprintf(e.stdout, "  its twin:    %s\n    %s\n", setupText(tc.Twin), objectivesText(tc.TwinObjectives, objs))
		var worse []string
		for j, w := range tc.Worse {
			worse = append(worse, fmt.Sprintf("%s %+.1f %%", objectiveQuantity(objs[j].GetKind()).label, 100*w))
		}
		verdict := "the solution does not dominate it"
		if tc.Dominated {
			verdict = "the solution dominates it"
		}
		if !tc.Feasible {
			verdict += "; the twin breaks a constraint"
		}
		fmt.Fprintf(e.stdout, "    twin minus solution, in %% of the front's extent: %s; %s\n", strings.Join(worse, ", "), verdict)
	}
	return nil
}
