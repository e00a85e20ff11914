package web

import (
	"fmt"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
)

// InfeasibleText is the verdict of a job no setup of which met every
// constraint, in the page's units ("Infeasible: no setup met ride-height
// shift ≤ 3.00 mm; the closest was 0.42 mm over the limit (Port Vellan
// streets)", a clause per violated constraint); empty for any other job.
// The page and the command line's get and watch print it.
func InfeasibleText(j *pb.Job) string {
	if !j.GetInfeasible() {
		return ""
	}
	var parts []string
	for _, sf := range j.GetClosest() {
		q := constraintQuantity(sf.GetKind())
		parts = append(parts, fmt.Sprintf("no setup met %s ≤ %s %s; the closest was %s %s over the limit (%s)",
			q.label, q.text(sf.GetLimit()), q.unit, q.text(sf.GetOver()), q.unit, sf.GetRoadCase()))
	}
	if len(parts) == 0 {
		return "Infeasible: no setup met every constraint"
	}
	return "Infeasible: " + strings.Join(parts, "; and ")
}
