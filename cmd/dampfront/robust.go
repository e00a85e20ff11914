package main

import (
	"strings"

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

// robustText is "on the nominal car grip 8.10 % static, ...; sd over the
// uncertain cars ...; worst ..." for eval, or "" without figures.
func robustText(r *pb.RobustObjectives, objectives []*pb.Objective) string {
	if r == nil {
		return ""
	}
	parts := []string{
		"on the nominal car: " + objectivesText(r.GetNominal(), objectives),
		"sd over the uncertain cars: " + objectivesText(r.GetSd(), objectives),
		"worst: " + objectivesText(r.GetWorst(), objectives),
	}
	return strings.Join(parts, "; ")
}
