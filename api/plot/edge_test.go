package plot

import (
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
)

// TestEdgeCasesRender draws the smallest inputs each chart accepts; they
// must render and keep their labels rather than panic in the axis code.
func TestEdgeCasesRender(t *testing.T) {
	t.Parallel()
	flat := testFront(4, 2)
	for _, s := range flat.Solutions {
		s.Setup = flat.Solutions[0].Setup // one colour: the scale must still have a range
	}
	front := []*pb.DamperCurve{
		testCurve(pb.CornerPosition_CORNER_POSITION_FRONT_LEFT, 4000, 6000, 0, false),
		testCurve(pb.CornerPosition_CORNER_POSITION_FRONT_RIGHT, 4000, 6000, 0, false),
	}
	for _, tc := range []struct {
		name  string
		build func() (*Figure, error)
		want  []string
	}{
		{"one solution", func() (*Figure, error) { return Front(testFront(1, 2), FrontOptions{}) },
			[]string{"front, 1 solution", "balanced, #0"}},
		{"one colour", func() (*Figure, error) { return Front(flat, FrontOptions{}) },
			[]string{"front, 4 solutions"}},
		{"two of three objectives", func() (*Figure, error) { return Front(testFront(6, 3), FrontOptions{Objectives: []int{2, 0}}) },
			[]string{"Pitch variation, worst case (deg)", "Grip: tyre load variation (% of static load)"}},
		{"front axle only, no band, no knee", func() (*Figure, error) { return DamperCurves(front, CurveOptions{}) },
			[]string{"Front dampers", "bump, 4.00 N s/mm"}},
		{"generation 0 only", func() (*Figure, error) {
			return Hypervolume([]*pb.Progress{{Generation: 0, Generations: 0, Hypervolume: 1e-5}}, nil, HypervolumeOptions{})
		}, []string{"Hypervolume (product of SI units)"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			fig, err := tc.build()
			if err != nil {
				t.Fatal(err)
			}
			var r rendered
			func() {
				defer func() {
					if p := recover(); p != nil {
						t.Fatalf("render panicked: %v", p)
					}
				}()
				r = render(t, "", fig)
			}()
			checkTexts(t, r, append(tc.want, Caution)...)
		})
	}
}
