package main

import (
	"fmt"
	"io"

	pb "dampfront/api/gen/dampfront/v1"
)

// robustHeaders label a robust objective's extra columns: on the nominal
// car, and the sd and worst over the uncertain cars.
var robustHeaders = []string{"nominal", "sd", "worst"}

// robustCells are a solution's nominal, sd and worst per objective in
// trade units; empty where the solution has none.
func robustCells(objQ []quantity, r *pb.RobustObjectives) []string {
	var out []string
	for k, q := range objQ {
		for _, vs := range [][]float64{r.GetNominal(), r.GetSd(), r.GetWorst()} {
			if k < len(vs) {
				out = append(out, tradeNum(q, vs[k]))
			} else {
				out = append(out, "")
			}
		}
	}
	return out
}

// writeRobust prints a solution's objectives on the nominal car and
// their sd and worst over the uncertain cars, for eval; nothing without
// figures.
func writeRobust(w io.Writer, r *pb.RobustObjectives, objectives []*pb.Objective) {
	if r == nil {
		return
	}
	fmt.Fprintf(w, "    on the nominal car: %s\n", objectivesText(r.GetNominal(), objectives))
	fmt.Fprintf(w, "    sd over the uncertain cars: %s\n", objectivesText(r.GetSd(), objectives))
	fmt.Fprintf(w, "    worst over the uncertain cars: %s\n", objectivesText(r.GetWorst(), objectives))
}
