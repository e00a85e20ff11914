package plot

import (
	"errors"
	"math"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// testHistory is an invented search of 60 planned generations stopped
// after 40, resumed from generation 30 (so 30 to 32 are reported twice):
// the hypervolume rises as 4e-5 (1 - 0.6 exp(-g/8)) in grip × metres.
func testHistory() []*pb.Progress {
	var h []*pb.Progress
	add := func(g int) {
		h = append(h, &pb.Progress{Generation: int32(g), Generations: 60, Evaluations: int64(48 * (g + 1)),
			Hypervolume: 4e-5 * (1 - 0.6*math.Exp(-float64(g)/8))})
	}
	for g := 0; g <= 32; g++ {
		add(g)
	}
	for g := 30; g <= 40; g++ {
		add(g)
	}
	return h
}

func TestHypervolumeRenders(t *testing.T) {
	t.Parallel()
	fig, err := Hypervolume(testHistory(), []*pb.Objective{objGrip, objPlatform}, HypervolumeOptions{})
	if err != nil {
		t.Fatal(err)
	}
	r := render(t, "hypervolume", fig)
	// 4e-5 (1 - 0.6 e^-5) in grip × m is 3.9838e-5; in % × mm it is
	// 100 × 1000 times that, 3.984.
	checkTexts(t, r, Caution, "Generation", "Hypervolume (% × mm)", "Generation 40 of 60: 3.984 % × mm.")
}

func TestHypervolumeInvalid(t *testing.T) {
	t.Parallel()
	neg := testHistory()
	neg[3].Hypervolume = math.NaN()
	for _, tc := range []struct {
		name    string
		history []*pb.Progress
		field   string
	}{
		{"none", nil, "history"},
		{"NaN", neg, "history[3].hypervolume"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			t.Parallel()
			_, err := Hypervolume(tc.history, nil, HypervolumeOptions{})
			var ve *model.ValidationError
			if !errors.As(err, &ve) {
				t.Fatalf("error %v, want a *model.ValidationError", err)
			}
			if ve.Problems[0].Field != tc.field {
				t.Errorf("error %v does not name %q", err, tc.field)
			}
		})
	}
}
