package api

import (
	"math"
	"slices"
	"sort"
	"testing"

	"google.golang.org/grpc/codes"
	"google.golang.org/protobuf/proto"

	pb "dampfront/api/gen/dampfront/v1"
)

// badSpecs are specs with known faults and the field paths that must be
// reported, exactly. Each path is where the fault is in SubmitJobRequest.
var badSpecs = []struct {
	name   string
	mutate func(s *pb.JobSpec)
	want   []string
}{
	{"sprung mass zero", func(s *pb.JobSpec) { s.Vehicle.SprungMassKg = 0 },
		[]string{"spec.vehicle.sprung_mass_kg"}},
	{"tyre rate negative", func(s *pb.JobSpec) { s.Vehicle.Corners[2].TyreRateNPerM = -1 },
		[]string{"spec.vehicle.corners[2].tyre_rate_n_per_m"}},
	{"three corners", func(s *pb.JobSpec) { s.Vehicle.Corners = s.Vehicle.Corners[:3] },
		[]string{"spec.vehicle.corners"}},
	{"no vehicle", func(s *pb.JobSpec) { s.Vehicle = nil },
		[]string{"spec.vehicle"}},
	{"bar without motion ratio", func(s *pb.JobSpec) { s.Vehicle.RearAntiRollBar = &pb.AntiRollBar{BarRateNPerM: 9e4} },
		[]string{"spec.vehicle.rear_anti_roll_bar.motion_ratio"}},
	{"negative downforce", func(s *pb.JobSpec) { s.Vehicle.Aero.FrontDownforceN = -5 },
		[]string{"spec.vehicle.aero.front_downforce_n"}},
	{"one sprung load of four", func(s *pb.JobSpec) { s.Vehicle.Corners[1].SprungLoadN = 2500 },
		[]string{"spec.vehicle.corners"}},
	{"no road cases", func(s *pb.JobSpec) { s.RoadCases = nil },
		[]string{"spec.road_cases"}},
	{"no spectrum", func(s *pb.JobSpec) { s.RoadCases[0].Spectrum = nil },
		[]string{"spec.road_cases[0]"}},
	{"power law without Gd0", func(s *pb.JobSpec) { s.RoadCases[1].GetPowerLaw().Gd0M3 = 0 },
		[]string{"spec.road_cases[1].power_law.gd0_m3"}},
	{"waviness 5", func(s *pb.JobSpec) { s.RoadCases[1].GetPowerLaw().Waviness = 5 },
		[]string{"spec.road_cases[1].power_law.waviness"}},
	{"unspecified ISO class", func(s *pb.JobSpec) { s.RoadCases[0].Spectrum = &pb.RoadCase_IsoClass{} },
		[]string{"spec.road_cases[0].iso_class"}},
	{"measured table too short", func(s *pb.JobSpec) {
		s.RoadCases[0].Spectrum = &pb.RoadCase_Measured{Measured: &pb.MeasuredSpectrum{NCyclesPerM: []float64{0.1}, LeftM3: []float64{1e-6}}}
	}, []string{"spec.road_cases[0].measured.n_cycles_per_m"}},
	{"coherence table mismatch", func(s *pb.JobSpec) {
		s.RoadCases[0].Coherence = &pb.Coherence{Kind: pb.CoherenceKind_COHERENCE_KIND_TABLE, NCyclesPerM: []float64{0.1, 1}, Gamma: []float64{0.9}}
	}, []string{"spec.road_cases[0].coherence.n_cycles_per_m"}},
	{"negative speed", func(s *pb.JobSpec) { s.RoadCases[0].SpeedMPerS = -3 },
		[]string{"spec.road_cases[0].speed_m_per_s"}},
	{"even grid", func(s *pb.JobSpec) { s.Grid.Points = 100 },
		[]string{"spec.grid.points"}},
	{"ratio bounds crossed", func(s *pb.JobSpec) {
		s.DesignSpace = &pb.DesignSpace{Ratios: &pb.RatioBounds{FrontBump: &pb.Range{Min: 1, Max: 0.5}}}
	}, []string{"spec.design_space.ratios.front_bump.max"}},
	{"knee range from zero", func(s *pb.JobSpec) {
		s.DesignSpace = &pb.DesignSpace{RearKneeMPerS: &pb.Range{Min: 0, Max: 0.1}}
	}, []string{"spec.design_space.rear_knee_m_per_s.min"}},
	{"high-speed range past 10", func(s *pb.JobSpec) {
		s.DesignSpace = &pb.DesignSpace{FrontHighSpeedFactor: &pb.Range{Min: 0.5, Max: 12}}
	}, []string{"spec.design_space.front_high_speed_factor.max"}},
	{"base factor past 10", func(s *pb.JobSpec) {
		s.DesignSpace = &pb.DesignSpace{Base: &pb.Setup{Front: &pb.AxleDamping{HighSpeedBumpFactor: 20}}}
	}, []string{"spec.design_space.base.front.high_speed_bump_factor"}},
	{"objective twice", func(s *pb.JobSpec) {
		s.Objectives = []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}}
	}, []string{"spec.objectives[1].kind"}},
	{"four objectives", func(s *pb.JobSpec) {
		s.Objectives = []*pb.Objective{{Kind: 1}, {Kind: 2}, {Kind: 5}, {Kind: 6}}
	}, []string{"spec.objectives"}},
	{"target shift not a number", func(s *pb.JobSpec) {
		s.Objectives = []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_PLATFORM, RearTargetShiftM: math.NaN()}}
	}, []string{"spec.objectives[1].rear_target_shift_m"}},
	{"constraint without kind or limit", func(s *pb.JobSpec) { s.Constraints = []*pb.Constraint{{}} },
		[]string{"spec.constraints[0].kind", "spec.constraints[0].limit"}},
	{"tiny population", func(s *pb.JobSpec) { s.Search.PopulationSize = 2 },
		[]string{"spec.search.population_size"}},
	{"reference point of one value", func(s *pb.JobSpec) { s.Search.ReferencePoint = []float64{1} },
		[]string{"spec.search.reference_point"}},
	{"crossover probability 2", func(s *pb.JobSpec) { s.Search.CrossoverProbability = proto.Float64(2) },
		[]string{"spec.search.crossover_probability"}},
	{"migrants over twice the population", func(s *pb.JobSpec) {
		s.Search.Islands, s.Search.MigrationEvery, s.Search.Migrants = 2, 5, 100
	}, []string{"spec.search.migrants"}},
	{"polish budget and stagnation out of range", func(s *pb.JobSpec) {
		s.Search.PolishBudget, s.Search.StagnationWindow, s.Search.StagnationTolerance = -1, -1, 1.5
	}, []string{"spec.search.polish_budget", "spec.search.stagnation_tolerance", "spec.search.stagnation_window"}},
	{"differential weight without the differential variation", func(s *pb.JobSpec) {
		s.Search.DifferentialWeight = proto.Float64(0.5)
	}, []string{"spec.search.differential_weight"}},
	{"differential weight 3 and crossover -1", func(s *pb.JobSpec) {
		s.Search.Variation = pb.Variation_VARIATION_DIFFERENTIAL
		s.Search.DifferentialWeight, s.Search.DifferentialCrossover = proto.Float64(3), proto.Float64(-1)
	}, []string{"spec.search.differential_crossover", "spec.search.differential_weight"}},
	{"unknown variation", func(s *pb.JobSpec) { s.Search.Variation = 7 },
		[]string{"spec.search.variation"}},
	{"adjustment crossed", func(s *pb.JobSpec) { s.Adjustment.BumpStiffestRatio = 0.1 },
		[]string{"spec.adjustment.bump_stiffest_ratio"}},
	{"two curve points", func(s *pb.JobSpec) { s.Curves.Points = 2 },
		[]string{"spec.curves.points"}},
	{"bad label key", func(s *pb.JobSpec) { s.Labels = map[string]string{"Bad Key": "x"} },
		[]string{`spec.labels["Bad Key"]`}},
	// Absurd values (issue 15): out of each field's plausible range.
	{"damper motion ratio 1e-300", func(s *pb.JobSpec) { s.Vehicle.Corners[0].DamperMotionRatio = 1e-300 },
		[]string{"spec.vehicle.corners[0].damper_motion_ratio"}},
	{"sprung mass 5e-324 kg", func(s *pb.JobSpec) { s.Vehicle.SprungMassKg = 5e-324 },
		[]string{"spec.vehicle.sprung_mass_kg"}},
	{"speed 1e-300 m/s", func(s *pb.JobSpec) { s.RoadCases[0].SpeedMPerS = 1e-300 },
		[]string{"spec.road_cases[0].speed_m_per_s"}},
	{"spring motion ratio 1e6", func(s *pb.JobSpec) { s.Vehicle.Corners[3].SpringMotionRatio = 1e6 },
		[]string{"spec.vehicle.corners[3].spring_motion_ratio"}},
	{"base knee 1e6 m/s", func(s *pb.JobSpec) {
		s.DesignSpace = &pb.DesignSpace{Base: &pb.Setup{Rear: &pb.AxleDamping{KneeReboundMPerS: 1e6}}}
	}, []string{"spec.design_space.base.rear.knee_rebound_m_per_s"}},
	{"lift-off limit 5 (a probability)", func(s *pb.JobSpec) { s.Constraints[0].Limit = 5 },
		[]string{"spec.constraints[0].limit"}},
	{"wheel rate and spring rate", func(s *pb.JobSpec) { s.Vehicle.Corners[2].WheelRateNPerM = 90e3 },
		[]string{"spec.vehicle.corners[2].wheel_rate_n_per_m"}},
	{"spring rate in N/mm", func(s *pb.JobSpec) { s.Vehicle.Corners[1].SpringRateNPerM = 120 },
		[]string{"spec.vehicle.corners[1].spring_rate_n_per_m"}},
	{"speed in km/h", func(s *pb.JobSpec) { s.RoadCases[1].SpeedMPerS = 230 },
		[]string{"spec.road_cases[1].speed_m_per_s"}},
	// Names and label values are shown on terminals and pages: control
	// characters (ESC starts an ECMA-48 escape sequence; U+202E reorders
	// the text after it, Unicode Standard Annex #9) are refused.
	{"escape in the display name", func(s *pb.JobSpec) { s.DisplayName = "GT\x1b]0;owned\x07" },
		[]string{"spec.display_name"}},
	{"right-to-left override in the car's name", func(s *pb.JobSpec) { s.Vehicle.Name = "GT\u202e" },
		[]string{"spec.vehicle.name"}},
	{"tab in a road case's name", func(s *pb.JobSpec) { s.RoadCases[1].Name = "kerbs\there" },
		[]string{"spec.road_cases[1].name"}},
	{"CSI in a label value", func(s *pb.JobSpec) { s.Labels = map[string]string{"car": "gt\u009b2J"} },
		[]string{`spec.labels["car"]`}},
	// Found only once every part is valid on its own: an aero stiffness
	// above the suspension's makes the car unstable at speed, on every
	// road case; each is reported.
	{"unstable at speed", func(s *pb.JobSpec) { s.Vehicle.Aero.RearStiffnessNPerM = 4e6 },
		[]string{"spec.road_cases[0].speed_m_per_s", "spec.road_cases[1].speed_m_per_s"}},
	// A bump-stop force curve: a falling force, a NaN compression, and a
	// curve on a corner without a gap.
	{"bump-stop curves: falling, NaN, no gap", func(s *pb.JobSpec) {
		s.Vehicle.Corners[0].BumpStop = &pb.BumpStop{DeflectionM: []float64{0.004, 0.01}, ForceN: []float64{800, 400}}
		s.Vehicle.Corners[1].BumpStop = &pb.BumpStop{DeflectionM: []float64{math.NaN()}, ForceN: []float64{800}}
		s.Vehicle.Corners[2].BumpStopGapM = 0
		s.Vehicle.Corners[2].BumpStop = &pb.BumpStop{DeflectionM: []float64{0.01}, ForceN: []float64{800}}
	}, []string{"spec.vehicle.corners[0].bump_stop.force_n[1]", "spec.vehicle.corners[1].bump_stop.deflection_m[0]",
		"spec.vehicle.corners[2].bump_stop.deflection_m"}},
	// Reference points and what needs them.
	{"reference points: no name, both positions, a name twice, off the car", func(s *pb.JobSpec) {
		s.Vehicle.ReferencePoints = []*pb.ReferencePoint{
			{XFromFrontAxleM: 0.4, RestHeightM: 0.05},
			{Name: "plank", XFromFrontAxleM: 1, WheelbaseFraction: 0.4, RestHeightM: 0.05},
			{Name: "plank", XFromFrontAxleM: 12, YM: 1.2, RestHeightM: 0},
		}
	}, []string{"spec.vehicle.reference_points[0].name", "spec.vehicle.reference_points[1].wheelbase_fraction",
		"spec.vehicle.reference_points[2].name", "spec.vehicle.reference_points[2].x_from_front_axle_m",
		"spec.vehicle.reference_points[2].y_m", "spec.vehicle.reference_points[2].rest_height_m"}},
	{"floor contact without reference points, balance without aero", func(s *pb.JobSpec) {
		s.Vehicle.Aero = nil
		s.Objectives = []*pb.Objective{{Kind: pb.ObjectiveKind_OBJECTIVE_KIND_GRIP}, {Kind: pb.ObjectiveKind_OBJECTIVE_KIND_BALANCE}}
		s.Constraints = append(s.Constraints, &pb.Constraint{Kind: pb.ConstraintKind_CONSTRAINT_KIND_FLOOR_CONTACT, Limit: 0.01})
	}, []string{"spec.objectives[1].kind", "spec.constraints[1].kind"}},
	// Every first-pass fault at once: all reported in one answer.
	{"many at once", func(s *pb.JobSpec) {
		s.Vehicle.SprungMassKg = -1
		s.Vehicle.Corners[3].UnsprungMassKg = 0
		s.RoadCases[1].SpeedMPerS = 0
		s.Grid.MaxHz = 0.3
		s.Constraints[0].Limit = -1
		s.Search.Generations = -4
		s.Curves.MaxVelocityMPerS = -1
	}, []string{
		"spec.vehicle.sprung_mass_kg", "spec.vehicle.corners[3].unsprung_mass_kg", "spec.road_cases[1].speed_m_per_s",
		"spec.grid.max_hz", "spec.constraints[0].limit", "spec.search.generations", "spec.curves.max_velocity_m_per_s",
	}},
}

// TestSubmitReportsEveryBadField submits each bad spec and checks that
// exactly the faulty fields are named, each by a path that resolves in
// SubmitJobRequest.
func TestSubmitReportsEveryBadField(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	md := (&pb.SubmitJobRequest{}).ProtoReflect().Descriptor()
	for _, c := range badSpecs {
		t.Run(c.name, func(t *testing.T) {
			t.Parallel()
			spec := testSpec(4)
			c.mutate(spec)
			_, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec})
			got := violations(t, c.name, err)
			sort.Strings(got)
			got = slices.Compact(got)
			want := slices.Clone(c.want)
			sort.Strings(want)
			if !slices.Equal(got, want) {
				t.Errorf("violations %q, want %q", got, want)
			}
			for _, p := range got {
				if err := resolvePath(md, p); err != nil {
					t.Errorf("path %q is not a field of SubmitJobRequest: %v", p, err)
				}
			}
		})
	}
	_, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{})
	if got := violations(t, "no spec", err); !slices.Equal(got, []string{"spec"}) {
		t.Errorf("no spec: violations %v", got)
	}
	list, err := b.client.ListJobs(testContext(t), &pb.ListJobsRequest{})
	if err != nil || len(list.GetJobs()) != 0 {
		t.Errorf("a bad spec was stored: %v, %v", list.GetJobs(), err)
	}
}

// TestEvaluateSetups evaluates setups on a spec given in the request,
// reports bad setups and bad specs together by path, and keeps to its
// limits.
func TestEvaluateSetups(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{MaxSyncWork: 4, MaxConcurrentEvaluations: 1})
	ctx := testContext(t)
	res, err := b.client.EvaluateSetups(ctx, &pb.EvaluateSetupsRequest{
		Source: &pb.EvaluateSetupsRequest_Spec{Spec: testSpec(1)}, Setups: []*pb.Setup{testSetup(), testSetup()}})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.GetEvaluations()) != 2 || len(res.GetObjectives()) != 2 || len(res.GetGeneNames()) != 4 {
		t.Fatalf("EvaluateSetups: %v", res)
	}
	a, c := res.GetEvaluations()[0], res.GetEvaluations()[1]
	if geneKey(a.GetObjectives()) != geneKey(c.GetObjectives()) || a.GetIndex() != 0 || c.GetIndex() != 1 || !a.GetFeasible() {
		t.Errorf("the same setup evaluated twice differs, or indices are wrong: %v %v", a, c)
	}
	if got := a.GetGenes(); !slices.Equal(got, []float64{0.5, 0.8, 0.55, 0.9}) {
		t.Errorf("genes %v, want the setup's ratios", got)
	}

	bad := testSpec(1)
	bad.Vehicle.TrackRearM = 0
	s1 := testSetup()
	s1.Front.BumpRatio = -1
	s2 := testSetup()
	s2.Rear = nil
	s3 := testSetup()
	s3.Front.HighSpeedReboundFactor = 11
	_, err = b.client.EvaluateSetups(ctx, &pb.EvaluateSetupsRequest{Source: &pb.EvaluateSetupsRequest_Spec{Spec: bad}, Setups: []*pb.Setup{s1, s2, s3}})
	got := violations(t, "bad setups", err)
	sort.Strings(got)
	want := []string{"setups[0].front.bump_ratio", "setups[1].rear", "setups[2].front.high_speed_rebound_factor", "spec.vehicle.track_rear_m"}
	if !slices.Equal(got, want) {
		t.Errorf("violations %q, want %q", got, want)
	}
	md := (&pb.EvaluateSetupsRequest{}).ProtoReflect().Descriptor()
	for _, p := range got {
		if err := resolvePath(md, p); err != nil {
			t.Errorf("path %q: %v", p, err)
		}
	}

	_, err = b.client.EvaluateSetups(ctx, &pb.EvaluateSetupsRequest{
		Source: &pb.EvaluateSetupsRequest_Spec{Spec: testSpec(1)}, Setups: []*pb.Setup{testSetup(), testSetup(), testSetup()}})
	wantCode(t, "3 setups × 2 cases over 4", err, codes.ResourceExhausted, ReasonTooManySetups)

	b.server.slots <- struct{}{} // the one slot is taken
	_, err = b.client.EvaluateSetups(ctx, &pb.EvaluateSetupsRequest{
		Source: &pb.EvaluateSetupsRequest_Spec{Spec: testSpec(1)}, Setups: []*pb.Setup{testSetup()}})
	<-b.server.slots
	wantCode(t, "evaluation while the slot is taken", err, codes.ResourceExhausted, ReasonServerBusy)
}

// TestSubmitOverTheLimit: a job larger than MaxJobWork is refused.
func TestSubmitOverTheLimit(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{MaxJobWork: 8 * 1 * 10 * 2}) // population × islands × generations × cases of testSpec(10)
	if _, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: testSpec(10)}); err != nil {
		t.Fatalf("a job at the limit: %v", err)
	}
	_, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: testSpec(11)})
	wantCode(t, "a job over the limit", err, codes.ResourceExhausted, ReasonJobTooLarge)
}

// TestGridOverTheLimit: a spec whose grid is finer than MaxGridPoints is
// refused, as a job and as a synchronous evaluation.
func TestGridOverTheLimit(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{MaxGridPoints: 121}) // testSpec's grid has 121 points
	if _, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: testSpec(2)}); err != nil {
		t.Fatalf("a grid at the limit: %v", err)
	}
	spec := testSpec(2)
	spec.Grid.Points = 123
	_, err := b.client.SubmitJob(testContext(t), &pb.SubmitJobRequest{Spec: spec})
	wantCode(t, "a job with a grid over the limit", err, codes.ResourceExhausted, ReasonGridTooFine)
	_, err = b.client.EvaluateSetups(testContext(t), &pb.EvaluateSetupsRequest{
		Source: &pb.EvaluateSetupsRequest_Spec{Spec: spec}, Setups: []*pb.Setup{testSetup()}})
	wantCode(t, "an evaluation with a grid over the limit", err, codes.ResourceExhausted, ReasonGridTooFine)
}

// TestListAndFrontRequestPaths: bad list and page arguments are named by
// their request paths, whichever layer finds them.
func TestListAndFrontRequestPaths(t *testing.T) {
	t.Parallel()
	b := setup(t, Options{})
	ctx := testContext(t)
	for _, c := range []struct {
		name string
		req  *pb.ListJobsRequest
		want []string
	}{
		{"unspecified state", &pb.ListJobsRequest{States: []pb.JobState{pb.JobState_JOB_STATE_RUNNING, pb.JobState_JOB_STATE_UNSPECIFIED}}, []string{"states[1]"}},
		{"negative page size", &pb.ListJobsRequest{PageSize: -1}, []string{"page_size"}},
		{"foreign page token", &pb.ListJobsRequest{PageToken: "bm90IGEgdG9rZW4"}, []string{"page_token"}},
		{"bad label key", &pb.ListJobsRequest{Labels: map[string]string{"-x": "y"}}, []string{`labels["-x"]`}},
	} {
		_, err := b.client.ListJobs(ctx, c.req)
		got := violations(t, c.name, err)
		if !slices.Equal(got, c.want) {
			t.Errorf("%s: violations %q, want %q", c.name, got, c.want)
		}
		for _, p := range got {
			if err := resolvePath(c.req.ProtoReflect().Descriptor(), p); err != nil {
				t.Errorf("%s: %v", c.name, err)
			}
		}
	}
	job := b.submit(t, testSpec(2))
	if _, final := b.watch(t, job.GetName()); final.GetState() != pb.JobState_JOB_STATE_SUCCEEDED {
		t.Fatalf("job %v", final)
	}
	_, err := b.client.GetFront(ctx, &pb.GetFrontRequest{Job: job.GetName(), PageToken: "bm90IGEgdG9rZW4"})
	if got := violations(t, "front page token", err); !slices.Equal(got, []string{"page_token"}) {
		t.Errorf("front page token: violations %q", got)
	}
	_, err = b.client.GetFront(ctx, &pb.GetFrontRequest{Job: "jobs/a/b"})
	if got := violations(t, "job name", err); !slices.Equal(got, []string{"job"}) {
		t.Errorf("job name: violations %q", got)
	}
}
