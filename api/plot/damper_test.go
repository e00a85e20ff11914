package plot

import (
	"errors"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

func TestDamperCurvesRender(t *testing.T) {
	t.Parallel()
	fig, err := DamperCurves(testCurves(), CurveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	r := render(t, "dampers", fig)
	// Slopes in N s/mm are the fixture's N s/m over 1000; knees 0.05 and
	// 0.06 m/s are 50 and 60 mm/s.
	checkTexts(t, r, Caution, "Damper velocity, bump positive (mm/s)", "Damper force, bump positive (N)",
		"Front dampers", "Rear dampers", "bump, 4.20 N s/mm", "rebound, 7.00 N s/mm",
		"left bump, 5.20 N s/mm", "right rebound, 9.20 N s/mm", "knee 50 mm/s", "knee 60 mm/s",
		"adjuster range, softest to stiffest")
}

func TestDamperCurvesInvalid(t *testing.T) {
	t.Parallel()
	short := testCurves()
	short[1].ForceN = short[1].ForceN[:10]
	unsorted := testCurves()
	unsorted[2].VelocityMPerS[5] = unsorted[2].VelocityMPerS[4]
	halfBand := testCurves()
	halfBand[3].StiffestForceN = nil
	for _, tc := range []struct {
		name   string
		curves []*pb.DamperCurve
		field  string
	}{
		{"none", nil, "curves"},
		{"short force", short, "curves[1].force_n"},
		{"velocity not increasing", unsorted, "curves[2].velocity_m_per_s[5]"},
		{"band half given", halfBand, "curves[3].stiffest_force_n"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := DamperCurves(tc.curves, CurveOptions{})
			var ve *model.ValidationError
			if !errors.As(err, &ve) {
				t.Fatalf("error %v, want a *model.ValidationError", err)
			}
			found := false
			for _, p := range ve.Problems {
				found = found || p.Field == tc.field
			}
			if !found {
				t.Errorf("error %v does not name %q", err, tc.field)
			}
		})
	}
}
