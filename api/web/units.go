package web

import (
	"strconv"
	"strings"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model/tradeunit"
)

// The page's tables show trade units, all of the one table of package
// tradeunit (the command line's); the downloads stay SI, the unit in each
// CSV column's name.

// quantity says how a value is named and shown: in the table (label,
// trade unit, scale from SI, decimals) and in CSV (column, SI).
type quantity struct {
	label  string
	unit   string  // trade unit; empty when dimensionless
	scale  float64 // trade value = SI value × scale
	prec   int     // decimals in the table
	column string  // CSV column, SI unit suffixed
}

// shown is a quantity of the trade-unit table as the page shows it, its
// label capitalised.
func shown(q tradeunit.Quantity) quantity {
	label := q.Label
	if label != "" {
		label = strings.ToUpper(label[:1]) + label[1:]
	}
	return quantity{label, q.Unit.Symbol, q.Unit.Scale, q.Prec, q.Column}
}

// text formats the trade value of an SI value for the table.
func (q quantity) text(si float64) string {
	return strconv.FormatFloat(si*q.scale, 'f', q.prec, 64)
}

// objectiveQuantity is how an objective is shown; a worst-case
// aggregation says so in the label.
func objectiveQuantity(o *pb.Objective) quantity {
	q := shown(tradeunit.Objective(api.ModelObjectiveKind(o.GetKind())))
	switch o.GetAggregation() {
	case pb.Aggregation_AGGREGATION_WORST:
		q.label += ", worst"
	case pb.Aggregation_AGGREGATION_NORMALISED:
		q.label += ", normalised"
	}
	return q
}

// geneQuantity is how a searched variable is shown: knees (names ending
// in _m_per_s) in mm/s, damping ratios (_ratio) under their name without
// "ratio", which is their unit here, and factors as they are.
func geneQuantity(name string) quantity {
	q := shown(tradeunit.Gene(name))
	if strings.HasSuffix(name, "_ratio") {
		q.label, q.unit = strings.TrimSuffix(q.label, " ratio"), "ratio"
	}
	return q
}

// qSlope is a low-speed damper slope at the component.
var qSlope = quantity{"slope", tradeunit.NewtonSecondPerMM.Symbol, tradeunit.NewtonSecondPerMM.Scale, 2, "slope_n_s_per_m"}

// siText formats an SI value for CSV: the shortest text that reads back
// to the same float64.
func siText(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// constraintQuantity is how a constraint's limit and metric are shown.
func constraintQuantity(k pb.ConstraintKind) quantity {
	t := tradeunit.Constraint(api.ModelConstraintKind(k))
	return quantity{t.Label, t.Unit.Symbol, t.Unit.Scale, t.Prec, t.Column}
}
