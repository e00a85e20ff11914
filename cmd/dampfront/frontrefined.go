package main

import (
	"fmt"
	"io"

	pb "dampfront/api/gen/dampfront/v1"
)

// refinedColumns are the front table's columns of a refined front: each
// objective on the nonlinear car with its statistical error, the rank on
// those figures and the unsettled mark.
type refinedColumns struct{ objQ []quantity }

// newRefinedColumns returns the columns of a refined front, nil for a
// front without refined figures.
func newRefinedColumns(f *pb.Front) *refinedColumns {
	s := f.GetSolutions()
	if len(s) == 0 || s[0].GetRefined() == nil {
		return nil
	}
	c := &refinedColumns{}
	for _, o := range f.GetObjectives() {
		c.objQ = append(c.objQ, objectiveQuantity(o.GetKind()))
	}
	return c
}

func (c *refinedColumns) headers(h1, h2 []string) ([]string, []string) {
	if c == nil {
		return h1, h2
	}
	for _, q := range c.objQ {
		h1, h2 = append(h1, q.label+" nonlinear"), append(h2, q.unit+" ± error")
	}
	return append(h1, "rank", ""), append(h2, "", "")
}

func (c *refinedColumns) cells(row []string, s *pb.Solution) []string {
	if c == nil {
		return row
	}
	r := s.GetRefined()
	for k, q := range c.objQ {
		cell := "failed"
		if k < len(r.GetObjectives()) {
			cell = tradeNum(q, r.GetObjectives()[k])
			if e := r.GetObjectiveErrors()[k]; e > 0 {
				cell += " ± " + tradeNum(q, e)
			}
		}
		row = append(row, cell)
	}
	mark := ""
	if r.GetUnsettled() {
		mark = "?"
	}
	return append(row, fmt.Sprint(r.GetRank()), mark)
}

// note explains the refined columns under the table.
func (c *refinedColumns) note(w io.Writer, job *pb.Job) {
	if c == nil {
		return
	}
	rs := job.GetRefinementSummary()
	fmt.Fprintf(w, "Nonlinear: each point checked in the time domain (%g s of road a case, seed %d); objectives from those records ± one statistical error,\n"+
		"an error-free figure is linear (no time-domain counterpart) or already from the manoeuvre and kerb cases.\n"+
		"rank: non-dominated sorting on the nonlinear figures (1 = on the refined front): %d of %d points off it, %d infeasible;\n"+
		"? marks the %d points that dominate another, or are dominated, only within %g statistical errors (or near a limit).\n",
		rs.GetDurationS(), rs.GetSeed(), rs.GetOffFront(), rs.GetPoints(), rs.GetInfeasible(), rs.GetUnsettled(), rs.GetSigmas())
}
