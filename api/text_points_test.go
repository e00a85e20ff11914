package api

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// TestReferencePointsFromText reads the example spec with reference
// points (testdata/floor-job.yaml) as a spec file is read: the points
// reach the model with their positions as written (the x distance, the
// wheelbase fraction, the lateral offset, the rest height), each field has
// the line it was written on, and a bad point's fields come back under the
// request's paths, which the positions resolve to the user's lines.
func TestReferencePointsFromText(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "floor-job.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	var spec pb.JobSpec
	pos, err := DecodeTextPositions(b, &spec)
	if err != nil {
		t.Fatal(err)
	}
	in, err := SpecToModel(&spec)
	if err != nil {
		t.Fatal(err)
	}
	want := []model.ReferencePoint{
		{Name: "splitter", X: -0.65, RestHeight: 0.034},
		{Name: "splitter left corner", X: -0.60, Y: 0.78, RestHeight: 0.046},
		{Name: "plank front", WheelbaseFraction: 0.2, RestHeight: 0.059},
	}
	got := in.Vehicle.ReferencePoints
	if len(got) != len(want) {
		t.Fatalf("got %d points, want %d", len(got), len(want))
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("point %d: got %+v, want %+v", i, got[i], want[i])
		}
	}
	lines := strings.Split(string(b), "\n")
	at, ok := pos.Of("vehicle.reference_points[1].y_m")
	if !ok || !strings.Contains(lines[at.Line-1], "y_m: 0.78") {
		t.Errorf("vehicle.reference_points[1].y_m: position %+v (ok %v) is not the line that gives it", at, ok)
	}

	spec.Vehicle.ReferencePoints[2].RestHeightM = 5 // metres: a slip for 5 mm?
	_, err = SpecToModel(&spec)
	var ve *model.ValidationError
	if !errors.As(err, &ve) || !strings.Contains(err.Error(), "spec.vehicle.reference_points[2].rest_height_m") {
		t.Errorf("a point 5 m above the ground: got %v, want the field named", err)
	}
}
