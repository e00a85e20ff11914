package plot

import (
	"math"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
)

// Every conversion from the SI values of the API to the trade units on the
// axes is in this file; the table is in the package doc.
const (
	mmPerM    = 1000.0        // mm per m; also mm/s per m/s
	percent   = 100.0         // % per unit fraction
	degPerRad = 180 / math.Pi // deg per rad
	gravitySI = 9.80665       // standard acceleration of gravity, m/s² (3rd CGPM, 1901)
	nsPerMmSI = 1000.0        // N s/m per N s/mm
)

// quantity names a plotted value and converts it from SI to its trade unit.
type quantity struct {
	name  string  // what the value is, as an axis names it
	unit  string  // trade unit; empty when dimensionless
	scale float64 // trade value = SI value × scale
}

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
	qDamperVelocity = quantity{"Damper velocity, bump positive", "mm/s", mmPerM}
	qDamperForce    = quantity{"Damper force, bump positive", "N", 1}
	qKnee           = quantity{"knee", "mm/s", mmPerM}
	qSlope          = quantity{"slope", "N s/mm", 1 / nsPerMmSI}
	qSpatialFreq    = quantity{"Spatial frequency n", "cycles/m", 1}
	qRoadPSD        = quantity{"Displacement PSD Gd(n)", "m³", 1}
	qGeneration     = quantity{"Generation", "", 1}
	qBalance        = quantity{"Front/rear mean damping ratio", "", 1}
	qFrequency      = quantity{"Frequency", "Hz", 1}
	qTyreLoadPSD    = quantity{"Tyre load PSD", "N²/Hz", 1}
	qRideHeightPSD  = quantity{"Ride-height PSD", "mm²/Hz", mmPerM * mmPerM}
)

// objectiveQuantity is how an objective is named and scaled on an axis;
// a worst-case aggregation says so in the name.
func objectiveQuantity(o *pb.Objective) quantity {
	var q quantity
	switch o.GetKind() {
	case pb.ObjectiveKind_OBJECTIVE_KIND_GRIP:
		q = quantity{"Grip: tyre load variation", "% of static load", percent}
	case pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM:
		q = quantity{"Platform: ride-height variation", "mm", mmPerM}
	case pb.ObjectiveKind_OBJECTIVE_KIND_FRONT_PLATFORM:
		q = quantity{"Front platform: ride-height variation", "mm", mmPerM}
	case pb.ObjectiveKind_OBJECTIVE_KIND_REAR_PLATFORM:
		q = quantity{"Rear platform: ride-height variation", "mm", mmPerM}
	case pb.ObjectiveKind_OBJECTIVE_KIND_PITCH:
		q = quantity{"Pitch variation", "deg", degPerRad}
	case pb.ObjectiveKind_OBJECTIVE_KIND_ROLL:
		q = quantity{"Roll variation", "deg", degPerRad}
	case pb.ObjectiveKind_OBJECTIVE_KIND_HEAVE_ACCEL:
		q = quantity{"Heave acceleration", "g", 1 / gravitySI}
	default:
		name := strings.ToLower(strings.TrimPrefix(o.GetKind().String(), "OBJECTIVE_KIND_"))
		q = quantity{strings.ReplaceAll(name, "_", " "), "SI", 1}
	}
	if o.GetAggregation() == pb.Aggregation_AGGREGATION_WORST {
		q.name += ", worst case"
	}
	return q
}

// geneQuantity is how a searched variable is named and scaled: knees
// (names ending in _m_per_s) in mm/s, ratios and factors as they are.
func geneQuantity(name string) quantity {
	label := strings.ReplaceAll(name, "_", " ")
	if label != "" {
		label = strings.ToUpper(label[:1]) + label[1:]
	}
	if strings.HasSuffix(name, "_m_per_s") {
		return quantity{strings.TrimSuffix(label, " m per s"), "mm/s", mmPerM}
	}
	return quantity{label, "", 1}
}

// hypervolumeQuantity is the hypervolume in the product of the
// objectives' trade units; without objectives it stays in SI.
func hypervolumeQuantity(objs []*pb.Objective) quantity {
	if len(objs) == 0 {
		return quantity{"Hypervolume", "product of SI units", 1}
	}
	q := quantity{"Hypervolume", "", 1}
	units := make([]string, len(objs))
	for j, o := range objs {
		oq := objectiveQuantity(o)
		q.scale *= oq.scale
		units[j] = oq.unit
		if oq.unit == "% of static load" {
			units[j] = "%"
		}
	}
	q.unit = strings.Join(units, " × ")
	return q
}
