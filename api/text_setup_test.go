package api

import (
	"math"
	"strings"
	"testing"

	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// A setup file written by EncodeSetupText reads back through DecodeText
// (what eval and check read) to an equal message, bit for bit, for
// doubles that need all 17 digits, zeros (no knee) and tiny and huge
// magnitudes; the header becomes comment lines.
func TestSetupTextRoundTrip(t *testing.T) {
	t.Parallel()
	for _, s := range []*pb.Setup{
		{Front: &pb.AxleDamping{BumpRatio: 0.1 + 0.2, ReboundRatio: math.Nextafter(0.85, 1), KneeBumpMPerS: 0.05, HighSpeedBumpFactor: 0.5},
			Rear: &pb.AxleDamping{BumpRatio: 1.0 / 3, ReboundRatio: 2, KneeReboundMPerS: 5e-324, HighSpeedReboundFactor: 1e300}},
		{Front: &pb.AxleDamping{BumpRatio: 0.7}, Rear: &pb.AxleDamping{ReboundRatio: 0.8}},
		{Front: &pb.AxleDamping{BumpRatio: 0.7, KneeBumpMPerS: 0.04, HighSpeedBumpFactor: 0.5, FrictionN: 35.5, GasForceN: 1.0 / 3,
			StagesBump: []*pb.DamperStage{{VelocityMPerS: 0.1 + 0.2, Factor: 0.3}, {VelocityMPerS: 0.4, Factor: 1.7}}},
			Rear: &pb.AxleDamping{ReboundRatio: 0.8, BlowOffReboundN: 650, StagesRebound: []*pb.DamperStage{{VelocityMPerS: 0.2, Factor: 0.4}}}},
	} {
		b, err := EncodeSetupText(s, "Setup of solution 3 of jobs/x.\nSecond line.")
		if err != nil {
			t.Fatal(err)
		}
		if !strings.HasPrefix(string(b), "# Setup of solution 3 of jobs/x.\n# Second line.\n") {
			t.Errorf("header not as comments:\n%s", b)
		}
		got := &pb.Setup{}
		if err := DecodeText(b, got); err != nil {
			t.Fatalf("%v\n%s", err, b)
		}
		if !proto.Equal(got, s) {
			t.Errorf("read back %v, wrote %v\n%s", got, s, b)
		}
	}
}
