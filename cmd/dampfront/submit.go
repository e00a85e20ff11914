package main

import (
	"context"
	"flag"
	"fmt"
	"strconv"

	pb "dampfront/api/gen/dampfront/v1"
)

var submitCommand = &command{
	name:    "submit",
	summary: "queue a job from a YAML or JSON spec and print its ID",
	run:     runSubmit,
}

func runSubmit(ctx context.Context, e *env, args []string) error {
	fs := newFlagSet(e, "submit", "[flags] SPEC", `
Reads a job spec (a dampfront.v1 JobSpec in YAML or JSON, "-" for standard
input; see testdata/demo-job.yaml), queues it on the server and prints the
job ID on standard output. With --watch it then follows the job as the
watch subcommand does and exits with its exit code.`)
	cf := addClientFlags(fs, e)
	sf := addSpecFlags(fs)
	labels := labelFlag{}
	fs.Var(labels, "label", "add a label `key=value` (repeatable, or comma-separated)")
	name := fs.String("name", "", "replace the spec's display name")
	seed := fs.String("seed", "", "replace the spec's search seed (an unsigned integer)")
	watch := fs.Bool("watch", false, "follow the job until it ends")
	wf := addWatchModeFlags(fs)
	pos, err := fs.parse(args, 1, 1)
	if err != nil {
		return err
	}
	if err := wf.check("submit"); err != nil {
		return err
	}
	spec, err := sf.load(e, pos[0])
	if err != nil {
		return err
	}
	if *name != "" {
		spec.DisplayName = *name
	}
	if len(labels) > 0 && spec.Labels == nil {
		spec.Labels = map[string]string{}
	}
	for k, v := range labels {
		spec.Labels[k] = v
	}
	seedSet := false
	fs.Visit(func(f *flag.Flag) { seedSet = seedSet || f.Name == "seed" })
	if seedSet {
		s, err := strconv.ParseUint(*seed, 10, 64)
		if err != nil {
			return usagef("submit", "--seed %q is not an unsigned integer", *seed)
		}
		if spec.Search == nil {
			spec.Search = &pb.SearchSettings{}
		}
		spec.Search.Seed = &s
	}

	c, err := cf.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	cctx, cancel := c.call(ctx)
	resp, err := c.svc.SubmitJob(cctx, &pb.SubmitJobRequest{Spec: spec})
	cancel()
	if err != nil {
		return err
	}
	fmt.Fprintln(e.stdout, resp.GetJob().GetJobId())
	if !*watch {
		return nil
	}
	_, err = watchJob(ctx, e, c, resp.GetJob().GetName(), wf)
	return err
}
