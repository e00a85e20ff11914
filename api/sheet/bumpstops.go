package sheet

import (
	"dampfront/model"
	"dampfront/model/tradeunit"
)

// BumpStopTable is the bump-stop curve of one corner, or of both corners
// of an axle when they are alike (Corners lists them).
type BumpStopTable struct {
	Corners string // "FL, FR"
	Gap     string // bump-stop gap at rest, mm of wheel travel
	Rows    []BumpStopRow
}

// BumpStopRow is one point of the curve: compression past the gap and
// force at the wheel, the rate of the segment up to it, and the same
// point at the damper (a rubber on the damper's shaft).
type BumpStopRow struct {
	Deflection, Force, Rate    string // mm, N, N/mm at the wheel
	DamperDeflection, DamperFN string // mm, N at the damper
}

// bumpStopTables lists the corners' bump-stop curves, an axle's two
// corners in one table when their gap and curve are the same; empty for
// a car without curves.
func bumpStopTables(v *model.Vehicle) []BumpStopTable {
	var out []BumpStopTable
	for ax := 0; ax < 2; ax++ {
		l, r := &v.Corners[2*ax], &v.Corners[2*ax+1]
		pl, pr := l.BumpStopPoints(), r.BumpStopPoints()
		if sameBumpStop(l, r, pl, pr) {
			if pl != nil {
				out = append(out, bumpStopTable(model.CornerNames[2*ax]+", "+model.CornerNames[2*ax+1], l, pl))
			}
			continue
		}
		if pl != nil {
			out = append(out, bumpStopTable(model.CornerNames[2*ax], l, pl))
		}
		if pr != nil {
			out = append(out, bumpStopTable(model.CornerNames[2*ax+1], r, pr))
		}
	}
	return out
}

// sameBumpStop reports whether two corners' gaps and curves, at the
// wheel and at the damper, are the same.
func sameBumpStop(l, r *model.Corner, pl, pr []model.BumpStopPoint) bool {
	if l.BumpStopGap != r.BumpStopGap || len(pl) != len(pr) {
		return false
	}
	for k := range pl {
		if pl[k] != pr[k] {
			return false
		}
	}
	return true
}

func bumpStopTable(corners string, c *model.Corner, pts []model.BumpStopPoint) BumpStopTable {
	t := BumpStopTable{Corners: corners, Gap: trade(tradeunit.Millimetre, c.BumpStopGap, 1)}
	for _, p := range pts {
		t.Rows = append(t.Rows, BumpStopRow{
			Deflection: trade(tradeunit.Millimetre, p.Deflection, 1), Force: trade(tradeunit.Newton, p.Force, 0),
			Rate:             trade(tradeunit.NewtonPerMM, p.Rate, 1),
			DamperDeflection: trade(tradeunit.Millimetre, p.DamperDeflection, 1), DamperFN: trade(tradeunit.Newton, p.DamperForce, 0),
		})
	}
	return t
}
