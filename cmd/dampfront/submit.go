package main

import (
	"context"
	"flag"
	"fmt"
	"strconv"

	pb "dampfront/api/gen/dampfront/v1"
)

// submitAbout is the help text of submit.
const submitAbout = `
Reads a job spec (a dampfront.v1 JobSpec in YAML or JSON, "-" for standard
input; see testdata/demo-job.yaml), queues it on the server and prints the
job ID on standard output. With --watch it then follows the job as the
watch subcommand does and exits with its exit code.`

var submitCommand = &command{name: "submit", synopsis: "[flags] SPEC", minArgs: 1, maxArgs: 1, client: true,
	summary: "queue a job from a YAML or JSON spec and print its ID", about: submitAbout, flags: bindSubmit}

func bindSubmit(fs *flagSet, _ *env) (runFunc, error) {
	f := &submitFlags{sf: addSpecFlags(fs), labels: labelFlag{}, wf: addWatchModeFlags(fs)}
	fs.Var(f.labels, "label", "add a label `key=value` (repeatable, or comma-separated)")
	fs.StringVar(&f.name, "name", "", "replace the spec's display name")
	fs.StringVar(&f.seed, "seed", "", "replace the spec's search seed (an unsigned integer)")
	fs.BoolVar(&f.watch, "watch", false, "follow the job until it ends")
	return f.run, nil
}

// submitFlags are submit's own flags.
type submitFlags struct {
	sf         *specFlags
	labels     labelFlag
	name, seed string
	watch      bool
	wf         *watchModes
}

func (f *submitFlags) run(ctx context.Context, e *env, in *parsed) error {
	if err := f.wf.check("submit"); err != nil {
		return err
	}
	spec, err := f.sf.load(e, in.args[0])
	if err != nil {
		return err
	}
	if f.name != "" {
		spec.DisplayName = f.name
	}
	if len(f.labels) > 0 && spec.Labels == nil {
		spec.Labels = map[string]string{}
	}
	for k, v := range f.labels {
		spec.Labels[k] = v
	}
	seedSet := false
	in.fs.Visit(func(fl *flag.Flag) { seedSet = seedSet || fl.Name == "seed" })
	if seedSet {
		s, err := strconv.ParseUint(f.seed, 10, 64)
		if err != nil {
			return usagef("submit", "--seed %q is not an unsigned integer", f.seed)
		}
		if spec.Search == nil {
			spec.Search = &pb.SearchSettings{}
		}
		spec.Search.Seed = &s
	}

	c, err := in.client.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	cctx, cancel := c.call(ctx)
	resp, err := c.svc.SubmitJob(cctx, &pb.SubmitJobRequest{Spec: spec})
	cancel()
	if err != nil {
		return locate(err, f.sf.src)
	}
	fmt.Fprintln(e.stdout, resp.GetJob().GetJobId())
	if !f.watch {
		return nil
	}
	_, err = watchJob(ctx, e, c, resp.GetJob().GetName(), f.wf)
	return err
}
