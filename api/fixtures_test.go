package api

import (
	"encoding/binary"
	"math"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// Test fixtures: an invented GT-style car and two invented track cases,
// smoother than ISO 8608 class A as a racing surface is. Expected values
// never come from these figures; tests check laws, round trips and
// independent recomputations.

func testCorner(springRate, motionRatio, unsprung, tyreRate, gap float64) *pb.Corner {
	return &pb.Corner{
		SpringRateNPerM: springRate, SpringMotionRatio: motionRatio, DamperMotionRatio: motionRatio,
		UnsprungMassKg: unsprung, TyreRateNPerM: tyreRate, TyreDampingNSPerM: 120, TyreEnvelopeLengthM: 0.2,
		BumpStopGapM: gap,
	}
}

func testVehicle() *pb.Vehicle {
	front := testCorner(150e3, 0.82, 42, 310e3, 0.028)
	rear := testCorner(170e3, 0.76, 48, 330e3, 0.034)
	return &pb.Vehicle{
		Name:         "Test car (invented)",
		SprungMassKg: 1120, PitchInertiaKgM2: 1750, RollInertiaKgM2: 430,
		CgToFrontAxleM: 1.36, CgToRearAxleM: 1.29,
		TrackFrontM: 1.64, TrackRearM: 1.60,
		Corners:          []*pb.Corner{front, proto.CloneOf(front), rear, proto.CloneOf(rear)},
		FrontAntiRollBar: &pb.AntiRollBar{WheelRateNPerM: 55e3},
		RearAntiRollBar:  &pb.AntiRollBar{WheelRateNPerM: 28e3},
		Aero: &pb.Aero{ReferenceSpeedMPerS: 50, FrontDownforceN: 2400, RearDownforceN: 3100,
			FrontStiffnessNPerM: 35e3, RearStiffnessNPerM: 28e3},
	}
}

func testRoadCases() []*pb.RoadCase {
	return []*pb.RoadCase{
		{Name: "Test ring, long straight", SpeedMPerS: 60,
			Spectrum: &pb.RoadCase_PowerLaw{PowerLaw: &pb.PowerLawSpectrum{Gd0M3: 2.5e-6}}},
		{Name: "Test streets, braking zone", SpeedMPerS: 28, Weight: 0.5,
			Spectrum: &pb.RoadCase_PowerLaw{PowerLaw: &pb.PowerLawSpectrum{Gd0M3: 10e-6, Waviness: 2.2}}},
	}
}

// testSpec is a small seeded job: 8 survivors, a few generations.
func testSpec(generations int32) *pb.JobSpec {
	return &pb.JobSpec{
		DisplayName: "api test job",
		Labels:      map[string]string{"suite": "api"},
		Vehicle:     testVehicle(),
		RoadCases:   testRoadCases(),
		Grid:        &pb.Grid{MinHz: 0.2, MaxHz: 120, Points: 121},
		Constraints: []*pb.Constraint{{Kind: pb.ConstraintKind_CONSTRAINT_KIND_LIFT_OFF, Limit: 0.01}},
		Search:      &pb.SearchSettings{PopulationSize: 8, Generations: generations, Seed: proto.Uint64(7)},
		Adjustment:  &pb.Adjustment{BumpSoftestRatio: 0.3, BumpStiffestRatio: 1.2, ReboundSoftestRatio: 0.4, ReboundStiffestRatio: 1.5},
		Curves:      &pb.CurveSettings{MaxVelocityMPerS: 0.25, Points: 11},
	}
}

// testSetup is a plausible setup inside the default bounds.
func testSetup() *pb.Setup {
	ax := func(b, r float64) *pb.AxleDamping {
		return &pb.AxleDamping{BumpRatio: b, ReboundRatio: r, KneeBumpMPerS: 0.05, KneeReboundMPerS: 0.05,
			HighSpeedBumpFactor: 0.5, HighSpeedReboundFactor: 0.5}
	}
	return &pb.Setup{Front: ax(0.5, 0.8), Rear: ax(0.55, 0.9)}
}

// geneKey identifies a vector of floats by its bits, for comparisons bit
// for bit.
func geneKey(x []float64) string {
	b := make([]byte, 8*len(x))
	for i, v := range x {
		binary.LittleEndian.PutUint64(b[8*i:], math.Float64bits(v))
	}
	return string(b)
}
