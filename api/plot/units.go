package plot

import (
	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
	"dampfront/model/tradeunit"
)

// The axes show trade units, all of the one table of package tradeunit
// (the command line's and the page's); the package doc lists them.

// quantity names a plotted value and converts it from SI to its trade unit.
type quantity struct {
	name  string  // what the value is, as an axis names it
	unit  string  // trade unit; empty when dimensionless
	scale float64 // trade value = SI value × scale
}

// axis is a quantity of the charts' own under name in the unit u.
func axis(name string, u tradeunit.Unit) quantity {
	return quantity{name, u.AxisSymbol(), u.Scale}
}

// si is a unit in which a chart shows SI values as they are.
func si(symbol string) tradeunit.Unit { return tradeunit.Unit{Symbol: symbol, Scale: 1} }

// of converts an SI value to the trade unit.
func (q quantity) of(si float64) float64 { return si * q.scale }

// label is the axis label, "name (unit)".
func (q quantity) label() string {
	if q.unit == "" {
		return q.name
	}
	return q.name + " (" + q.unit + ")"
}

// Fixed quantities of the charts.
var (
	qDamperVelocity = axis("Damper velocity, bump positive", tradeunit.MillimetrePerSecond)
	qDamperForce    = axis("Damper force, bump positive", tradeunit.Newton)
	qKnee           = axis("knee", tradeunit.MillimetrePerSecond)
	qSlope          = axis("slope", tradeunit.NewtonSecondPerMM)
	qSpatialFreq    = axis("Spatial frequency n", si("cycles/m"))
	qRoadPSD        = axis("Displacement PSD Gd(n)", si("m³"))
	qGeneration     = axis("Generation", tradeunit.None)
	qBalance        = axis("Front/rear mean damping ratio", tradeunit.None)
	qFrequency      = axis("Frequency", si("Hz"))
	qTyreLoadPSD    = axis("Tyre load PSD", si("N²/Hz"))
	qRideHeightPSD  = axis("Ride-height PSD", tradeunit.MillimetreSquaredPerHertz)
)

// objectiveQuantity is how an objective is named and scaled on an axis;
// a worst-case aggregation says so in the name.
func objectiveQuantity(o *pb.Objective) quantity {
	t := tradeunit.Objective(api.ModelObjectiveKind(o.GetKind()))
	q := axis(t.Title, t.Unit)
	if o.GetAggregation() == pb.Aggregation_AGGREGATION_WORST {
		q.name += ", worst case"
	}
	return q
}

// geneQuantity is how a searched variable is named and scaled: knees
// (names ending in _m_per_s) in mm/s, ratios and factors as they are.
func geneQuantity(name string) quantity {
	t := tradeunit.Gene(name)
	return axis(t.Title, t.Unit)
}

// hypervolumeQuantity is the hypervolume in the product of the
// objectives' trade units (grip in plain %); without objectives it stays
// in SI.
func hypervolumeQuantity(objs []*pb.Objective) quantity {
	if len(objs) == 0 {
		return quantity{"Hypervolume", "product of SI units", 1}
	}
	kinds := make([]model.ObjectiveKind, len(objs))
	for j, o := range objs {
		kinds[j] = api.ModelObjectiveKind(o.GetKind())
	}
	u := tradeunit.Hypervolume(kinds)
	return quantity{"Hypervolume", u.Symbol, u.Scale}
}
