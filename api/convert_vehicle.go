package api

import (
	"fmt"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// vehicleFromProto converts a vehicle; problems of shape (a missing
// message, a wrong number of corners) are recorded under path, value
// problems are left to model.Vehicle.Validate.
func vehicleFromProto(v *pb.Vehicle, path string, p *problems) model.Vehicle {
	if v == nil {
		p.add(path, "is required")
		return model.Vehicle{}
	}
	out := model.Vehicle{
		Name:           v.GetName(),
		SprungMass:     v.GetSprungMassKg(),
		PitchInertia:   v.GetPitchInertiaKgM2(),
		RollInertia:    v.GetRollInertiaKgM2(),
		CGToFrontAxle:  v.GetCgToFrontAxleM(),
		CGToRearAxle:   v.GetCgToRearAxleM(),
		CGLateral:      v.GetCgLateralM(),
		TrackFront:     v.GetTrackFrontM(),
		TrackRear:      v.GetTrackRearM(),
		AntiRoll:       [2]model.AntiRollBar{antiRollFromProto(v.GetFrontAntiRollBar()), antiRollFromProto(v.GetRearAntiRollBar())},
		RestRideHeight: [2]float64{v.GetFrontRestRideHeightM(), v.GetRearRestRideHeightM()},
		Heave:          [2]model.HeaveElement{heaveFromProto(v.GetFrontHeave()), heaveFromProto(v.GetRearHeave())},
		LoadPaths:      loadPathsFromProto(v.GetLoadPaths()),
	}
	if n := len(v.GetCorners()); n != 4 {
		p.add(path+".corners", "needs exactly 4 corners (front left, front right, rear left, rear right), got %d", n)
	}
	for i, c := range v.GetCorners() {
		if i == 4 {
			break
		}
		out.Corners[i] = model.Corner{
			SpringRate:         c.GetSpringRateNPerM(),
			SpringMotionRatio:  c.GetSpringMotionRatio(),
			WheelRate:          c.GetWheelRateNPerM(),
			DamperMotionRatio:  c.GetDamperMotionRatio(),
			UnsprungMass:       c.GetUnsprungMassKg(),
			TyreRate:           c.GetTyreRateNPerM(),
			TyreDamping:        c.GetTyreDampingNSPerM(),
			TyreEnvelopeLength: c.GetTyreEnvelopeLengthM(),
			BumpStopGap:        c.GetBumpStopGapM(),
			SprungLoad:         c.GetSprungLoadN(),
		}
		if b := c.GetBumpStop(); b != nil {
			out.Corners[i].BumpStop = model.BumpStop{Deflection: cloneOrNil(b.GetDeflectionM()), Force: cloneOrNil(b.GetForceN())}
		}
	}
	for _, r := range v.GetReferencePoints() {
		out.ReferencePoints = append(out.ReferencePoints, model.ReferencePoint{Name: r.GetName(), X: r.GetXFromFrontAxleM(),
			WheelbaseFraction: r.GetWheelbaseFraction(), Y: r.GetYM(), RestHeight: r.GetRestHeightM()})
	}
	if a := v.GetAero(); a != nil {
		out.Aero = model.Aero{
			ReferenceSpeed: a.GetReferenceSpeedMPerS(),
			Downforce:      [2]float64{a.GetFrontDownforceN(), a.GetRearDownforceN()},
			Stiffness:      [2]float64{a.GetFrontStiffnessNPerM(), a.GetRearStiffnessNPerM()},
		}
		if t := a.GetTable(); t != nil {
			out.Aero.Table = &model.AeroTable{
				RideHeightFront: cloneOrNil(t.GetFrontRideHeightM()), RideHeightRear: cloneOrNil(t.GetRearRideHeightM()),
				Front: cloneOrNil(t.GetFrontDownforceN()), Rear: cloneOrNil(t.GetRearDownforceN()),
			}
		}
		if pm := a.GetPolynomial(); pm != nil {
			out.Aero.Polynomial = &model.AeroPolynomial{Origin: [2]float64{pm.GetFrontOriginM(), pm.GetRearOriginM()}}
			for _, t := range pm.GetTerms() {
				// uint32 fits an int; the model refuses powers above 6.
				out.Aero.Polynomial.Terms = append(out.Aero.Polynomial.Terms, model.AeroTerm{
					PowerFront: int(t.GetFrontPower()), PowerRear: int(t.GetRearPower()),
					Coefficient: [2]float64{t.GetFrontCoefficient(), t.GetRearCoefficient()},
				})
			}
		}
	}
	return out
}

func heaveFromProto(h *pb.HeaveElement) model.HeaveElement {
	return model.HeaveElement{MotionRatio: h.GetMotionRatio(), SpringRate: h.GetSpringRateNPerM(),
		PackerGap: h.GetPackerGapM(), PackerRate: h.GetPackerRateNPerM()}
}

func antiRollFromProto(b *pb.AntiRollBar) model.AntiRollBar {
	return model.AntiRollBar{WheelRate: b.GetWheelRateNPerM(), BarRate: b.GetBarRateNPerM(), MotionRatio: b.GetMotionRatio()}
}

// isoClassLetters maps the enum to the model's class letters.
var isoClassLetters = map[pb.IsoClass]string{
	pb.IsoClass_ISO_CLASS_A: "A", pb.IsoClass_ISO_CLASS_B: "B", pb.IsoClass_ISO_CLASS_C: "C", pb.IsoClass_ISO_CLASS_D: "D",
	pb.IsoClass_ISO_CLASS_E: "E", pb.IsoClass_ISO_CLASS_F: "F", pb.IsoClass_ISO_CLASS_G: "G", pb.IsoClass_ISO_CLASS_H: "H",
}

var coherenceKinds = map[pb.CoherenceKind]model.CoherenceKind{
	pb.CoherenceKind_COHERENCE_KIND_UNSPECIFIED: model.CoherenceAuto,
	pb.CoherenceKind_COHERENCE_KIND_ISOTROPIC:   model.CoherenceIsotropic,
	pb.CoherenceKind_COHERENCE_KIND_FULL:        model.CoherenceFull,
	pb.CoherenceKind_COHERENCE_KIND_TABLE:       model.CoherenceTable,
}

// roadCaseFromProto converts one road case; path is its path, e.g.
// "spec.road_cases[1]".
func roadCaseFromProto(rc *pb.RoadCase, path string, p *problems) model.RoadCase {
	out := model.RoadCase{Name: rc.GetName(), Speed: rc.GetSpeedMPerS(), Weight: rc.GetWeight()}
	switch s := rc.GetSpectrum().(type) {
	case *pb.RoadCase_IsoClass:
		letter, ok := isoClassLetters[s.IsoClass]
		if !ok {
			p.add(path+".iso_class", "must be one of ISO_CLASS_A to ISO_CLASS_H, got %v", s.IsoClass)
			// Keep it a class for the model, which then refuses it at
			// the same path instead of asking for a power law.
			letter = s.IsoClass.String()
		}
		out.Class = letter
	case *pb.RoadCase_PowerLaw:
		out.Gd0 = s.PowerLaw.GetGd0M3()
		out.Waviness = s.PowerLaw.GetWaviness()
	case *pb.RoadCase_Measured:
		m := s.Measured
		out.Measured = &model.MeasuredSpectrum{
			N:         cloneOrNil(m.GetNCyclesPerM()),
			Left:      cloneOrNil(m.GetLeftM3()),
			Right:     cloneOrNil(m.GetRightM3()),
			Coherence: cloneOrNil(m.GetCoherence()),
		}
	default:
		p.add(path, "needs a spectrum: set iso_class, power_law or measured")
	}
	if c := rc.GetCoherence(); c != nil {
		kind, ok := coherenceKinds[c.GetKind()]
		if !ok {
			p.add(path+".coherence.kind", "unknown coherence kind %d", int32(c.GetKind()))
		}
		out.Coherence = model.Coherence{Kind: kind, N: cloneOrNil(c.GetNCyclesPerM()), Gamma: cloneOrNil(c.GetGamma())}
	}
	return out
}

// roadCasesFromProto converts the road cases under path ("spec.road_cases").
func roadCasesFromProto(cases []*pb.RoadCase, path string, p *problems) []model.RoadCase {
	out := make([]model.RoadCase, len(cases))
	for i, rc := range cases {
		out[i] = roadCaseFromProto(rc, fmt.Sprintf("%s[%d]", path, i), p)
	}
	return out
}

// gridFromProto converts a grid; zero fields are left for the study's
// defaults.
func gridFromProto(g *pb.Grid) model.Grid {
	return model.Grid{MinHz: g.GetMinHz(), MaxHz: g.GetMaxHz(), Points: int(g.GetPoints())}
}

func cloneOrNil(x []float64) []float64 {
	if len(x) == 0 {
		return nil
	}
	return append([]float64(nil), x...)
}
