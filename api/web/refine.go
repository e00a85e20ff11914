package web

import (
	"fmt"
	"strconv"

	pb "dampfront/api/gen/dampfront/v1"
)

// RefinementText is the one-line summary of the refinement of a finished
// job's front on the nonlinear car (pb.RefinementSummary), for example
// "Nonlinear refinement: 152 points checked in the time domain (120 s of
// road a case, seed 7); 9 off the refined front, 0 infeasible, 31
// unsettled within 3 statistical errors"; empty while the job has none.
// While the refinement runs it says how far it is, as of the job's last
// checkpoint ("Refining on the nonlinear car: 212 of 586 points checked
// (as of the last checkpoint)"), and for a job stopped before it ended,
// how far it came. The page and the command line's get and watch print
// it.
func RefinementText(j *pb.Job) string {
	r := j.GetRefinementSummary()
	switch {
	case r == nil:
		return ""
	case r.GetInProgress() && terminal(j.GetState()):
		return fmt.Sprintf("Nonlinear refinement not finished: %d of %d points checked when the job stopped; the front has no refined figures",
			r.GetPointsChecked(), r.GetPoints())
	case r.GetInProgress():
		return "Refining on the nonlinear car: " + checkedText(r) + " (as of the last checkpoint)"
	}
	s := fmt.Sprintf("Nonlinear refinement: %d points checked in the time domain (%g s of road a case, seed %d); %d off the refined front, %d infeasible, %d unsettled within %g statistical errors",
		r.GetPoints(), r.GetDurationS(), r.GetSeed(), r.GetOffFront(), r.GetInfeasible(), r.GetUnsettled(), r.GetSigmas())
	if r.GetFailed() > 0 {
		s += fmt.Sprintf("; %d could not be checked", r.GetFailed())
	}
	return s
}

// Refining returns the refinement summary of a job that is refining its
// front now (as of its last checkpoint), nil otherwise: none, finished,
// or stopped before it ended.
func Refining(j *pb.Job) *pb.RefinementSummary {
	if r := j.GetRefinementSummary(); r.GetInProgress() && !terminal(j.GetState()) {
		return r
	}
	return nil
}

// checkedText is a refinement in progress's count, "212 of 586 points
// checked".
func checkedText(r *pb.RefinementSummary) string {
	return fmt.Sprintf("%d of %d points checked", r.GetPointsChecked(), r.GetPoints())
}

// refinedHeaders are the solutions table's columns of a refined front:
// each objective on the nonlinear car (± its statistical error), the rank
// on those figures and the unsettled mark; none for a front without
// refined figures.
func refinedHeaders(front *pb.Front, objQ []quantity) []header {
	if !refinedFront(front) {
		return nil
	}
	var hs []header
	for _, q := range objQ {
		hs = append(hs, header{Label: q.label + " nonlinear", Unit: q.unit + " ± error", Numeric: true})
	}
	return append(hs, header{Label: "Rank nonlinear", Numeric: true}, header{Label: "Unsettled"})
}

// refinedCells are a solution's cells under refinedHeaders.
func refinedCells(front *pb.Front, s *pb.Solution, objQ []quantity) []cell {
	if !refinedFront(front) {
		return nil
	}
	r := s.GetRefined()
	var out []cell
	for k, q := range objQ {
		c := numCell(q, r.GetObjectives(), k)
		if k < len(r.GetObjectiveErrors()) && r.GetObjectiveErrors()[k] > 0 {
			c.Text += " ± " + q.text(r.GetObjectiveErrors()[k])
		}
		out = append(out, c)
	}
	rank := strconv.Itoa(int(r.GetRank()))
	mark := ""
	if r.GetUnsettled() {
		mark = "unsettled"
	}
	return append(out, cell{Text: rank, Sort: rank}, cell{Text: mark, Sort: mark})
}

// refinedFront reports whether a front carries refined figures.
func refinedFront(front *pb.Front) bool {
	s := front.GetSolutions()
	return len(s) > 0 && s[0].GetRefined() != nil
}
