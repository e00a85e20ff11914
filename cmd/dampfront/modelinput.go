package main

import (
	"fmt"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// The time-domain check runs in this process (model.Verify), so it needs
// the model's types of a spec's car, road cases and grid and of a setup.
// Package api owns that conversion but does not export it yet; the
// functions here are a stand-in that mirrors api/convert_vehicle.go and
// api/convert_design.go field for field and should be replaced by the
// api's own once exported. The spec is checked first by the api itself
// (Opener.ValidateSpec, the same check SubmitJob makes, with the same
// "spec."-prefixed field paths), so these only run on valid specs; and
// verify_test.go checks that the frequency-domain column of verify equals
// the server's EvaluateSetups metrics for the same spec and setup.

// verifyInputs are what model.Verify takes from a job spec.
type verifyInputs struct {
	vehicle model.Vehicle
	cases   []model.RoadCase
	options model.Options
}

// specInputs checks spec as the server would and converts its vehicle,
// road cases and grid. A bad spec gives the api's *jobs.InvalidArgumentError
// (exit code 2).
func specInputs(spec *pb.JobSpec) (*verifyInputs, error) {
	b, err := api.MarshalSpec(spec)
	if err != nil {
		return nil, err
	}
	if err := (&api.Opener{}).ValidateSpec(b); err != nil {
		return nil, err
	}
	in := &verifyInputs{vehicle: vehicleModel(spec.GetVehicle())}
	for _, rc := range spec.GetRoadCases() {
		in.cases = append(in.cases, roadCaseModel(rc))
	}
	g := spec.GetGrid()
	in.options.Grid = model.Grid{MinHz: g.GetMinHz(), MaxHz: g.GetMaxHz(), Points: int(g.GetPoints())}
	if in.options.Grid.MinHz == 0 {
		in.options.Grid.MinHz = model.DefaultGrid.MinHz
	}
	if in.options.Grid.MaxHz == 0 {
		in.options.Grid.MaxHz = model.DefaultGrid.MaxHz
	}
	if in.options.Grid.Points == 0 {
		in.options.Grid.Points = model.DefaultGrid.Points
	}
	return in, nil
}

func vehicleModel(v *pb.Vehicle) model.Vehicle {
	bar := func(b *pb.AntiRollBar) model.AntiRollBar {
		return model.AntiRollBar{WheelRate: b.GetWheelRateNPerM(), BarRate: b.GetBarRateNPerM(), MotionRatio: b.GetMotionRatio()}
	}
	out := model.Vehicle{
		Name:          v.GetName(),
		SprungMass:    v.GetSprungMassKg(),
		PitchInertia:  v.GetPitchInertiaKgM2(),
		RollInertia:   v.GetRollInertiaKgM2(),
		CGToFrontAxle: v.GetCgToFrontAxleM(),
		CGToRearAxle:  v.GetCgToRearAxleM(),
		CGLateral:     v.GetCgLateralM(),
		TrackFront:    v.GetTrackFrontM(),
		TrackRear:     v.GetTrackRearM(),
		AntiRoll:      [2]model.AntiRollBar{bar(v.GetFrontAntiRollBar()), bar(v.GetRearAntiRollBar())},
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
	}
	if a := v.GetAero(); a != nil {
		out.Aero = model.Aero{
			ReferenceSpeed: a.GetReferenceSpeedMPerS(),
			Downforce:      [2]float64{a.GetFrontDownforceN(), a.GetRearDownforceN()},
			Stiffness:      [2]float64{a.GetFrontStiffnessNPerM(), a.GetRearStiffnessNPerM()},
		}
	}
	return out
}

// isoLetters are the ISO 8608 class letters of the enum.
var isoLetters = map[pb.IsoClass]string{
	pb.IsoClass_ISO_CLASS_A: "A", pb.IsoClass_ISO_CLASS_B: "B", pb.IsoClass_ISO_CLASS_C: "C", pb.IsoClass_ISO_CLASS_D: "D",
	pb.IsoClass_ISO_CLASS_E: "E", pb.IsoClass_ISO_CLASS_F: "F", pb.IsoClass_ISO_CLASS_G: "G", pb.IsoClass_ISO_CLASS_H: "H",
}

var coherenceModels = map[pb.CoherenceKind]model.CoherenceKind{
	pb.CoherenceKind_COHERENCE_KIND_UNSPECIFIED: model.CoherenceAuto,
	pb.CoherenceKind_COHERENCE_KIND_ISOTROPIC:   model.CoherenceIsotropic,
	pb.CoherenceKind_COHERENCE_KIND_FULL:        model.CoherenceFull,
	pb.CoherenceKind_COHERENCE_KIND_TABLE:       model.CoherenceTable,
}

func roadCaseModel(rc *pb.RoadCase) model.RoadCase {
	clone := func(x []float64) []float64 {
		if len(x) == 0 {
			return nil
		}
		return append([]float64(nil), x...)
	}
	out := model.RoadCase{Name: rc.GetName(), Speed: rc.GetSpeedMPerS(), Weight: rc.GetWeight()}
	switch s := rc.GetSpectrum().(type) {
	case *pb.RoadCase_IsoClass:
		out.Class = isoLetters[s.IsoClass]
	case *pb.RoadCase_PowerLaw:
		out.Gd0, out.Waviness = s.PowerLaw.GetGd0M3(), s.PowerLaw.GetWaviness()
	case *pb.RoadCase_Measured:
		m := s.Measured
		out.Measured = &model.MeasuredSpectrum{N: clone(m.GetNCyclesPerM()), Left: clone(m.GetLeftM3()),
			Right: clone(m.GetRightM3()), Coherence: clone(m.GetCoherence())}
	}
	if c := rc.GetCoherence(); c != nil {
		out.Coherence = model.Coherence{Kind: coherenceModels[c.GetKind()], N: clone(c.GetNCyclesPerM()), Gamma: clone(c.GetGamma())}
	}
	return out
}

// setupModel converts a setup read from path (for the message of an
// error) and checks it.
func setupModel(s *pb.Setup, path string) (model.Setup, error) {
	var out model.Setup
	for ax, a := range [2]*pb.AxleDamping{s.GetFront(), s.GetRear()} {
		if a == nil {
			return out, &inputFileError{path: path, err: fmt.Errorf("%s: is required", model.AxleNames[ax])}
		}
		out.Axles[ax] = model.AxleDamping{
			BumpRatio: a.GetBumpRatio(), ReboundRatio: a.GetReboundRatio(),
			KneeBump: a.GetKneeBumpMPerS(), KneeRebound: a.GetKneeReboundMPerS(),
			HighSpeedBump: a.GetHighSpeedBumpFactor(), HighSpeedRebound: a.GetHighSpeedReboundFactor(),
		}
	}
	if err := out.Validate(); err != nil {
		return out, &inputFileError{path: path, err: err}
	}
	return out, nil
}
