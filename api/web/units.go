package web

import (
	"math"
	"strconv"
	"strings"

	pb "dampfront/api/gen/dampfront/v1"
)

// Every conversion from the SI values of the API to the trade units of
// the page's tables is in this file; the downloads stay SI, the unit in
// each CSV column's name. The units are the command line's:
//
//	relative tyre load        -      -> % of static    x 100
//	ride height, platform     m      -> mm             x 1000
//	knee velocity             m/s    -> mm/s           x 1000
//	damper slope              N s/m  -> N s/mm         / 1000
//	angle                     rad    -> deg            x 180/π
//	acceleration              m/s²   -> g              / 9.80665
//	road speed                m/s    (as the spec and the command line)
const (
	mmPerM    = 1000.0
	percent   = 100.0
	degPerRad = 180 / math.Pi
	gravitySI = 9.80665 // standard acceleration of gravity, m/s² (3rd CGPM, 1901)
	nsPerMmSI = 1000.0  // N s/m per N s/mm
)

// quantity says how a value is named and shown: in the table (label,
// trade unit, scale from SI, decimals) and in CSV (column, SI).
type quantity struct {
	label  string
	unit   string  // trade unit; empty when dimensionless
	scale  float64 // trade value = SI value × scale
	prec   int     // decimals in the table
	column string  // CSV column, SI unit suffixed
}

// text formats the trade value of an SI value for the table.
func (q quantity) text(si float64) string {
	return strconv.FormatFloat(si*q.scale, 'f', q.prec, 64)
}

// objectiveQuantity is how an objective is shown; a worst-case
// aggregation says so in the label.
func objectiveQuantity(o *pb.Objective) quantity {
	var q quantity
	switch o.GetKind() {
	case pb.ObjectiveKind_OBJECTIVE_KIND_GRIP:
		q = quantity{"Grip", "% static", percent, 2, "grip_rel"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM:
		q = quantity{"Platform", "mm", mmPerM, 3, "platform_m"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_FRONT_PLATFORM:
		q = quantity{"Front platform", "mm", mmPerM, 3, "front_platform_m"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_REAR_PLATFORM:
		q = quantity{"Rear platform", "mm", mmPerM, 3, "rear_platform_m"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_PITCH:
		q = quantity{"Pitch", "deg", degPerRad, 4, "pitch_rad"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_ROLL:
		q = quantity{"Roll", "deg", degPerRad, 4, "roll_rad"}
	case pb.ObjectiveKind_OBJECTIVE_KIND_HEAVE_ACCEL:
		q = quantity{"Heave accel", "g", 1 / gravitySI, 4, "heave_accel_m_per_s2"}
	default:
		name := strings.ToLower(strings.TrimPrefix(o.GetKind().String(), "OBJECTIVE_KIND_"))
		q = quantity{strings.ReplaceAll(name, "_", " "), "SI", 1, 4, name}
	}
	if o.GetAggregation() == pb.Aggregation_AGGREGATION_WORST {
		q.label += ", worst"
	}
	return q
}

// geneQuantity is how a searched variable is shown: knees (names ending
// in _m_per_s) in mm/s, damping ratios (_ratio) and factors as they are.
func geneQuantity(name string) quantity {
	label := strings.ReplaceAll(name, "_", " ")
	if label != "" {
		label = strings.ToUpper(label[:1]) + label[1:]
	}
	if strings.HasSuffix(name, "_m_per_s") {
		return quantity{strings.TrimSuffix(label, " m per s"), "mm/s", mmPerM, 1, name}
	}
	if strings.HasSuffix(name, "_ratio") {
		return quantity{strings.TrimSuffix(label, " ratio"), "ratio", 1, 3, name}
	}
	return quantity{label, "", 1, 3, name}
}

// qSlope is a low-speed damper slope at the component.
var qSlope = quantity{"slope", "N s/mm", 1 / nsPerMmSI, 2, "slope_n_s_per_m"}

// siText formats an SI value for CSV: the shortest text that reads back
// to the same float64.
func siText(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
