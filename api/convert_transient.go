package api

import (
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// The transient enums paired with the model's.
var (
	manoeuvreShapes = map[pb.ManoeuvreShape]model.ManoeuvreShape{
		pb.ManoeuvreShape_MANOEUVRE_SHAPE_BRAKE:         model.ShapeBrake,
		pb.ManoeuvreShape_MANOEUVRE_SHAPE_BRAKE_RELEASE: model.ShapeBrakeRelease,
		pb.ManoeuvreShape_MANOEUVRE_SHAPE_THROTTLE:      model.ShapeThrottle,
		pb.ManoeuvreShape_MANOEUVRE_SHAPE_TURN_IN:       model.ShapeTurnIn,
		pb.ManoeuvreShape_MANOEUVRE_SHAPE_TRAIL_BRAKE:   model.ShapeTrailBrake,
		pb.ManoeuvreShape_MANOEUVRE_SHAPE_TABLE:         model.ShapeTable,
	}
	kerbShapes = map[pb.KerbShape]model.KerbShape{
		pb.KerbShape_KERB_SHAPE_HALF_SINE: model.KerbHalfSine,
		pb.KerbShape_KERB_SHAPE_TRAPEZOID: model.KerbTrapezoid,
		pb.KerbShape_KERB_SHAPE_RAMP_STEP: model.KerbRampStep,
	}
	kerbSides = map[pb.KerbSide]model.KerbSide{
		pb.KerbSide_KERB_SIDE_LEFT:  model.KerbLeft,
		pb.KerbSide_KERB_SIDE_RIGHT: model.KerbRight,
		pb.KerbSide_KERB_SIDE_BOTH:  model.KerbBoth,
	}
)

// loadPathsFromProto converts a vehicle's load paths (nil: none).
func loadPathsFromProto(l *pb.LoadPaths) model.LoadPaths {
	return model.LoadPaths{
		CGHeight:         l.GetCgHeightM(),
		RollCentreHeight: [2]float64{l.GetFrontRollCentreHeightM(), l.GetRearRollCentreHeightM()},
		AntiBrake:        [2]float64{l.GetFrontAntiBrake(), l.GetRearAntiBrake()},
		AntiDrive:        [2]float64{l.GetFrontAntiDrive(), l.GetRearAntiDrive()},
		UnsprungCGHeight: [2]float64{l.GetFrontUnsprungCgHeightM(), l.GetRearUnsprungCgHeightM()},
	}
}

// manoeuvresFromProto converts the manoeuvre cases under path
// ("spec.manoeuvres"); accelerations in g become m/s².
func manoeuvresFromProto(ms []*pb.Manoeuvre, path string, p *problems) []model.Manoeuvre {
	if len(ms) == 0 {
		return nil
	}
	g := model.Gravity
	out := make([]model.Manoeuvre, len(ms))
	for i, m := range ms {
		shape, ok := manoeuvreShapes[m.GetShape()]
		if !ok {
			p.add(fmt.Sprintf("%s[%d].shape", path, i), "must be one of the MANOEUVRE_SHAPE_ values other than UNSPECIFIED, got %v", m.GetShape())
		}
		out[i] = model.Manoeuvre{Name: m.GetName(), Shape: shape, Speed: m.GetSpeedMPerS(),
			Longitudinal: m.GetLongitudinalG() * g, Lateral: m.GetLateralG() * g,
			Start: m.GetStartS(), Ramp: m.GetRampS(), Duration: m.GetDurationS(), Weight: m.GetWeight()}
		for _, r := range m.GetTable() {
			out[i].Table = append(out[i].Table, model.ManoeuvrePoint{Time: r.GetTimeS(), Ax: r.GetAxG() * g, Ay: r.GetAyG() * g, Speed: r.GetSpeedMPerS()})
		}
	}
	return out
}

// kerbsFromProto converts the kerb cases under path ("spec.kerbs").
func kerbsFromProto(ks []*pb.Kerb, path string, p *problems) []model.Kerb {
	if len(ks) == 0 {
		return nil
	}
	out := make([]model.Kerb, len(ks))
	for i, k := range ks {
		f := fmt.Sprintf("%s[%d]", path, i)
		shape, ok := kerbShapes[k.GetShape()]
		if !ok {
			p.add(f+".shape", "must be one of the KERB_SHAPE_ values other than UNSPECIFIED, got %v", k.GetShape())
		}
		side, ok := kerbSides[k.GetSide()]
		if !ok {
			p.add(f+".side", "must be one of KERB_SIDE_LEFT, KERB_SIDE_RIGHT, KERB_SIDE_BOTH, got %v", k.GetSide())
		}
		out[i] = model.Kerb{Name: k.GetName(), Shape: shape, Side: side, Height: k.GetHeightM(), Length: k.GetLengthM(),
			Ramp: k.GetRampM(), Speed: k.GetSpeedMPerS(), Start: k.GetStartS(), Duration: k.GetDurationS(),
			Seed: k.GetSeed(), Weight: k.GetWeight()}
		if r := k.GetRoad(); r != nil {
			rc := roadCaseFromProto(r, f+".road", p)
			rc.Speed = k.GetSpeedMPerS()
			out[i].Road = &rc
		}
	}
	return out
}

// transientMetricsToProto converts one setup's metrics on a manoeuvre or
// kerb case.
func transientMetricsToProto(m *model.TransientMetrics) *pb.TransientMetrics {
	att := func(a model.AttitudeResponse) *pb.AttitudeResponse {
		return &pb.AttitudeResponse{SteadyRad: a.Steady, PeakRad: a.Peak, Overshoot: a.Overshoot,
			Rise_90S: a.Rise90, SettlingS: a.Settling, PeakRateRadPerS: a.PeakRate}
	}
	return &pb.TransientMetrics{
		Name: m.Case, Kind: m.Kind.String(), Roll: att(m.Roll), Pitch: att(m.Pitch), DriverResponse: m.Response,
		Lltd:         &pb.LltdResponse{Defined: m.LLTD.Defined, Steady: m.LLTD.Steady, MaxDeviation: m.LLTD.MaxDeviation, SettlingS: m.LLTD.Settling},
		TyreLoadMinN: m.TyreLoadMin[:], TimeBelowS: m.TimeBelow[:], LoadLossS: m.LoadLoss[:],
		RideHeightMinM: m.RideHeightMin[:], BumpStopTimeS: m.BumpStopTime[:], HeaveAccelMaxMPerS2: m.HeaveAccelMax,
		StepS: m.Step, DurationS: m.Duration,
	}
}
