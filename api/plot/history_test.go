package plot

import (
	"errors"
	"math"
	"testing"

	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/model"
)

// Roll of the test history: a single degree of freedom's step response
// to a turn-in, y(t) = y_f (1 − e^(−ζωt) (cos ω_d t + ζ/√(1−ζ²) sin ω_d t)),
// ω_d = ω√(1−ζ²) (any vibration text, e.g. Thomson, Theory of Vibration
// with Applications, the step response of a damped system).
const (
	testRollSteady = 0.02 // rad, about 1.15 deg
	testZeta       = 0.35
	testOmega      = 2 * math.Pi * 2.5 // rad/s: a 2.5 Hz roll mode
	testLLTDSteady = 0.54
)

// testTransient is an invented turn-in: n samples over 1.5 s, roll as the
// step response above, no pitch, the LLTD front share settling on
// testLLTDSteady, the outside (left) tyres gaining the load the inside
// ones lose.
func testTransient(n int) *pb.GetTransientHistoryResponse {
	h := &pb.GetTransientHistoryResponse{CaseName: "turn-in", Kind: "manoeuvre"}
	wd := testOmega * math.Sqrt(1-testZeta*testZeta)
	for i := range n {
		t := 1.5 * float64(i) / float64(n-1)
		y := testRollSteady * (1 - math.Exp(-testZeta*testOmega*t)*(math.Cos(wd*t)+testZeta/math.Sqrt(1-testZeta*testZeta)*math.Sin(wd*t)))
		h.TimeS = append(h.TimeS, t)
		h.RollRad = append(h.RollRad, y)
		h.PitchRad = append(h.PitchRad, 0)
		h.LltdFront = append(h.LltdFront, testLLTDSteady+0.08*math.Exp(-6*t))
		dw := 1500 * y / testRollSteady
		h.TyreLoadFlN = append(h.TyreLoadFlN, 2600+dw)
		h.TyreLoadFrN = append(h.TyreLoadFrN, 2600-dw)
		h.TyreLoadRlN = append(h.TyreLoadRlN, 3100+0.9*dw)
		h.TyreLoadRrN = append(h.TyreLoadRrN, 3100-0.9*dw)
		h.AyMPerS2 = append(h.AyMPerS2, 1.5*9.80665)
		h.AxMPerS2 = append(h.AxMPerS2, 0)
	}
	return h
}

func testSteady() *pb.TransientMetrics {
	return &pb.TransientMetrics{Name: "turn-in", Kind: "manoeuvre",
		Roll:  &pb.AttitudeResponse{SteadyRad: testRollSteady},
		Pitch: &pb.AttitudeResponse{},
		Lltd:  &pb.LltdResponse{Defined: true, Steady: testLLTDSteady}}
}

func TestTransientHistoryRenders(t *testing.T) {
	t.Parallel()
	const n = 3001
	fig, err := TransientHistory(testTransient(n), HistoryOptions{Steady: testSteady()})
	if err != nil {
		t.Fatal(err)
	}
	if len(fig.Panels) != 2 || len(fig.Panels[0]) != 2 || len(fig.Panels[1]) != 2 {
		t.Fatalf("panels %d rows, want 2 × 2", len(fig.Panels))
	}
	// The roll panel's top is the step response's peak in degrees: the
	// overshoot exp(−πζ/√(1−ζ²)) of the same text. Tolerance: the peak
	// falls between samples 0.5 ms apart, where the response is flat to
	// second order: (ω Δt)² / 8 of y_f is under 1e-4 relative.
	wantPeak := testRollSteady * (1 + math.Exp(-math.Pi*testZeta/math.Sqrt(1-testZeta*testZeta))) * 180 / math.Pi
	if got := fig.Panels[0][0].Y.Max; math.Abs(got-wantPeak) > 1e-4*wantPeak {
		t.Errorf("roll panel tops at %.6g deg, want the peak %.6g deg", got, wantPeak)
	}
	r := render(t, "history", fig)
	checkTexts(t, r, Caution, "Time history, turn-in", "Roll", "Pitch", "Lateral load transfer, front share", "Tyre loads",
		"Roll (deg)", "LLTD front share (%)", "Tyre load (N)", "Time (s)", "tyre FL", "tyre RR", "steady value (quasi-static end)",
		`Case "turn-in" (manoeuvre), 3001 samples over 1.5 s`)
}

// A kerb has no lateral input: the LLTD panel says so and draws no line.
func TestTransientHistoryNoLateral(t *testing.T) {
	t.Parallel()
	h := testTransient(200)
	h.CaseName, h.Kind = "kerb left", "kerb"
	for i := range h.LltdFront {
		h.LltdFront[i] = 0
	}
	fig, err := TransientHistory(h, HistoryOptions{})
	if err != nil {
		t.Fatal(err)
	}
	r := render(t, "", fig)
	checkTexts(t, r, "LLTD front share: no lateral input", `Case "kerb left" (kerb)`)
}

func TestTransientHistoryInvalid(t *testing.T) {
	t.Parallel()
	short := testTransient(10)
	short.TyreLoadRrN = short.TyreLoadRrN[:9]
	nan := testTransient(10)
	nan.PitchRad[4] = math.NaN()
	for _, c := range []struct {
		name  string
		h     *pb.GetTransientHistoryResponse
		field string
	}{
		{"empty", &pb.GetTransientHistoryResponse{}, "time_s"},
		{"short list", short, "tyre_load_rr_n"},
		{"NaN", nan, "pitch_rad[4]"},
	} {
		_, err := TransientHistory(c.h, HistoryOptions{})
		var ve *model.ValidationError
		if !errors.As(err, &ve) || len(ve.Problems) != 1 || ve.Problems[0].Field != c.field {
			t.Errorf("%s: error %v, want one problem at %s", c.name, err, c.field)
		}
	}
}
