package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"dampfront/api"
	"dampfront/api/frontfile"
	pb "dampfront/api/gen/dampfront/v1"
)

// frontAbout is the help text of front.
const frontAbout = `
Prints the Pareto front of a finished job, sorted by the first objective.
The table is in trade units: damping ratios at the wheel, grip as tyre
load standard deviation in % of static load, platform in mm, low-speed
damper slopes in N s/mm at the component; the balanced point (nearest the
middle of the front with each objective normalised over it) is marked *.
CSV and JSON are SI, with the unit in each column's name, one row per
solution, floats written so that they read back bit for bit: the schema
of the job page's downloads and the Python client, listed in the README.
--format setup --solution N prints solution N as a setup file (YAML, a
Setup message) that eval --setup and check --setup read.`

var frontCommand = &command{name: "front", synopsis: "[flags] JOB", minArgs: 1, maxArgs: 1, client: true,
	summary: "print a finished job's Pareto front (table in trade units, CSV or JSON in SI)", about: frontAbout, flags: bindFront}

func bindFront(fs *flagSet, _ *env) (runFunc, error) {
	format := newFormat("table", "table", "csv", "json", "setup")
	fs.Var(format, "format", "output `format`: table, csv, json, or setup (one solution as a setup file)")
	solution := fs.Int("solution", -1, "with --format setup: the `index` of the solution in the front")
	rows := fs.Int("rows", 0, "table only: show about this many `rows`, evenly spread along the front and the balanced point among them; 0 shows all")
	return func(ctx context.Context, e *env, in *parsed) error {
		if (format.value == "setup") != (*solution >= 0) || (isFlagSet(fs, "solution") && *solution < 0) {
			return usagef("front", "--format setup needs --solution N (a front index >= 0), and --solution only goes with it")
		}
		return runFront(ctx, e, in, format.value, *rows, *solution)
	}, nil
}

func runFront(ctx context.Context, e *env, in *parsed, format string, rows, solution int) error {
	if rows < 0 {
		return usagef("front", "--rows must not be negative")
	}
	c, err := in.client.dial()
	if err != nil {
		return err
	}
	defer c.Close()
	fd, err := fetchFront(ctx, c, jobName(in.args[0]), pb.SolutionView_SOLUTION_VIEW_FULL)
	if err != nil {
		return err
	}
	switch format {
	case "csv":
		return frontfile.WriteCSV(e.stdout, fd.front)
	case "json":
		return frontfile.WriteJSON(e.stdout, fd.job, fd.front)
	case "setup":
		return writeSetupFile(e.stdout, fd, solution)
	}
	if err := writeFrontTable(e.stdout, fd, rows, "--rows 0 shows all"); err != nil {
		return err
	}
	printCaution(e.stdout)
	return nil
}

// slopes returns the low-speed bump and rebound slopes at the damper
// (N s/m) of the front-left and rear-left corners, and whether the
// solution carries its curves.
func slopes(s *pb.Solution) (v [4]float64, ok bool) {
	dc := s.GetDamperCurves()
	if len(dc) < 3 {
		return v, false
	}
	return [4]float64{dc[0].GetBumpSlopeNSPerM(), dc[0].GetReboundSlopeNSPerM(), dc[2].GetBumpSlopeNSPerM(), dc[2].GetReboundSlopeNSPerM()}, true
}

// extraGenes lists the indices of genes other than the corners' damping
// ratios (knees, high-speed factors, heave damper ratios), which the table
// shows besides the four ratios.
func extraGenes(names []string) []int {
	var out []int
	for i, n := range names {
		if !strings.HasSuffix(n, "_ratio") || strings.HasSuffix(n, "_heave_ratio") {
			out = append(out, i)
		}
	}
	return out
}

func ratios(s *pb.Solution) [4]float64 {
	f, r := s.GetSetup().GetFront(), s.GetSetup().GetRear()
	return [4]float64{f.GetBumpRatio(), f.GetReboundRatio(), r.GetBumpRatio(), r.GetReboundRatio()}
}

var ratioHeaders = [4]string{"F bump", "F rebound", "R bump", "R rebound"}

// shownRows picks about rows of n solutions, evenly spaced by position
// along the sorted front, always with the first, the last and the
// balanced one; rows <= 0 or >= n keeps all.
func shownRows(n, rows, balanced int) []bool {
	show := make([]bool, n)
	if rows <= 0 || rows >= n {
		for i := range show {
			show[i] = true
		}
		return show
	}
	for k := 0; k < rows; k++ {
		show[k*(n-1)/max(rows-1, 1)] = true
	}
	if balanced >= 0 {
		show[balanced] = true
	}
	return show
}

// writeFrontTable prints the heading and the front in trade units, about
// rows of its solutions (0: all); more tells how to see the rest.
func writeFrontTable(w io.Writer, fd *frontData, rows int, more string) error {
	f, j := fd.front, fd.job
	fmt.Fprintf(w, "Pareto front of %s %q: %d solutions", j.GetName(), j.GetDisplayName(), f.GetTotalSize())
	if f.GetPartial() {
		fmt.Fprintf(w, " (partial: the job %s before its end)", stateName(j.GetState()))
	}
	fmt.Fprintln(w)
	spec := j.GetSpec()
	var cases []string
	for _, rc := range spec.GetRoadCases() {
		cases = append(cases, plain(rc.GetName()))
	}
	fmt.Fprintf(w, "Car: %s. Road cases: %s. Seed %d.\n", plain(spec.GetVehicle().GetName()), strings.Join(cases, "; "), j.GetSeed())
	fmt.Fprintln(w, "Ratios are low-speed slope over critical damping at the wheel; slopes are at the damper.")
	sols := f.GetSolutions()
	if len(sols) == 0 {
		fmt.Fprintln(w, "\nThe front is empty: no feasible setup was found. Loosen the constraints or widen the bounds.")
		return nil
	}
	bal := balancedIndex(sols)
	cols := newSolutionColumns(f)
	for _, s := range sols {
		cols.band = cols.band || len(s.GetOutOfBand()) > 0
	}
	_, withSlopes := slopes(sols[0])
	refined := newRefinedColumns(f)

	fmt.Fprintln(w)
	t := newTable(w, true)
	h1, h2 := cols.headers()
	if withSlopes {
		for _, h := range ratioHeaders {
			h1, h2 = append(h1, h), append(h2, qSlope.unit)
		}
	}
	h1, h2 = refined.headers(h1, h2)
	t.row(h1...)
	t.row(h2...)
	warned, shown := 0, 0
	show := shownRows(len(sols), rows, bal)
	for i, s := range sols {
		if len(s.GetWarnings()) > 0 {
			warned++
		}
		if !show[i] {
			continue
		}
		shown++
		row := cols.cells(s, i == bal)
		if sl, ok := slopes(s); ok {
			for _, v := range sl {
				row = append(row, tradeNum(qSlope, v))
			}
		}
		t.row(refined.cells(row, s)...)
	}
	if err := t.flush(); err != nil {
		return err
	}
	if shown < len(sols) {
		fmt.Fprintf(w, "\nShowing %d of %d solutions, spread along the front; %s.\n", shown, len(sols), more)
	}
	writeFrontNotes(w, fd, cols, bal, warned)
	refined.note(w, j)
	return nil
}

// writeFrontNotes explains the balanced mark, the warnings and the
// out-of-range column under the front table.
func writeFrontNotes(w io.Writer, fd *frontData, cols *solutionColumns, bal, warned int) {
	sols := fd.front.GetSolutions()
	fmt.Fprintf(w, "\n* balanced point: solution %d, nearest the middle of the front with each objective normalised over it.\n", sols[bal].GetIndex())
	if warned > 0 {
		fmt.Fprintf(w, "%d solutions carry warnings (lift-off, bump-stop contact, outside the adjuster range); see --format json.\n", warned)
	}
	if cols.robust {
		fmt.Fprintln(w, api.RobustText(fd.job)+".")
	}
	if cols.band {
		fmt.Fprintln(w, "Out of range: the largest excess of the damper force over the adjuster range (25-300 mm/s, at the damper); get such a damper made or widen its adjusters.")
	}
}

// solutionColumns are the leading columns of a table of front solutions:
// the balanced mark and index, the four damping ratios, the other genes
// the study searched, and the objectives, in trade units.
type solutionColumns struct {
	genes  []string
	extra  []int      // indices of the genes beyond the four ratios
	objQ   []quantity // of each objective
	band   bool       // show the out-of-range column (the front table, when a solution needs it)
	robust bool       // show each objective's nominal, sd and worst (a robust front)
}

func newSolutionColumns(f *pb.Front) *solutionColumns {
	c := &solutionColumns{genes: f.GetGeneNames(), extra: extraGenes(f.GetGeneNames()), robust: frontfile.Robust(f)}
	for _, o := range f.GetObjectives() {
		c.objQ = append(c.objQ, objectiveQuantity(o.GetKind()))
	}
	return c
}

// headers are the two header rows: labels, then units.
func (c *solutionColumns) headers() (h1, h2 []string) {
	h1, h2 = []string{"", "#"}, []string{"", ""}
	for _, h := range ratioHeaders {
		h1, h2 = append(h1, h), append(h2, "ratio")
	}
	for _, g := range c.extra {
		q := geneQuantity(c.genes[g])
		h1, h2 = append(h1, q.label), append(h2, q.unit)
	}
	for _, q := range c.objQ {
		h1, h2 = append(h1, q.label), append(h2, q.unit)
	}
	if c.robust {
		for _, q := range c.objQ {
			for _, what := range robustHeaders {
				h1, h2 = append(h1, q.label+" "+what), append(h2, q.unit)
			}
		}
	}
	if c.band {
		h1, h2 = append(h1, "out of range"), append(h2, "N")
	}
	return h1, h2
}

// cells are the solution's cells under headers, "*" marking the
// balanced point.
func (c *solutionColumns) cells(s *pb.Solution, balanced bool) []string {
	mark := ""
	if balanced {
		mark = "*"
	}
	row := []string{mark, fmt.Sprint(s.GetIndex())}
	for _, r := range ratios(s) {
		row = append(row, num(r, 3))
	}
	for _, g := range c.extra {
		row = append(row, tradeNum(geneQuantity(c.genes[g]), s.GetGenes()[g]))
	}
	for k, q := range c.objQ {
		row = append(row, tradeNum(q, s.GetObjectives()[k]))
	}
	if c.robust {
		row = append(row, robustCells(c.objQ, s.GetRobust())...)
	}
	if c.band {
		out := ""
		if x := frontfile.OutOfBand(s); x > 0 {
			out = fmt.Sprintf("+%.0f", x)
		}
		row = append(row, out)
	}
	return row
}

// writeSetupFile prints solution idx of a front as a setup file.
func writeSetupFile(w io.Writer, fd *frontData, idx int) error {
	for _, s := range fd.front.GetSolutions() {
		if int(s.GetIndex()) != idx {
			continue
		}
		header := fmt.Sprintf("Setup of solution %d of %s (%s), seed %d: a Setup message of dampfront.v1\n"+
			"for dampfront eval --setup and check --setup. Ratios at the wheel, knees at the damper (m/s),\n"+
			"factors high-speed over low-speed slope.\n%s",
			idx, fd.job.GetName(), plain(fd.job.GetDisplayName()), fd.job.GetSeed(), caution)
		b, err := api.EncodeSetupText(s.GetSetup(), header)
		if err != nil {
			return err
		}
		_, err = w.Write(b)
		return err
	}
	return &exitError{code: exitUsage, msg: fmt.Sprintf("--solution %d: the front of %s has no solution of that index (0 to %d)", idx, fd.job.GetName(), len(fd.front.GetSolutions())-1)}
}
