package plot

import (
	"errors"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// modalFront is testFront with modes on two road cases: the heave ratio
// rises along the front (stiffer dampers toward the platform end), the
// hand ratio at 1.6 times it, wheel hop overdamped.
func modalFront(n int) *pb.Front {
	f := testFront(n, 2)
	for i, s := range f.Solutions {
		t := float64(i) / float64(n-1)
		for _, rc := range []string{"smooth circuit", "bumpy street"} {
			cm := &pb.CaseMetrics{RoadCase: rc}
			for j, name := range model.ModeNames {
				m := &pb.Mode{Name: name, UndampedFrequencyHz: 2 + float64(j), ModalDampingRatio: 0.3 + 0.4*t + 0.05*float64(j)}
				if j < 3 {
					m.HandDampingRatio = 1.6 * m.ModalDampingRatio
				} else {
					m.Overdamped = true
				}
				cm.Modes = append(cm.Modes, m)
			}
			s.CaseMetrics = append(s.CaseMetrics, cm)
		}
	}
	return f
}

func TestModalRatiosRenders(t *testing.T) {
	t.Parallel()
	fig, err := ModalRatios(modalFront(12), ModalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if got := len(fig.Panels[0]); got != 2 {
		t.Errorf("%d panels, want one per road case (2)", got)
	}
	r := render(t, "modal", fig)
	checkTexts(t, r, Caution, "smooth circuit", "bumpy street", "Modal damping ratio", "Grip: tyre load variation (% of static load)",
		"heave", "pitch", "roll", "heave, hand (rigid tyres)", "balanced point, solution")
}

func TestModalRatiosInvalid(t *testing.T) {
	t.Parallel()
	noModes := testFront(3, 2)
	for _, c := range []struct {
		name  string
		front *pb.Front
		opt   ModalOptions
		field string
	}{
		{"empty", &pb.Front{Objectives: []*pb.Objective{objGrip}}, ModalOptions{}, "solutions"},
		{"objective out of range", modalFront(3), ModalOptions{Objective: 2}, "objective"},
		{"basic view", noModes, ModalOptions{}, "solutions[0].case_metrics"},
	} {
		_, err := ModalRatios(c.front, c.opt)
		var ve *model.ValidationError
		if !errors.As(err, &ve) || len(ve.Problems) != 1 || ve.Problems[0].Field != c.field {
			t.Errorf("%s: error %v, want one problem at %s", c.name, err, c.field)
		}
	}
}
