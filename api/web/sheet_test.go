package web

import (
	"bytes"
	"fmt"
	"html"
	"math"
	"net/http"
	"strconv"
	"strings"
	"testing"

	"dampfront/api"
	pb "dampfront/api/gen/dampfront/v1"
	"dampfront/api/sheet"
	"dampfront/model"

	"google.golang.org/protobuf/proto"
)

// sheetJob runs the demo job (cut short) with nine-click low-speed
// adjusters from ratio 1.2 (click 0) to 0.4 and returns the bundle, the
// job's name and the sheet of its balanced point.
func sheetJob(t *testing.T) (*bundle, string, *sheet.Sheet) {
	t.Helper()
	b := setup(t, 1, api.Options{})
	spec := demoSpec(t, 16, 10)
	lo := &pb.Adjuster{Clicks: 9, Stiffest: 1.2, Softest: 0.4}
	spec.Adjusters = &pb.Adjusters{Front: &pb.DamperAdjusters{LowBump: lo, LowRebound: lo}, Rear: &pb.DamperAdjusters{LowBump: lo, LowRebound: lo}}
	job := b.submit(t, spec)
	b.finish(t, job.GetName())
	s, err := sheet.Fetch(testContext(t), b.client, job.GetName(), sheet.NoSolution)
	if err != nil {
		t.Fatal(err)
	}
	if !s.Balanced {
		t.Errorf("the sheet of the default solution %d is not marked as the balanced point", s.Index)
	}
	return b, job.GetName(), s
}

// The sheet's forces at the test velocities are the piecewise-linear
// curve's closed form (textbook statics of a two-slope damper)
//
//	F(v) = c v                     below the knee v_k
//	F(v) = c (v_k + r (v - v_k))   above it
//
// from the slope, knee and factor of the solution's curve, and agree with
// the damper curves the job reports (GetDamperCurves, what `dampfront
// curves` prints) and with the hand method at the solution's ratios
// (EstimateByHand: below the knee c v; at the knee its knee force).
// Tolerance 0.5 N: the sheet prints whole newtons.
func TestSheetForcesAgreeWithCurvesAndHand(t *testing.T) {
	t.Parallel()
	const tol = 0.5 + 1e-9
	b, name, s := sheetJob(t)
	ctx := testContext(t)
	// Every 25 mm/s from -300 to 300: every test velocity is a table point.
	cr, err := b.client.GetDamperCurves(ctx, &pb.GetDamperCurvesRequest{Job: name,
		Target: &pb.GetDamperCurvesRequest_SolutionIndex{SolutionIndex: s.Index}, Curves: &pb.CurveSettings{MaxVelocityMPerS: 0.3, Points: 25}})
	if err != nil {
		t.Fatal(err)
	}
	jr, err := b.client.GetJob(ctx, &pb.GetJobRequest{Name: name, View: pb.JobView_JOB_VIEW_FULL})
	if err != nil {
		t.Fatal(err)
	}
	hand, err := api.EstimateByHand(&pb.EstimateByHandRequest{Vehicle: jr.GetJob().GetSpec().GetVehicle(), Targets: cr.GetSetup(), Adjustment: jr.GetJob().GetSpec().GetAdjustment()})
	if err != nil {
		t.Fatal(err)
	}
	closed := func(c, vk, r, v float64) float64 {
		if vk == 0 || v <= vk {
			return c * v
		}
		return c * (vk + r*(v-vk))
	}
	at := func(dc *pb.DamperCurve, v float64) float64 {
		for k, x := range dc.GetVelocityMPerS() {
			if math.Abs(x-v) < 1e-9 {
				return dc.GetForceN()[k]
			}
		}
		t.Fatalf("no curve table point at %g m/s", v)
		return 0
	}
	checked := 0
	for _, ft := range s.ForceTables {
		for _, corner := range strings.Split(ft.Corners, ", ") {
			i := slicesIndex(model.CornerNames[:], corner)
			dc, hc := cr.GetCurves()[i], hand.GetCorners()[i]
			for k, row := range ft.Rows {
				v := model.BandVelocities[k]
				bump, rebound := parseN(t, row.Bump), parseN(t, row.Rebound)
				for _, x := range []struct {
					name       string
					sheet, ref float64
				}{
					{"bump, closed form", bump, closed(dc.GetBumpSlopeNSPerM(), dc.GetKneeBumpMPerS(), dc.GetHighSpeedBumpFactor(), v)},
					{"rebound, closed form", rebound, closed(dc.GetReboundSlopeNSPerM(), dc.GetKneeReboundMPerS(), dc.GetHighSpeedReboundFactor(), v)},
					{"bump, curves", bump, at(dc, v)},
					{"rebound, curves", rebound, -at(dc, -v)},
					{"bump -10 %", parseN(t, row.BumpMin), 0.9 * at(dc, v)},
					{"rebound +10 %", parseN(t, row.RebMax), -1.1 * at(dc, -v)},
				} {
					if math.Abs(x.sheet-x.ref) > tol {
						t.Errorf("%s at %s mm/s %s: sheet %g N, reference %.3f N", corner, row.Velocity, x.name, x.sheet, x.ref)
					}
					checked++
				}
				if hb := hc.GetBump(); v <= hb.GetKneeMPerS() {
					if math.Abs(bump-hb.GetSlopeNSPerM()*v) > tol {
						t.Errorf("%s bump at %s mm/s: sheet %g N, hand method %.3f N", corner, row.Velocity, bump, hb.GetSlopeNSPerM()*v)
					}
					if v == hb.GetKneeMPerS() && math.Abs(bump-hb.GetKneeForceN()) > tol {
						t.Errorf("%s bump at the knee: sheet %g N, hand method's knee force %.3f N", corner, bump, hb.GetKneeForceN())
					}
					checked++
				}
			}
		}
	}
	if checked < 4*len(model.BandVelocities)*6 {
		t.Errorf("only %d figures checked; the sheet's tables do not cover the four corners", checked)
	}
}

// slicesIndex is the index of s in xs, -1 when absent.
func slicesIndex(xs []string, s string) int {
	for i, x := range xs {
		if x == s {
			return i
		}
	}
	return -1
}

func parseN(t *testing.T, s string) float64 {
	t.Helper()
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		t.Fatalf("sheet figure %q: %v", s, err)
	}
	return v
}

// The sheet's ride rate and ride frequency are Gillespie's (1992,
// Fundamentals of Vehicle Dynamics, SAE, ch. 6): RR = K_s K_t/(K_s + K_t)
// and f = sqrt(RR/M)/(2π), worked here from the sheet's own wheel rate,
// tyre rate and sprung corner mass. Tolerance: one unit in the last
// printed decimal (0.1 N/mm, 0.01 Hz) plus the rounding of the inputs.
func TestSheetRideFiguresGillespie(t *testing.T) {
	t.Parallel()
	_, _, s := sheetJob(t)
	row := func(label string) []float64 {
		for _, r := range s.CornerRows {
			if r.Label == label {
				out := make([]float64, len(r.Values))
				for i, v := range r.Values {
					out[i] = parseN(t, v)
				}
				return out
			}
		}
		t.Fatalf("the sheet has no row %q", label)
		return nil
	}
	kw, kt, m := row("wheel rate"), row("tyre rate"), row("sprung corner mass")
	rr, f, f0 := row("ride rate (wheel and tyre in series)"), row("ride frequency, ride rate"), row("ride frequency, tyre ignored")
	for i := range kw {
		wantRR := kw[i] * kt[i] / (kw[i] + kt[i]) // N/mm
		if math.Abs(rr[i]-wantRR) > 0.1 {
			t.Errorf("corner %d ride rate %g N/mm, Gillespie %.2f", i, rr[i], wantRR)
		}
		wantF := math.Sqrt(wantRR*1e3/m[i]) / (2 * math.Pi)
		if math.Abs(f[i]-wantF) > 0.011 {
			t.Errorf("corner %d ride frequency %g Hz, Gillespie %.3f", i, f[i], wantF)
		}
		if want0 := math.Sqrt(kw[i]*1e3/m[i]) / (2 * math.Pi); math.Abs(f0[i]-want0) > 0.011 {
			t.Errorf("corner %d ride frequency without the tyre %g Hz, sqrt(k/m)/2π %.3f", i, f0[i], want0)
		}
	}
}

// The job page links every solution's sheet and shows the modes of the
// one selected; the sheet page is printable (A4 print styles) and carries
// the caution, the forces, the curve chart and the modes.
func TestSheetPages(t *testing.T) {
	t.Parallel()
	b, name, s := sheetJob(t)
	id := strings.TrimPrefix(name, "jobs/")
	res, body := get(t, b, fmt.Sprintf("/jobs/%s/solutions/%d/sheet.html", id, s.Index))
	wantStatus(t, "sheet", res, body, http.StatusOK)
	for _, want := range []string{"@media print", "size: A4", html.EscapeString(model.Caution), "Forces at the test velocities", "<svg", "Gillespie 1992",
		"modal ratio", "hand ratio", "the tyres in series", "common practice", fmt.Sprintf("solution %d", s.Index), "Adjuster range"} {
		if !strings.Contains(body, want) {
			t.Errorf("the sheet lacks %q", want)
		}
	}
	res, body = get(t, b, "/jobs/"+id)
	wantStatus(t, "job page", res, body, http.StatusOK)
	for _, want := range []string{`id="modes"`, fmt.Sprintf("Modes, solution %d", s.Index), `class="sheet-link"`, "Why they differ"} {
		if !strings.Contains(body, want) {
			t.Errorf("the job page lacks %q", want)
		}
	}
	res, body = get(t, b, "/jobs/"+id+"/solutions/0/modes.html")
	wantStatus(t, "modes of solution 0", res, body, http.StatusOK)
	if !strings.Contains(body, "Modes, solution 0") || !strings.Contains(body, "heave") {
		t.Errorf("modes of solution 0:\n%s", body)
	}
	// A setup stiffer than the stiffest click, evaluated on the job, is
	// flagged out of band on its sheet.
	ctx := testContext(t)
	jr, err := b.client.GetJob(ctx, &pb.GetJobRequest{Name: name, View: pb.JobView_JOB_VIEW_FULL})
	if err != nil {
		t.Fatal(err)
	}
	su := proto.Clone(jr.GetJob().GetSpec().GetDesignSpace().GetBase()).(*pb.Setup)
	su.Front.BumpRatio, su.Front.ReboundRatio, su.Rear.BumpRatio, su.Rear.ReboundRatio = 2*jr.GetJob().GetSpec().GetAdjustment().GetBumpStiffestRatio(), 0.8, 0.7, 0.8
	ev, err := b.client.EvaluateSetups(ctx, &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Job{Job: name},
		Setups: []*pb.Setup{su}, View: pb.SolutionView_SOLUTION_VIEW_FULL})
	if err != nil {
		t.Fatal(err)
	}
	stiff, err := sheet.Build(jr.GetJob(), ev.GetEvaluations()[0], false)
	if err != nil {
		t.Fatal(err)
	}
	if !stiff.Band || len(stiff.OutOfBand) == 0 || !strings.Contains(strings.Join(stiff.OutOfBand, "; "), "FL bump") {
		t.Errorf("a front bump ratio twice the stiffest click's: out of band %q, want FL bump named", stiff.OutOfBand)
	}
	var page bytes.Buffer
	if err := sheet.WriteHTML(&page, stiff); err != nil || !strings.Contains(page.String(), "OUT OF BAND") {
		t.Errorf("the sheet of an out-of-band setup does not say so (err %v)", err)
	}

	res, body = get(t, b, "/jobs/"+id+"/solutions/100000/sheet.html")
	wantStatus(t, "sheet of a solution not on the front", res, body, http.StatusNotFound)
	res, body = get(t, b, "/jobs/"+id+"/solutions/x/sheet.html")
	wantStatus(t, "sheet of solution x", res, body, http.StatusBadRequest)
}

// The sheet of a job with adjusters carries the click table: sheetJob's
// nine-click low-speed adjusters from ratio 1.2 (click 0) to 0.4 set the ratio
// linearly, 0.1 a click, so a setup's click is the nearest whole number
// to (1.2 - ratio)/0.1 (arithmetic of the linear map the spec states).
func TestSheetClicks(t *testing.T) {
	t.Parallel()
	b, name, s := sheetJob(t)
	fr, err := b.client.GetFront(testContext(t), &pb.GetFrontRequest{Job: name, PageSize: 1000, View: pb.SolutionView_SOLUTION_VIEW_BASIC})
	if err != nil {
		t.Fatal(err)
	}
	var su *pb.Setup
	for _, sol := range fr.GetFront().GetSolutions() {
		if sol.GetIndex() == s.Index {
			su = sol.GetSetup()
		}
	}
	if len(s.Clicks) != 4 || su == nil {
		t.Fatalf("click table %+v of solution %d, want four corners", s.Clicks, s.Index)
	}
	click := func(ratio float64) string { return fmt.Sprintf("%d of 8", int(math.Round((1.2-ratio)/0.1))) }
	for i, row := range s.Clicks {
		a := su.GetFront()
		if i >= 2 {
			a = su.GetRear()
		}
		if row.LowBump != click(a.GetBumpRatio()) || row.LowRebound != click(a.GetReboundRatio()) || row.HighBump != "" {
			t.Errorf("%s clicks %+v; ratios bump %g rebound %g want %s, %s and no high-speed click", row.Corner, row, a.GetBumpRatio(), a.GetReboundRatio(),
				click(a.GetBumpRatio()), click(a.GetReboundRatio()))
		}
	}
	var page bytes.Buffer
	if err := sheet.WriteHTML(&page, s); err != nil || !strings.Contains(page.String(), `<section id="clicks">`) {
		t.Errorf("the sheet has no click table (err %v)", err)
	}
}
