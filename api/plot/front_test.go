package plot

import (
	"errors"
	"strings"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

func TestFrontRenders(t *testing.T) {
	t.Parallel()
	for _, tc := range []struct {
		name  string
		front *pb.Front
		opt   FrontOptions
		want  []string
	}{
		{
			name:  "front",
			front: testFront(14, 2),
			opt: FrontOptions{
				Marked:     []int32{3, 11},
				Candidates: []Candidate{{Label: "current car", Objectives: []float64{0.075, 0.0031}}},
			},
			want: []string{
				"Grip: tyre load variation (% of static load)", "Platform: ride-height variation (mm)",
				"Front/rear mean damping ratio", "balanced, #", "marked", "current car", "#3", "#11",
				"front, 14 solutions", "Pareto front, jobs/test-front",
			},
		},
		{
			name:  "front-3-objectives",
			front: testFront(20, 3),
			opt:   FrontOptions{ColourGene: "front_rebound_ratio", Marked: []int32{2}},
			want: []string{
				"Grip: tyre load variation (% of static load)", "Platform: ride-height variation (mm)",
				"Pitch variation, worst case (deg)", "Front rebound ratio", "balanced, #",
			},
		},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			fig, err := Front(tc.front, tc.opt)
			if err != nil {
				t.Fatal(err)
			}
			r := render(t, tc.name, fig)
			checkTexts(t, r, append(tc.want, Caution)...)
		})
	}
}

func TestFrontInvalid(t *testing.T) {
	t.Parallel()
	one := testFront(5, 2)
	one.Objectives = one.Objectives[:1]
	ragged := testFront(5, 2)
	ragged.Solutions[2].Objectives = ragged.Solutions[2].Objectives[:1]
	noRear := testFront(5, 2)
	noRear.Solutions[4].Setup.Rear = nil
	for _, tc := range []struct {
		name  string
		front *pb.Front
		opt   FrontOptions
		field string
	}{
		{"one objective", one, FrontOptions{}, "front.objectives"},
		{"ragged", ragged, FrontOptions{}, "front.solutions[2].objectives"},
		{"unknown gene", testFront(5, 2), FrontOptions{ColourGene: "rear_knee_m_per_s"}, "colour_gene"},
		{"no rear setup", noRear, FrontOptions{}, "front.solutions[4].setup"},
		{"marked absent", testFront(5, 2), FrontOptions{Marked: []int32{9}}, "marked[0]"},
		{"objective twice", testFront(5, 3), FrontOptions{Objectives: []int{1, 1}}, "objectives[1]"},
		{"candidate short", testFront(5, 2), FrontOptions{Candidates: []Candidate{{Objectives: []float64{1}}}}, "candidates[0].objectives"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := Front(tc.front, tc.opt)
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
			if strings.TrimSpace(err.Error()) == "" {
				t.Error("empty error message")
			}
		})
	}
}
